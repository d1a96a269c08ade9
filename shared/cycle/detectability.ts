/**
 * Detectability map of a unit's instruments: which readings the balances can check, and from how
 * large a bias on.
 *
 * At an operating point (a round's readings with the σ the analysis gave them), the plant
 * equations are reconciled and linearised (shared/reconcile/sensitivity.ts). For every reading:
 *  - its redundancy number r_ii = 1 − ∂x̂_i/∂x_m,i (0: no balance can check it; VDI 2048 part 1
 *    uses the same notion of redundancy, Baarda 1968 calls r_ii the local redundancy);
 *  - its minimal detectable bias MDB_i = δ0·σ_i/√r_ii (correlated form in sensitivity.ts), the
 *    smallest bias the per-measurement test finds with probability 1 − β at its level α:
 *    δ0 = Φ⁻¹(1 − α/2) + Φ⁻¹(1 − β) (Baarda, "A testing procedure for use in geodetic networks",
 *    1968; Teunissen, "Testing theory", 2000), 2.80 at α = 0.05 two-sided and β = 0.2.
 * Readings with r_ii below 0.1 are weakly checked (a bias must exceed ~9 σ to be found; the 0.1
 * limit is *common practice* in the design of geodetic networks, from memory).
 *
 * For every unchecked or weakly checked reading the one added or upgraded measurement that checks
 * it best is searched: a twin of the same class beside it, a new reading of a pressure,
 * temperature or flow that no instrument reads at a point of the model (an absolute pressure
 * gauge of class 0.6, a Pt100 of class A, a flow meter of 1 % of reading), or an instrument of the
 * same balances with half its σ (a tighter class). Each candidate is reconciled at the same
 * operating point and ranked by the MDB it gives that reading.
 *
 * Pure: no clock, no randomness; the same inputs give the same map.
 */
import { jStat } from 'jstat';
import { reconcile, type ReconcileInput, type ReconcileResult } from '../reconcile';
import { reconciledSensitivity, type ReconciledSensitivity } from '../reconcile/sensitivity';
import { sigmaFor, type AccuracySpec } from '../uncertainty';
import type { Quantity } from '../units';
import { buildEquations, SCALE, type AcceptedReading, type EquationSystem } from './equations';
import { reconciledStates } from './figure-uncertainty';
import type { CycleModel, Instrument } from './model';

/** r_ii below this: weakly checked */
export const WEAK_REDUNDANCY = 0.1;

export interface DetectabilityOptions {
  /** level of the per-measurement test, two-sided (default 0.05) */
  alpha?: number;
  /** probability of missing a bias of MDB size (default 0.2: power 0.8) */
  beta?: number;
  /** reconciliation tolerance in σ units (default 1e-8, as the round analysis) */
  tolerance?: number;
}

export type Remedy =
  | {
      kind: 'twin';
      of: string;
      quantity: Quantity;
      pointId?: string;
      equipmentId?: string;
      sigma: number;
      mdb: number;
      redundancy: number;
    }
  | {
      kind: 'new-reading';
      quantity: 'pressure' | 'temperature' | 'massFlow';
      pointId: string;
      pointLabel: string;
      device: string;
      sigma: number;
      mdb: number;
      redundancy: number;
    }
  | {
      kind: 'tighter';
      tag: string;
      quantity: Quantity;
      sigmaFrom: number;
      sigmaTo: number;
      mdb: number;
      redundancy: number;
    };

export interface InstrumentDetectability {
  tag: string;
  quantity: Quantity;
  pointId?: string;
  equipmentId?: string;
  /** checked: r ≥ 0.1; weak: 0 < r < 0.1; unchecked: no balance can check it; not-read: no reading at this operating point */
  status: 'checked' | 'weak' | 'unchecked' | 'not-read';
  /** σ of the reading, SI */
  sigma: number | null;
  redundancy: number | null;
  /** minimal detectable bias, SI (a difference: K, Pa, kg/s, W); null when unchecked */
  mdb: number | null;
  /** for unchecked and weak readings: the one measurement that would check it best */
  remedy: Remedy | null;
}

export interface DetectabilityMap {
  alpha: number;
  beta: number;
  /** non-centrality δ0 = Φ⁻¹(1 − α/2) + Φ⁻¹(1 − β) */
  delta0: number;
  instruments: InstrumentDetectability[];
}

/** δ0 for a two-sided test at level α and power 1 − β (Baarda 1968). */
export function nonCentrality(alpha: number, beta: number): number {
  return jStat.normal.inv(1 - alpha / 2, 0, 1) + jStat.normal.inv(1 - beta, 0, 1);
}

interface Solved {
  eq: EquationSystem;
  input: ReconcileInput;
  res: ReconcileResult;
  sens: ReconciledSensitivity;
}

function solve(model: CycleModel, acc: ReadonlyMap<string, AcceptedReading>, tolerance: number): Solved | null {
  const eq = buildEquations(model, acc);
  if (eq.measured.length === 0 || eq.constraints.length === 0) return null;
  const input: ReconcileInput = {
    measured: eq.measured,
    unmeasured: eq.unmeasured,
    constraints: eq.constraints,
    tolerance,
    maxIterations: 50,
  };
  try {
    const res = reconcile(input);
    return { eq, input, res, sens: reconciledSensitivity(input, res, 'main') };
  } catch {
    return null;
  }
}

const NEW_DEVICE: Record<'pressure' | 'temperature' | 'massFlow', string> = {
  pressure: 'absolute pressure gauge, class 0.6',
  temperature: 'Pt100 RTD, class A',
  massFlow: 'flow meter, 1 % of reading',
};

function newInstrument(
  tag: string,
  quantity: 'pressure' | 'temperature' | 'massFlow',
  pointId: string,
  value: number,
): { inst: Instrument; sigma: number } | null {
  let accuracy: AccuracySpec;
  let range: { min: number; max: number };
  let unit: string;
  if (quantity === 'pressure') {
    const span = Math.max(10e3, 2 * value);
    accuracy = { kind: 'en837', class: 0.6, spanPa: span, resolution: span / 200 };
    range = { min: 0, max: span };
    unit = 'kPa';
  } else if (quantity === 'temperature') {
    accuracy = { kind: 'iec60751', class: 'A', resolution: 0.1 };
    range = { min: 273.15, max: Math.max(373.15, value + 100) };
    unit = '°C';
  } else {
    accuracy = { kind: 'percentReading', percent: 1, basis: 'u95' };
    range = { min: 0, max: Math.max(1, 2 * value) };
    unit = 't/h';
  }
  try {
    const sigma = sigmaFor(accuracy, value);
    if (!(sigma > 0)) return null;
    return {
      inst: {
        tag,
        quantity,
        point: pointId,
        ...(quantity === 'pressure' ? { pressureReference: 'absolute' as const } : {}),
        range,
        accuracy,
        unit,
      },
      sigma,
    };
  } catch {
    return null;
  }
}

/** SI per internal unit of a measured variable (reconcile() works in MPa, kJ/kg, MW…) */
const scaleOf = (eq: EquationSystem, tag: string) => SCALE[eq.vars[tag]?.kind ?? 'T'];

/** A tag no instrument of the model has: the base of `tag` with the first free suffix letter. */
function twinTag(model: CycleModel, tag: string): string {
  const base = tag.replace(/[A-Z]$/, '');
  const taken = new Set(model.instruments.map((i) => i.tag));
  for (const c of 'BCDEFGHJKLMNPQRSTUVWXYZ') if (!taken.has(`${base}${c}`)) return `${base}${c}`;
  return `${base}Z`;
}

/**
 * The detectability map at an operating point: `readings` are the unit's readings (SI absolute)
 * with the σ the analysis used (RoundAnalysis.instruments gives both).
 */
export function detectabilityMap(
  model: CycleModel,
  readings: readonly { tag: string; value: number; sigma: number }[],
  options: DetectabilityOptions = {},
): DetectabilityMap {
  const alpha = options.alpha ?? 0.05;
  const beta = options.beta ?? 0.2;
  const tolerance = options.tolerance ?? 1e-8;
  const delta0 = nonCentrality(alpha, beta);
  const known = new Set(model.instruments.map((i) => i.tag));
  const acc = new Map<string, AcceptedReading>();
  for (const r of readings)
    if (known.has(r.tag) && Number.isFinite(r.value) && r.sigma > 0)
      acc.set(r.tag, { tag: r.tag, value: r.value, sigma: r.sigma });
  const base = solve(model, acc, tolerance);
  const inBase = new Set(base?.sens.inputs ?? []);
  const rowOf = (i: Instrument): InstrumentDetectability => {
    const a = acc.get(i.tag);
    const where = { ...(i.point ? { pointId: i.point } : {}), ...(i.equipment ? { equipmentId: i.equipment } : {}) };
    if (!a)
      return {
        tag: i.tag,
        quantity: i.quantity,
        ...where,
        status: 'not-read',
        sigma: null,
        redundancy: null,
        mdb: null,
        remedy: null,
      };
    if (!base || !inBase.has(i.tag))
      return {
        tag: i.tag,
        quantity: i.quantity,
        ...where,
        status: 'unchecked',
        sigma: a.sigma,
        redundancy: 0,
        mdb: null,
        remedy: null,
      };
    const r = base.sens.redundancy(i.tag);
    const mdbInternal = base.sens.minimalDetectableBias(i.tag, delta0);
    const mdb = mdbInternal === null ? null : mdbInternal * scaleOf(base.eq, i.tag);
    const status = r === 0 || mdb === null ? 'unchecked' : r < WEAK_REDUNDANCY ? 'weak' : 'checked';
    return { tag: i.tag, quantity: i.quantity, ...where, status, sigma: a.sigma, redundancy: r, mdb, remedy: null };
  };
  const rows = model.instruments.map(rowOf);
  const targets = rows.filter((r) => r.status === 'unchecked' || r.status === 'weak');
  if (targets.length === 0) return { alpha, beta, delta0, instruments: rows };

  // candidates that do not depend on the target: new readings and tighter classes
  type Outcome = { remedy: (tag: string, s: ReconciledSensitivity) => Remedy | null; sens: ReconciledSensitivity };
  const outcomes: Outcome[] = [];
  /** the target's MDB (SI) in a candidate system (its variable keeps its kind, hence its scale) */
  const mdbOf = (s: ReconciledSensitivity, tag: string): { mdb: number; r: number } | null => {
    if (!s.inputs.includes(tag)) return null;
    const r = s.redundancy(tag);
    const mdb = s.minimalDetectableBias(tag, delta0);
    return mdb === null || r === 0 ? null : { mdb: mdb * scaleOf(base!.eq, tag), r };
  };
  if (base) {
    const states = reconciledStates(
      model,
      base.eq,
      base.res.values,
      new Map(base.eq.notInBalance.map((t) => [t, acc.get(t)!.value])),
    );
    let n = 0;
    for (const pt of model.points) {
      const refs = base.eq.points[pt.id];
      const st = states.get(pt.id);
      if (!refs || !st) continue;
      const wanted: ('pressure' | 'temperature' | 'massFlow')[] = [];
      if (refs.tags.p.length === 0 && refs.pressureSource !== 'measured') wanted.push('pressure');
      if (refs.tags.T.length === 0) wanted.push('temperature');
      if (refs.tags.m.length === 0) wanted.push('massFlow');
      for (const q of wanted) {
        const v = q === 'pressure' ? st.p : q === 'temperature' ? st.T : st.m;
        if (v === null || !(v > 0)) continue;
        const tag = `${q === 'pressure' ? 'PI' : q === 'temperature' ? 'TI' : 'FI'}-${9001 + n++}`;
        const made = newInstrument(tag, q, pt.id, v);
        if (!made) continue;
        const m2: CycleModel = { ...model, instruments: [...model.instruments, made.inst] };
        const acc2 = new Map(acc);
        acc2.set(tag, { tag, value: v, sigma: made.sigma });
        const solved = solve(m2, acc2, tolerance);
        if (!solved) continue;
        outcomes.push({
          sens: solved.sens,
          remedy: (target, s) => {
            const d = mdbOf(s, target);
            return d
              ? {
                  kind: 'new-reading',
                  quantity: q,
                  pointId: pt.id,
                  pointLabel: pt.label,
                  device: NEW_DEVICE[q],
                  sigma: made.sigma,
                  mdb: d.mdb,
                  redundancy: d.r,
                }
              : null;
          },
        });
      }
    }
    // a tighter class (half the σ) of an instrument the balances already read
    // (linearised at the same solution: a change of weights barely moves it)
    for (const j of base.sens.inputs) {
      const sj = acc.get(j)!.sigma;
      const input: ReconcileInput = {
        ...base.input,
        measured: base.input.measured.map((m) => (m.id === j ? { ...m, sigma: m.sigma / 2 } : m)),
      };
      let sens: ReconciledSensitivity;
      try {
        sens = reconciledSensitivity(input, base.res, 'main');
      } catch {
        continue;
      }
      const qj = model.instruments.find((i) => i.tag === j)!.quantity;
      outcomes.push({
        sens,
        remedy: (target, s) => {
          const d = mdbOf(s, target);
          return d
            ? { kind: 'tighter', tag: j, quantity: qj, sigmaFrom: sj, sigmaTo: sj / 2, mdb: d.mdb, redundancy: d.r }
            : null;
        },
      });
    }
  }
  const KIND_RANK = { tighter: 0, 'new-reading': 1, twin: 2 } as const;
  for (const row of targets) {
    const inst = model.instruments.find((i) => i.tag === row.tag)!;
    const cands: Remedy[] = [];
    for (const o of outcomes) {
      const r = o.remedy(row.tag, o.sens);
      if (r) cands.push(r);
    }
    // a twin of the same class beside it
    // (levels enter no balance: a second gauge glass is compared by eye, not by the balances)
    if (inst.quantity !== 'level') {
      const tag = twinTag(model, inst.tag);
      const twin: Instrument = { ...inst, tag, twin: inst.tag };
      delete (twin as { id?: string }).id;
      const m2: CycleModel = { ...model, instruments: [...model.instruments, twin] };
      const a = acc.get(inst.tag)!;
      const acc2 = new Map(acc);
      acc2.set(tag, { tag, value: a.value, sigma: a.sigma });
      const solved = solve(m2, acc2, tolerance);
      const d = solved ? mdbOf(solved.sens, inst.tag) : null;
      if (d)
        cands.push({
          kind: 'twin',
          of: inst.tag,
          quantity: inst.quantity,
          ...(inst.point ? { pointId: inst.point } : {}),
          ...(inst.equipment ? { equipmentId: inst.equipment } : {}),
          sigma: a.sigma,
          mdb: d.mdb,
          redundancy: d.r,
        });
    }
    // the smallest MDB wins; a better current MDB is required for a weak one
    const better = cands.filter((c) => row.mdb === null || c.mdb < row.mdb * (1 - 1e-9));
    better.sort((x, y) => x.mdb - y.mdb || KIND_RANK[x.kind] - KIND_RANK[y.kind]);
    row.remedy = better[0] ?? null;
  }
  return { alpha, beta, delta0, instruments: rows };
}
