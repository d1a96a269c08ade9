/**
 * Plant equations: the cycle model and a round's accepted readings turned into the variables and
 * constraints of reconcile() (shared/reconcile).
 *
 * Variables, in internal units chosen so the problem is well conditioned (MPa, K, kJ/kg, kg/s, MW):
 *  - every reading that a constraint reads is a measured variable named by its tag;
 *  - a point's pressure is its (first) pressure reading, else the pressure of its samePressureAs
 *    point, else — saturated or wet with a thermometer — an unmeasured p fixed by saturation, else
 *    its nominal pressure (an assumption, no variable), else an unmeasured p;
 *  - a single-phase point's temperature is its (first) reading; saturated and wet points are at
 *    tsat(p); a two-phase point has its quality x as an unmeasured variable;
 *  - one mass flow per stream: points joined by a one-in-one-out mass balance (pump, superheater,
 *    a heater's tube side…) share it; it is the stream's first flow reading, else unmeasured.
 *
 * Enthalpies are not variables but IF97 functions of those: h(p, T) for a single-phase point,
 * h'(p) or h''(p) for a saturated one, h' + x·(h'' − h') for a wet one (properties.ts). Points that a
 * splitter or valve joins share one enthalpy; where one of them is fixed by its own p and T the
 * others are held equal to it, and where none is, the group gets an unmeasured enthalpy variable
 * (a point whose temperature nobody reads is then at T(p, h), found afterwards).
 *
 * Constraints: mass balance of every equipment that joins more than one stream; adiabatic energy
 * balance of closed heaters, deaerators, mixers, and of the condenser including its cooling water
 * (steam-side heat = cooling-water flow × enthalpy rise); equal enthalpy across throttles and
 * splitters; generator output = η_gen · Σ section work; T = tsat(p) at saturated and wet points with
 * a thermometer; two readings of one quantity at one place (or two flow readings on one stream)
 * equal. Every constraint has an analytic gradient (the pressure derivatives of the IF97
 * properties by central differences of 1 ppm). Scales: kg/s, MW, kJ/kg, K.
 */
import { linear, type Constraint, type Measurement, type UnmeasuredVariable } from '../reconcile';
import { portUses, type CycleModel, type CyclePoint, type PointPhase } from './model';
import { enthalpyOf, propsPT, propsSat, tsatSafe } from './properties';

/** SI per internal unit, by variable kind */
export const SCALE = { p: 1e6, T: 1, m: 1, h: 1e3, x: 1, power: 1e6 } as const;
export type VarKind = keyof typeof SCALE;
export const SI_UNIT_OF: Record<VarKind, string> = { p: 'Pa', T: 'K', m: 'kg/s', h: 'J/kg', x: '1', power: 'W' };

export interface AcceptedReading {
  tag: string;
  /** SI absolute */
  value: number;
  /** SI */
  sigma: number;
}

/** A variable, or a fixed value (internal units). */
export type Ref = { var: string } | { value: number };

export interface VarInfo {
  id: string;
  kind: VarKind;
  pointId?: string;
  equipmentId?: string;
  instrumentTag?: string;
  measured: boolean;
}

/** Enthalpy (kJ/kg) as a function of variables, with its gradient. */
export interface HExpr {
  deps: string[];
  value: (v: Readonly<Record<string, number>>) => number;
  grad: (v: Readonly<Record<string, number>>) => Record<string, number>;
}

export interface PointRefs {
  point: CyclePoint;
  phase: PointPhase;
  p: Ref;
  pressureSource: 'measured' | 'same-as' | 'saturation' | 'assumed' | 'unmeasured';
  pressureFrom?: string;
  /** single-phase: its thermometer's variable; saturated or wet: the thermometer held at tsat (if any) */
  T: Ref | null;
  x: string | null;
  m: string | null;
  /** the point's own enthalpy from its state, when its state fixes it */
  h: HExpr | null;
  /** id of the enthalpy group (points a splitter or valve joins) */
  hGroup: string;
  /** present readings at this point by quantity, in model order */
  tags: { p: string[]; T: string[]; m: string[] };
}

export interface HGroup {
  id: string;
  members: string[];
  /** member whose own enthalpy is the group's; null when an unmeasured variable carries it */
  rep: string | null;
  h: HExpr;
}

export interface ConstraintInfo {
  id: string;
  kind: 'mass' | 'energy' | 'duty' | 'power' | 'enthalpy' | 'saturation' | 'twin' | 'stream';
  label: string;
  equipmentId?: string;
  pointId?: string;
  /** variables the constraint reads */
  deps: string[];
}

/** A balance as data, evaluated both by the constraint and by the balance report. */
export type BalanceSpec =
  | { id: string; kind: 'mass'; equipmentId: string; label: string; ins: string[]; outs: string[] }
  | {
      id: string;
      kind: 'energy' | 'duty';
      equipmentId: string;
      label: string;
      ins: string[];
      outs: string[];
      /** condenser: cooling-water in / out (their heat pickup is the "out" side of the duty) */
      coolingIn?: string;
      coolingOut?: string;
    }
  | { id: string; kind: 'enthalpy'; equipmentId: string; label: string; from: string; to: string }
  | {
      id: string;
      kind: 'power';
      equipmentId: string;
      label: string;
      efficiency: number;
      sections: { id: string; ins: string[]; outs: string[] }[];
      tags: string[];
    };

export interface EquationSystem {
  measured: Measurement[];
  unmeasured: UnmeasuredVariable[];
  constraints: Constraint[];
  info: Record<string, ConstraintInfo>;
  vars: Record<string, VarInfo>;
  points: Record<string, PointRefs>;
  hGroups: Record<string, HGroup>;
  balances: BalanceSpec[];
  /** tags of accepted readings that no constraint reads */
  notInBalance: string[];
  /** guesses of unmeasured variables (internal units) */
  guesses: Record<string, number>;
}

const REL_DP = 1e-6;

export const isSatPhase = (ph: PointPhase) =>
  ph === 'saturated-liquid' || ph === 'saturated-vapour' || ph === 'two-phase';

export const valueOf = (r: Ref, v: Readonly<Record<string, number>>): number => ('var' in r ? v[r.var] : r.value);

/** Mass and energy balances of each equipment, as data. */
export function balanceSpecs(model: CycleModel, powerTags: Readonly<Record<string, string[]>>): BalanceSpec[] {
  const specs: BalanceSpec[] = [];
  const byId = new Map(model.equipment.map((e) => [e.id, e]));
  for (const e of model.equipment) {
    if (e.kind === 'generator') {
      const tags = powerTags[e.id] ?? [];
      const sections = e.sections.map((sid) => {
        const s = byId.get(sid)!;
        const uses = portUses(s);
        return {
          id: sid,
          ins: uses.filter((u) => u.role === 'in').map((u) => u.point),
          outs: uses.filter((u) => u.role === 'out').map((u) => u.point),
        };
      });
      specs.push({
        id: `power:${e.id}`,
        kind: 'power',
        equipmentId: e.id,
        label: `${e.label}: output against turbine work`,
        efficiency: e.efficiency,
        sections,
        tags,
      });
      continue;
    }
    if (e.kind === 'drum') continue;
    const uses = portUses(e);
    const ins = uses.filter((u) => u.role === 'in' && !u.cooling).map((u) => u.point);
    const outs = uses.filter((u) => u.role === 'out' && !u.cooling).map((u) => u.point);
    specs.push({ id: `mass:${e.id}`, kind: 'mass', equipmentId: e.id, label: `${e.label}: mass`, ins, outs });
    switch (e.kind) {
      case 'condenser':
        specs.push({
          id: `mass-cooling:${e.id}`,
          kind: 'mass',
          equipmentId: e.id,
          label: `${e.label}: cooling water mass`,
          ins: [e.ports.coolingIn],
          outs: [e.ports.coolingOut],
        });
        specs.push({
          id: `duty:${e.id}`,
          kind: 'duty',
          equipmentId: e.id,
          label: `${e.label}: steam-side heat against cooling water`,
          ins,
          outs,
          coolingIn: e.ports.coolingIn,
          coolingOut: e.ports.coolingOut,
        });
        break;
      case 'closed-heater': {
        // the two sides have their own mass balances
        specs.pop();
        const shellIn = [e.ports.steamIn, ...(e.ports.drainsIn ?? [])];
        specs.push({
          id: `mass-feed:${e.id}`,
          kind: 'mass',
          equipmentId: e.id,
          label: `${e.label}: feed side mass`,
          ins: [e.ports.feedIn],
          outs: [e.ports.feedOut],
        });
        specs.push({
          id: `mass-shell:${e.id}`,
          kind: 'mass',
          equipmentId: e.id,
          label: `${e.label}: shell side mass`,
          ins: shellIn,
          outs: [e.ports.drainOut],
        });
        specs.push({ id: `energy:${e.id}`, kind: 'energy', equipmentId: e.id, label: `${e.label}: energy`, ins, outs });
        break;
      }
      case 'deaerator':
      case 'mixer':
        specs.push({ id: `energy:${e.id}`, kind: 'energy', equipmentId: e.id, label: `${e.label}: energy`, ins, outs });
        break;
      case 'splitter':
        for (const o of e.ports.outlets) {
          specs.push({
            id: `enthalpy:${e.id}:${o}`,
            kind: 'enthalpy',
            equipmentId: e.id,
            label: `${e.label}: enthalpy to ${o}`,
            from: e.ports.inlet,
            to: o,
          });
        }
        break;
      case 'throttle':
        specs.push({
          id: `enthalpy:${e.id}`,
          kind: 'enthalpy',
          equipmentId: e.id,
          label: `${e.label}: enthalpy`,
          from: e.ports.inlet,
          to: e.ports.outlet,
        });
        break;
      default:
        break;
    }
  }
  return specs;
}

/** Points whose enthalpy a balance reads. */
function enthalpyPoints(specs: BalanceSpec[]): Set<string> {
  const s = new Set<string>();
  for (const b of specs) {
    if (b.kind === 'energy' || b.kind === 'duty') {
      for (const p of [...b.ins, ...b.outs]) s.add(p);
      if (b.coolingIn) s.add(b.coolingIn);
      if (b.coolingOut) s.add(b.coolingOut);
    } else if (b.kind === 'enthalpy') {
      s.add(b.from);
      s.add(b.to);
    } else if (b.kind === 'power' && b.tags.length > 0) {
      for (const sec of b.sections) for (const p of [...sec.ins, ...sec.outs]) s.add(p);
    }
  }
  return s;
}

/** Accumulating gradient builder (a variable may appear in two terms). */
function addTo(g: Record<string, number>, k: string, d: number): void {
  g[k] = (g[k] ?? 0) + d;
}

/** Union–find over point ids (the smallest model index is the root, so names do not depend on visiting order). */
function groups(ids: string[], pairs: [string, string][]): Map<string, string> {
  const order = new Map(ids.map((id, i) => [id, i]));
  const parent = new Map(ids.map((id) => [id, id]));
  const find = (a: string): string => {
    let r = a;
    while (parent.get(r) !== r) r = parent.get(r)!;
    parent.set(a, r);
    return r;
  };
  for (const [a, b] of pairs) {
    const ra = find(a);
    const rb = find(b);
    if (ra === rb) continue;
    if (order.get(ra)! < order.get(rb)!) parent.set(rb, ra);
    else parent.set(ra, rb);
  }
  return new Map(ids.map((id) => [id, find(id)]));
}

// ---------------------------------------------------------------------------------------------
// enthalpy expressions (kJ/kg of internal variables), each with a one-entry cache: reconcile()
// asks for f and then grad at the same point. The pressure derivative (two more IF97 calls) is
// formed only when a gradient asks for it: a value alone (a trial step, the figures' sensitivity
// moves) does not pay for it.

function pDeriv(pS: number): number {
  return Math.max(pS * REL_DP, 1e-3);
}

function hSinglePhase(phase: PointPhase, pRef: Ref, TVar: string): HExpr {
  const pVar = 'var' in pRef ? pRef.var : null;
  let kp = NaN;
  let kT = NaN;
  let h = 0;
  let dT = 0;
  /** dp at (kp, kT), NaN until asked for */
  let dp = NaN;
  const at = (v: Readonly<Record<string, number>>) => {
    const p = valueOf(pRef, v);
    const T = v[TVar];
    if (p === kp && T === kT) return;
    const a = propsPT(p * SCALE.p, T, phase);
    kp = p;
    kT = T;
    h = a.h / SCALE.h;
    dT = a.cp / SCALE.h;
    dp = NaN;
  };
  const dpAt = () => {
    if (Number.isNaN(dp)) {
      const pS = kp * SCALE.p;
      const d = pDeriv(pS);
      dp = ((propsPT(pS + d, kT, phase).h - propsPT(pS - d, kT, phase).h) / (2 * d)) * (SCALE.p / SCALE.h);
    }
    return dp;
  };
  return {
    deps: pVar ? [pVar, TVar] : [TVar],
    value: (v) => {
      at(v);
      return h;
    },
    grad: (v) => {
      at(v);
      const g: Record<string, number> = { [TVar]: dT };
      if (pVar) g[pVar] = dpAt();
      return g;
    },
  };
}

function hSaturated(phase: PointPhase, pRef: Ref, xVar: string | null): HExpr {
  const pVar = 'var' in pRef ? pRef.var : null;
  let kp = NaN;
  let kx = NaN;
  let h = 0;
  let dx = 0;
  /** dp at (kp, kx), NaN until asked for */
  let dp = NaN;
  const mix = (s: { hf: number; hg: number }, x: number) =>
    phase === 'saturated-liquid' ? s.hf : phase === 'saturated-vapour' ? s.hg : s.hf + x * (s.hg - s.hf);
  const at = (v: Readonly<Record<string, number>>) => {
    const p = valueOf(pRef, v);
    const x = xVar ? v[xVar] : 0;
    if (p === kp && x === kx) return;
    const s0 = propsSat(p * SCALE.p);
    kp = p;
    kx = x;
    h = mix(s0, x) / SCALE.h;
    dx = (s0.hg - s0.hf) / SCALE.h;
    dp = NaN;
  };
  const dpAt = () => {
    if (Number.isNaN(dp)) {
      const pS = kp * SCALE.p;
      const d = pDeriv(pS);
      dp = ((mix(propsSat(pS + d), kx) - mix(propsSat(pS - d), kx)) / (2 * d)) * (SCALE.p / SCALE.h);
    }
    return dp;
  };
  return {
    deps: [...(pVar ? [pVar] : []), ...(xVar ? [xVar] : [])],
    value: (v) => {
      at(v);
      return h;
    },
    grad: (v) => {
      at(v);
      const g: Record<string, number> = {};
      if (pVar) g[pVar] = dpAt();
      if (xVar) g[xVar] = dx;
      return g;
    },
  };
}

function hVariable(id: string): HExpr {
  return { deps: [id], value: (v) => v[id], grad: () => ({ [id]: 1 }) };
}

interface Term {
  m: string;
  h: HExpr;
  sign: number;
}

/** k·Σ sign·m·h − Σ minus = 0 (k = efficiency/1000: kg/s × kJ/kg = kW → MW). */
function bilinear(id: string, terms: Term[], eff: number, minus: string[]): Constraint {
  const k = eff / 1000;
  return {
    id,
    f: (v) => {
      let s = 0;
      for (const t of terms) s += t.sign * v[t.m] * t.h.value(v);
      s *= k;
      for (const p of minus) s -= v[p];
      return s;
    },
    grad: (v) => {
      const g: Record<string, number> = {};
      for (const t of terms) {
        const m = v[t.m];
        addTo(g, t.m, k * t.sign * t.h.value(v));
        const hg = t.h.grad(v);
        for (const d of t.h.deps) addTo(g, d, k * t.sign * m * hg[d]);
      }
      for (const p of minus) addTo(g, p, -1);
      return g;
    },
  };
}

/** h_a − h_b = 0, kJ/kg. */
function equalEnthalpy(id: string, a: HExpr, b: HExpr): Constraint {
  return {
    id,
    f: (v) => a.value(v) - b.value(v),
    grad: (v) => {
      const g: Record<string, number> = {};
      const ga = a.grad(v);
      const gb = b.grad(v);
      for (const d of a.deps) addTo(g, d, ga[d]);
      for (const d of b.deps) addTo(g, d, -gb[d]);
      return g;
    },
  };
}

/** T − tsat(p) = 0, K. */
function saturationConstraint(id: string, pRef: Ref, TVar: string): Constraint {
  let key = NaN;
  let cached = { Ts: 0, d: 0 };
  const props = (p: number) => {
    if (p === key) return cached;
    const pS = p * SCALE.p;
    const dp = pDeriv(pS);
    const Ts = tsatSafe(pS);
    const d = ((tsatSafe(pS + dp) - tsatSafe(pS - dp)) / (2 * dp)) * SCALE.p;
    key = p;
    cached = { Ts, d };
    return cached;
  };
  return {
    id,
    f: (v) => v[TVar] - props(valueOf(pRef, v)).Ts,
    grad: (v) => {
      const c = props(valueOf(pRef, v));
      const g: Record<string, number> = { [TVar]: 1 };
      if ('var' in pRef) addTo(g, pRef.var, -c.d);
      return g;
    },
  };
}

/** Saturation pressure guess from a temperature reading: bisection on tsat in log p over the saturation line. */
function satPressureGuess(T: number): number {
  let lo = Math.log(611.213);
  let hi = Math.log(22.064e6);
  for (let k = 0; k < 40; k++) {
    const mid = 0.5 * (lo + hi);
    if (tsatSafe(Math.exp(mid)) < T) lo = mid;
    else hi = mid;
  }
  return Math.exp(0.5 * (lo + hi));
}

// ---------------------------------------------------------------------------------------------

export function buildEquations(model: CycleModel, readings: ReadonlyMap<string, AcceptedReading>): EquationSystem {
  const pointById = new Map(model.points.map((p) => [p.id, p]));
  const pointIds = model.points.map((p) => p.id);
  // present readings by place and quantity, in model order
  const at: Record<string, { p: string[]; T: string[]; m: string[] }> = {};
  for (const p of model.points) at[p.id] = { p: [], T: [], m: [] };
  const powerTags: Record<string, string[]> = {};
  for (const i of model.instruments) {
    if (!readings.has(i.tag)) continue;
    if (i.quantity === 'pressure') at[i.point!].p.push(i.tag);
    else if (i.quantity === 'temperature') at[i.point!].T.push(i.tag);
    else if (i.quantity === 'massFlow') at[i.point!].m.push(i.tag);
    else if (i.quantity === 'power') (powerTags[i.equipment!] ??= []).push(i.tag);
  }
  const specs = balanceSpecs(model, powerTags);
  const needH = enthalpyPoints(specs);
  const inMass = new Set<string>();
  for (const b of specs) if (b.kind === 'mass') for (const p of [...b.ins, ...b.outs]) inMass.add(p);
  const flowGroup = groups(
    pointIds,
    specs
      .filter(
        (b): b is Extract<BalanceSpec, { kind: 'mass' }> =>
          b.kind === 'mass' && b.ins.length === 1 && b.outs.length === 1,
      )
      .map((b) => [b.ins[0], b.outs[0]]),
  );
  const hGroupOf = groups(
    pointIds,
    specs
      .filter((b): b is Extract<BalanceSpec, { kind: 'enthalpy' }> => b.kind === 'enthalpy')
      .map((b) => [b.from, b.to]),
  );

  const vars: Record<string, VarInfo> = {};
  const guesses: Record<string, number> = {};
  const readingValue = (tag: string, kind: VarKind) => readings.get(tag)!.value / SCALE[kind];
  for (const i of model.instruments) {
    const r = readings.get(i.tag);
    if (!r) continue;
    const kind: VarKind | null =
      i.quantity === 'pressure'
        ? 'p'
        : i.quantity === 'temperature'
          ? 'T'
          : i.quantity === 'massFlow'
            ? 'm'
            : i.quantity === 'power'
              ? 'power'
              : null;
    if (!kind) continue;
    vars[i.tag] = {
      id: i.tag,
      kind,
      ...(i.point ? { pointId: i.point } : {}),
      ...(i.equipment ? { equipmentId: i.equipment } : {}),
      instrumentTag: i.tag,
      measured: true,
    };
  }
  const unmeasured = (id: string, kind: VarKind, pointId: string, guess: number): string => {
    if (!vars[id]) {
      vars[id] = { id, kind, pointId, measured: false };
      guesses[id] = guess;
    }
    return id;
  };

  // pressures
  const pressure = (pid: string, depth = 0): Pick<PointRefs, 'p' | 'pressureSource' | 'pressureFrom'> => {
    const pt = pointById.get(pid)!;
    const own = at[pid];
    if (own.p.length > 0) return { p: { var: own.p[0] }, pressureSource: 'measured' };
    if (pt.samePressureAs !== undefined && depth < 64) {
      const r = pressure(pt.samePressureAs, depth + 1);
      return { p: r.p, pressureSource: 'same-as', pressureFrom: pt.samePressureAs };
    }
    if (isSatPhase(pt.phase) && own.T.length > 0) {
      const Tm = readings.get(own.T[0])!.value;
      const guess = pt.nominal?.p ?? satPressureGuess(Tm);
      return { p: { var: unmeasured(`p@${pid}`, 'p', pid, guess / SCALE.p) }, pressureSource: 'saturation' };
    }
    if (pt.nominal?.p !== undefined) return { p: { value: pt.nominal.p / SCALE.p }, pressureSource: 'assumed' };
    return { p: { var: unmeasured(`p@${pid}`, 'p', pid, 0.1) }, pressureSource: 'unmeasured' };
  };
  const streamTags = new Map<string, string[]>();
  for (const pid of pointIds) {
    const g = flowGroup.get(pid)!;
    streamTags.set(g, [...(streamTags.get(g) ?? []), ...at[pid].m]);
  }
  const points: Record<string, PointRefs> = {};
  for (const pt of model.points) {
    const own = at[pt.id];
    const pr = pressure(pt.id);
    const T: Ref | null = own.T.length > 0 ? { var: own.T[0] } : null;
    const x =
      needH.has(pt.id) && pt.phase === 'two-phase' ? unmeasured(`x@${pt.id}`, 'x', pt.id, pt.nominal?.x ?? 0.9) : null;
    let h: HExpr | null = null;
    if (isSatPhase(pt.phase)) h = pt.phase === 'two-phase' && !x ? null : hSaturated(pt.phase, pr.p, x);
    else if (T && 'var' in T) h = hSinglePhase(pt.phase, pr.p, T.var);
    const g = flowGroup.get(pt.id)!;
    const tags = streamTags.get(g)!;
    const m = tags.length > 0 ? tags[0] : inMass.has(pt.id) ? `m@${g}` : null;
    points[pt.id] = { point: pt, phase: pt.phase, ...pr, T, x, m, h, hGroup: hGroupOf.get(pt.id)!, tags: own };
  }
  const pGuessSI = (pid: string): number => {
    const r = points[pid].p;
    return ('var' in r ? (vars[r.var].measured ? readingValue(r.var, 'p') : guesses[r.var]) : r.value) * SCALE.p;
  };

  // mass-flow guesses: readings and nominal values, then whatever the mass balances give
  const mKnown: Record<string, number> = {};
  for (const pt of model.points) {
    const r = points[pt.id];
    if (!r.m) continue;
    if (vars[r.m]?.measured) mKnown[pt.id] = readingValue(r.m, 'm');
    else if (pt.nominal?.m !== undefined) mKnown[pt.id] = pt.nominal.m;
  }
  const massSpecs = specs.filter((b): b is Extract<BalanceSpec, { kind: 'mass' }> => b.kind === 'mass');
  for (let pass = 0; pass < massSpecs.length; pass++) {
    let changed = false;
    for (const b of massSpecs) {
      const unknown = [...b.ins, ...b.outs].filter((p) => mKnown[p] === undefined);
      if (unknown.length !== 1) continue;
      const u = unknown[0];
      let sum = 0;
      for (const p of b.ins) if (p !== u) sum += mKnown[p];
      for (const p of b.outs) if (p !== u) sum -= mKnown[p];
      mKnown[u] = Math.max(b.ins.includes(u) ? -sum : sum, 0);
      changed = true;
    }
    if (!changed) break;
  }
  for (const pt of model.points) {
    const r = points[pt.id];
    if (r.m && !vars[r.m]) unmeasured(r.m, 'm', flowGroup.get(pt.id)!, mKnown[pt.id] ?? 1);
  }

  // enthalpy groups
  const hGroups: Record<string, HGroup> = {};
  for (const pid of pointIds) {
    if (!needH.has(pid)) continue;
    const gid = points[pid].hGroup;
    const grp = (hGroups[gid] ??= { id: gid, members: [], rep: null, h: null as unknown as HExpr });
    grp.members.push(pid);
  }
  for (const grp of Object.values(hGroups)) {
    grp.rep = grp.members.find((p) => points[p].h !== null) ?? null;
    if (grp.rep) grp.h = points[grp.rep].h!;
    else {
      const pt = pointById.get(grp.id)!;
      const pS = pGuessSI(grp.id);
      const Ts = tsatSafe(pS);
      const Tg =
        pt.nominal?.T ?? (pt.phase === 'vapour' ? Ts + 20 : pt.phase === 'liquid' ? Math.max(Ts - 10, 280) : 300);
      grp.h = hVariable(
        unmeasured(`h@${grp.id}`, 'h', grp.id, enthalpyOf(pt.phase, pS, Tg, pt.nominal?.x ?? 0.9) / SCALE.h),
      );
    }
  }
  const hOf = (pid: string): HExpr => hGroups[points[pid].hGroup].h;

  // constraints
  const constraints: Constraint[] = [];
  const info: Record<string, ConstraintInfo> = {};
  const add = (c: Constraint, meta: Omit<ConstraintInfo, 'id'>) => {
    constraints.push(c);
    info[c.id] = { id: c.id, ...meta };
  };
  const termsOf = (ins: string[], outs: string[]): Term[] => [
    ...ins.map((p) => ({ m: points[p].m!, h: hOf(p), sign: 1 })),
    ...outs.map((p) => ({ m: points[p].m!, h: hOf(p), sign: -1 })),
  ];
  const depsOf = (terms: Term[]) => [...new Set(terms.flatMap((t) => [t.m, ...t.h.deps]))];

  for (const b of specs) {
    if (b.kind === 'mass') {
      const coeffs: Record<string, number> = {};
      for (const p of b.ins) addTo(coeffs, points[p].m!, 1);
      for (const p of b.outs) addTo(coeffs, points[p].m!, -1);
      for (const key of Object.keys(coeffs)) if (coeffs[key] === 0) delete coeffs[key];
      if (Object.keys(coeffs).length === 0) continue; // one stream: holds by construction
      add(linear(b.id, coeffs), {
        kind: 'mass',
        label: b.label,
        equipmentId: b.equipmentId,
        deps: Object.keys(coeffs),
      });
    } else if (b.kind === 'energy' || b.kind === 'duty') {
      const terms = termsOf(
        [...b.ins, ...(b.coolingIn ? [b.coolingIn] : [])],
        [...b.outs, ...(b.coolingOut ? [b.coolingOut] : [])],
      );
      add(bilinear(b.id, terms, 1, []), {
        kind: b.kind,
        label: b.label,
        equipmentId: b.equipmentId,
        deps: depsOf(terms),
      });
    } else if (b.kind === 'power') {
      if (b.tags.length === 0) continue;
      const terms = b.sections.flatMap((s) => termsOf(s.ins, s.outs));
      add(bilinear(b.id, terms, b.efficiency, [b.tags[0]]), {
        kind: 'power',
        label: b.label,
        equipmentId: b.equipmentId,
        deps: [...depsOf(terms), b.tags[0]],
      });
    }
  }
  // members of an enthalpy group whose own state fixes their enthalpy are held equal to the group's
  for (const grp of Object.values(hGroups)) {
    for (const pid of grp.members) {
      if (pid === grp.rep || !points[pid].h) continue;
      const a = points[pid].h!;
      const spec = specs.find((s) => s.kind === 'enthalpy' && (s.to === pid || s.from === pid));
      add(equalEnthalpy(`enthalpy:${pid}`, a, grp.h), {
        kind: 'enthalpy',
        label: `${pointById.get(pid)!.label}: same enthalpy as ${pointById.get(grp.rep ?? grp.id)!.label}`,
        ...(spec ? { equipmentId: spec.equipmentId } : {}),
        pointId: pid,
        deps: [...new Set([...a.deps, ...grp.h.deps])],
      });
    }
  }
  for (const pt of model.points) {
    const r = points[pt.id];
    if (isSatPhase(pt.phase) && r.T && 'var' in r.T) {
      const deps = [r.T.var, ...('var' in r.p ? [r.p.var] : [])];
      add(saturationConstraint(`sat:${pt.id}`, r.p, r.T.var), {
        kind: 'saturation',
        label: `${pt.label}: saturation`,
        pointId: pt.id,
        deps,
      });
    }
  }
  // two readings of one quantity at one place, or two flow readings on one stream
  const equal = (
    tags: string[],
    where: { pointId?: string; equipmentId?: string },
    what: string,
    kind: 'twin' | 'stream' = 'twin',
  ) => {
    for (let k = 1; k < tags.length; k++) {
      const id = `${kind}:${tags[0]}:${tags[k]}`;
      add(linear(id, { [tags[0]]: 1, [tags[k]]: -1 }), {
        kind,
        label: `${tags[0]} and ${tags[k]}: same ${what}`,
        ...where,
        deps: [tags[0], tags[k]],
      });
    }
  };
  for (const pt of model.points) {
    equal(at[pt.id].p, { pointId: pt.id }, 'pressure');
    equal(at[pt.id].T, { pointId: pt.id }, 'temperature');
  }
  for (const [g, tags] of streamTags) {
    const onePoint = tags.every((t) => vars[t].pointId === vars[tags[0]].pointId);
    equal(tags, { pointId: g }, onePoint ? 'flow' : 'stream flow', onePoint ? 'twin' : 'stream');
  }
  for (const e of model.equipment) if (powerTags[e.id]) equal(powerTags[e.id], { equipmentId: e.id }, 'power');

  // which variables the constraints read
  const used = new Set<string>();
  for (const c of Object.values(info)) for (const d of c.deps) used.add(d);
  const measured: Measurement[] = [];
  const notInBalance: string[] = [];
  for (const i of model.instruments) {
    const r = readings.get(i.tag);
    if (!r) continue;
    if (!vars[i.tag] || !used.has(i.tag)) {
      notInBalance.push(i.tag);
      continue;
    }
    const k = vars[i.tag].kind;
    measured.push({ id: i.tag, value: r.value / SCALE[k], sigma: r.sigma / SCALE[k] });
  }
  const unmeasuredVars: UnmeasuredVariable[] = Object.keys(guesses)
    .filter((id) => used.has(id))
    .map((id) => ({ id, guess: guesses[id] }));
  for (const id of Object.keys(vars)) if (!vars[id].measured && !used.has(id)) delete vars[id];
  return {
    measured,
    unmeasured: unmeasuredVars,
    constraints,
    info,
    vars,
    points,
    hGroups,
    balances: specs,
    notInBalance,
    guesses,
  };
}
