/**
 * Performance figures of a cycle from its state points (textbook definitions):
 *  - turbine section (each stage group between inlet, extractions in model order, outlet, and the
 *    whole section): isentropic efficiency η = (h_in − h_out)/(h_in − h_out,s), h_out,s = h(p_out, s_in);
 *    section power Σ m·h in − Σ m·h out;
 *  - pump: η = (h_out,s − h_in)/(h_out − h_in) and power m·(h_out − h_in);
 *  - condenser: TTD = tsat(p_cond) − T_cw,out, ITD = tsat(p_cond) − T_cw,in, duty = m_cw·(h_cw,out − h_cw,in),
 *    cooling-water rise, condensate subcooling tsat(p_cond) − T_condensate;
 *  - closed heater: TTD = tsat(p_shell) − T_feed,out, DCA = T_drain − T_feed,in, duty, feed rise;
 *  - boiler and superheater: heat absorbed Σ m·h out − Σ m·h in; generator output and shaft power;
 *  - cycle: thermal efficiency η = P_el / Q_boiler (heat absorbed by the steam, gross of pump
 *    power), heat rate 3600/η in kJ/kWh, process heat (cycle sinks − cycle sources, m·h) and fuel
 *    utilisation (P_el + Q_process)/Q_boiler.
 * A figure is null where a value it needs is not known (never NaN).
 */
import { ps } from '../steam';
import { portUses, type CycleModel } from './model';
import { tsatSafe } from './properties';
import type { PerformanceFigure } from './types';

export interface FigureState {
  p: number | null;
  T: number | null;
  h: number | null;
  s: number | null;
  x: number | null;
  m: number | null;
  phase: string | null;
}

export type StateOf = (pointId: string) => FigureState;

const fin = (x: number | null | undefined): x is number => typeof x === 'number' && Number.isFinite(x);
const out = (x: number | null): number | null => (fin(x) ? x : null);

function hIsentropic(pOut: number | null, sIn: number | null): number | null {
  if (!fin(pOut) || !fin(sIn)) return null;
  try {
    return ps(pOut, sIn).h;
  } catch {
    return null;
  }
}

function mh(st: FigureState): number | null {
  return fin(st.m) && fin(st.h) ? st.m * st.h : null;
}

function sum(xs: (number | null)[]): number | null {
  let s = 0;
  for (const x of xs) {
    if (!fin(x)) return null;
    s += x;
  }
  return s;
}

interface Raw {
  id: string;
  kind: PerformanceFigure['kind'];
  equipmentId?: string;
  label: string;
  unit: PerformanceFigure['unit'];
  note?: string;
  f: (get: StateOf, power: (genId: string) => number | null) => number | null;
}

/** The figures the model allows, as functions of a state. */
function figureDefs(model: CycleModel): Raw[] {
  const defs: Raw[] = [];
  const eff = (hin: number | null, hout: number | null, hs: number | null) =>
    fin(hin) && fin(hout) && fin(hs) && Math.abs(hin - hs) > 1e-9 ? (hin - hout) / (hin - hs) : null;
  const heatAbsorbed: string[] = [];
  const generators: string[] = [];
  for (const e of model.equipment) {
    switch (e.kind) {
      case 'turbine-section': {
        const seq = [e.ports.inlet, ...(e.ports.extractions ?? []), e.ports.outlet];
        const groups: [string, string][] = [];
        for (let k = 1; k < seq.length; k++) groups.push([seq[k - 1], seq[k]]);
        if (seq.length > 2) groups.push([e.ports.inlet, e.ports.outlet]);
        for (const [a, b] of groups) {
          const whole = a === e.ports.inlet && b === e.ports.outlet;
          const wet = model.points.find((p) => p.id === b)?.phase === 'two-phase';
          defs.push({
            id: `eta:${e.id}:${a}:${b}`,
            kind: 'isentropic-efficiency',
            equipmentId: e.id,
            label: `${e.label}: isentropic efficiency ${whole ? 'inlet to exhaust' : `${a} to ${b}`}`,
            unit: '1',
            ...(wet
              ? {
                  note: 'wet exhaust: its enthalpy (quality) comes from the balances, so only the reconciled figure exists',
                }
              : {}),
            f: (get) => {
              const i = get(a);
              const o = get(b);
              return eff(i.h, o.h, hIsentropic(o.p, i.s));
            },
          });
        }
        const uses = portUses(e);
        defs.push({
          id: `power:${e.id}`,
          kind: 'section-power',
          equipmentId: e.id,
          label: `${e.label}: power`,
          unit: 'W',
          f: (get) => {
            const ins = sum(uses.filter((u) => u.role === 'in').map((u) => mh(get(u.point))));
            const outs = sum(uses.filter((u) => u.role === 'out').map((u) => mh(get(u.point))));
            return fin(ins) && fin(outs) ? ins - outs : null;
          },
        });
        break;
      }
      case 'pump': {
        const { inlet, outlet } = e.ports;
        defs.push({
          id: `eta:${e.id}`,
          kind: 'pump-efficiency',
          equipmentId: e.id,
          label: `${e.label}: efficiency`,
          unit: '1',
          note: 'thermodynamic method: small temperature rises make it sensitive to the thermometers',
          f: (get) => {
            const i = get(inlet);
            const o = get(outlet);
            const hs = hIsentropic(o.p, i.s);
            return fin(i.h) && fin(o.h) && fin(hs) && Math.abs(o.h - i.h) > 1e-9 ? (hs - i.h) / (o.h - i.h) : null;
          },
        });
        defs.push({
          id: `power:${e.id}`,
          kind: 'pump-power',
          equipmentId: e.id,
          label: `${e.label}: power to the water`,
          unit: 'W',
          f: (get) => {
            const i = get(inlet);
            const o = get(outlet);
            const m = fin(o.m) ? o.m : i.m;
            return fin(m) && fin(i.h) && fin(o.h) ? m * (o.h - i.h) : null;
          },
        });
        break;
      }
      case 'condenser': {
        const { steamIn, condensateOut, coolingIn, coolingOut } = e.ports;
        const ts = (get: StateOf) => {
          const p = get(steamIn).p;
          return fin(p) ? tsatSafe(p) : null;
        };
        const diff = (a: number | null, b: number | null) => (fin(a) && fin(b) ? a - b : null);
        defs.push({
          id: `ttd:${e.id}`,
          kind: 'condenser-ttd',
          equipmentId: e.id,
          label: `${e.label}: terminal temperature difference`,
          unit: 'K',
          f: (g) => diff(ts(g), g(coolingOut).T),
        });
        defs.push({
          id: `itd:${e.id}`,
          kind: 'condenser-itd',
          equipmentId: e.id,
          label: `${e.label}: initial temperature difference`,
          unit: 'K',
          f: (g) => diff(ts(g), g(coolingIn).T),
        });
        defs.push({
          id: `duty:${e.id}`,
          kind: 'condenser-duty',
          equipmentId: e.id,
          label: `${e.label}: duty (cooling water)`,
          unit: 'W',
          f: (g) => {
            const i = g(coolingIn);
            const o = g(coolingOut);
            const m = fin(i.m) ? i.m : o.m;
            return fin(m) && fin(i.h) && fin(o.h) ? m * (o.h - i.h) : null;
          },
        });
        defs.push({
          id: `cw-rise:${e.id}`,
          kind: 'cooling-water-rise',
          equipmentId: e.id,
          label: `${e.label}: cooling-water temperature rise`,
          unit: 'K',
          f: (g) => diff(g(coolingOut).T, g(coolingIn).T),
        });
        defs.push({
          id: `subcooling:${e.id}`,
          kind: 'condensate-subcooling',
          equipmentId: e.id,
          label: `${e.label}: condensate subcooling`,
          unit: 'K',
          f: (g) => diff(ts(g), g(condensateOut).T),
        });
        break;
      }
      case 'closed-heater': {
        const { feedIn, feedOut, steamIn, drainOut } = e.ports;
        const diff = (a: number | null, b: number | null) => (fin(a) && fin(b) ? a - b : null);
        defs.push({
          id: `ttd:${e.id}`,
          kind: 'heater-ttd',
          equipmentId: e.id,
          label: `${e.label}: terminal temperature difference`,
          unit: 'K',
          f: (g) => {
            const p = g(steamIn).p;
            return diff(fin(p) ? tsatSafe(p) : null, g(feedOut).T);
          },
        });
        defs.push({
          id: `dca:${e.id}`,
          kind: 'heater-dca',
          equipmentId: e.id,
          label: `${e.label}: drain cooler approach`,
          unit: 'K',
          f: (g) => diff(g(drainOut).T, g(feedIn).T),
        });
        defs.push({
          id: `duty:${e.id}`,
          kind: 'heater-duty',
          equipmentId: e.id,
          label: `${e.label}: duty`,
          unit: 'W',
          f: (g) => {
            const i = g(feedIn);
            const o = g(feedOut);
            const m = fin(i.m) ? i.m : o.m;
            return fin(m) && fin(i.h) && fin(o.h) ? m * (o.h - i.h) : null;
          },
        });
        defs.push({
          id: `rise:${e.id}`,
          kind: 'heater-rise',
          equipmentId: e.id,
          label: `${e.label}: feed temperature rise`,
          unit: 'K',
          f: (g) => diff(g(feedOut).T, g(feedIn).T),
        });
        break;
      }
      case 'boiler':
      case 'superheater': {
        const uses = portUses(e);
        heatAbsorbed.push(e.id);
        defs.push({
          id: `heat:${e.id}`,
          kind: 'heat-absorbed',
          equipmentId: e.id,
          label: `${e.label}: heat absorbed`,
          unit: 'W',
          f: (g) => {
            const ins = sum(uses.filter((u) => u.role === 'in').map((u) => mh(g(u.point))));
            const outs = sum(uses.filter((u) => u.role === 'out').map((u) => mh(g(u.point))));
            return fin(ins) && fin(outs) ? outs - ins : null;
          },
        });
        break;
      }
      case 'generator': {
        generators.push(e.id);
        const gid = e.id;
        defs.push({
          id: `output:${gid}`,
          kind: 'electrical-output',
          equipmentId: gid,
          label: `${e.label}: electrical output`,
          unit: 'W',
          f: (_g, power) => power(gid),
        });
        const sections = e.sections;
        defs.push({
          id: `shaft:${gid}`,
          kind: 'shaft-power',
          equipmentId: gid,
          label: `${e.label}: shaft power of its sections`,
          unit: 'W',
          f: (g) => {
            const works = sections.map((sid) => {
              const s = model.equipment.find((x) => x.id === sid)!;
              const uses = portUses(s);
              const ins = sum(uses.filter((u) => u.role === 'in').map((u) => mh(g(u.point))));
              const outs = sum(uses.filter((u) => u.role === 'out').map((u) => mh(g(u.point))));
              return fin(ins) && fin(outs) ? ins - outs : null;
            });
            return sum(works);
          },
        });
        break;
      }
      default:
        break;
    }
  }
  // cycle figures
  const byId = new Map(defs.map((d) => [d.id, d]));
  const boilerHeat = (g: StateOf, pw: (id: string) => number | null) =>
    sum(heatAbsorbed.map((id) => byId.get(`heat:${id}`)!.f(g, pw)));
  const electrical = (pw: (id: string) => number | null) => (generators.length ? sum(generators.map(pw)) : null);
  const producers = new Set<string>();
  const consumers = new Set<string>();
  for (const e of model.equipment) {
    for (const u of portUses(e)) {
      if (u.role === 'out') producers.add(u.point);
      if (u.role === 'in') consumers.add(u.point);
    }
  }
  const cyclePoints = model.points.filter((p) => (p.circuit ?? 'cycle') === 'cycle');
  const sinks = cyclePoints.filter((p) => producers.has(p.id) && !consumers.has(p.id)).map((p) => p.id);
  const sources = cyclePoints.filter((p) => consumers.has(p.id) && !producers.has(p.id)).map((p) => p.id);
  const processHeat = (g: StateOf) => {
    if (sinks.length === 0 && sources.length === 0) return null;
    const a = sum(sinks.map((p) => mh(g(p))));
    const b = sum(sources.map((p) => mh(g(p))));
    return fin(a) && fin(b) ? a - b : null;
  };
  if (heatAbsorbed.length > 0) {
    defs.push({
      id: 'cycle:boiler-heat',
      kind: 'boiler-heat',
      label: 'Heat absorbed in boiler and superheater',
      unit: 'W',
      f: boilerHeat,
    });
    if (generators.length > 0) {
      const eta = (g: StateOf, pw: (id: string) => number | null) => {
        const q = boilerHeat(g, pw);
        const p = electrical(pw);
        return fin(q) && fin(p) && q > 0 ? p / q : null;
      };
      defs.push({
        id: 'cycle:efficiency',
        kind: 'thermal-efficiency',
        label: 'Cycle thermal efficiency (electrical, on heat absorbed)',
        unit: '1',
        f: eta,
      });
      defs.push({
        id: 'cycle:heat-rate',
        kind: 'heat-rate',
        label: 'Heat rate (on heat absorbed)',
        unit: 'kJ/kWh',
        f: (g, pw) => {
          const e = eta(g, pw);
          return fin(e) && e > 0 ? 3600 / e : null;
        },
      });
      if (sinks.length + sources.length > 0) {
        defs.push({
          id: 'cycle:process-heat',
          kind: 'process-heat',
          label: 'Heat to process (steam out less water back)',
          unit: 'W',
          f: (g) => processHeat(g),
        });
        defs.push({
          id: 'cycle:utilisation',
          kind: 'fuel-utilisation',
          label: 'Energy utilisation (electrical + process, on heat absorbed)',
          unit: '1',
          f: (g, pw) => {
            const q = boilerHeat(g, pw);
            const p = electrical(pw);
            const h = processHeat(g);
            return fin(q) && fin(p) && fin(h) && q > 0 ? (p + h) / q : null;
          },
        });
      }
    }
  }
  return defs;
}

/** Every figure, from the reconciled and from the measured state. */
export function performanceFigures(
  model: CycleModel,
  reconciled: StateOf,
  reconciledPower: (genId: string) => number | null,
  measured: StateOf,
  measuredPower: (genId: string) => number | null,
): PerformanceFigure[] {
  return figureDefs(model).map((d) => {
    let value: number | null = null;
    let meas: number | null = null;
    try {
      value = out(d.f(reconciled, reconciledPower));
    } catch {
      value = null;
    }
    try {
      meas = out(d.f(measured, measuredPower));
    } catch {
      meas = null;
    }
    return {
      id: d.id,
      kind: d.kind,
      ...(d.equipmentId ? { equipmentId: d.equipmentId } : {}),
      label: d.label,
      unit: d.unit,
      value,
      measured: meas,
      ...(d.note ? { note: d.note } : {}),
    };
  });
}

/** One figure as a function of a state (in the order performanceFigures gives them); null where it cannot be formed. */
export type FigureFunction = (get: StateOf, power: (genId: string) => number | null) => number | null;

/** The figure functions of a model, built once for many evaluations (figureValues builds them on every call). */
export function figureFunctions(model: CycleModel): FigureFunction[] {
  return figureDefs(model).map((d) => (get, power) => {
    try {
      return out(d.f(get, power));
    } catch {
      return null;
    }
  });
}

/** The value of every figure (in the order performanceFigures gives them) from one state; null where it cannot be formed. */
export function figureValues(
  model: CycleModel,
  get: StateOf,
  power: (genId: string) => number | null,
): (number | null)[] {
  return figureFunctions(model).map((f) => f(get, power));
}
