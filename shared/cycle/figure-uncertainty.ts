/**
 * Uncertainty of the balanced performance figures (section and pump efficiencies, heater TTD and
 * DCA, condenser TTD, cycle efficiency, heat rate…), propagated from the readings through the
 * reconciliation.
 *
 * Method: GUM law of propagation of uncertainty (JCGM 100:2008, eq. 10 and 13) with numerical
 * sensitivity coefficients (5.1.3, note 2). A figure y is a function of the reconciled values,
 * which are (linearised, shared/reconcile/sensitivity.ts) a linear function of the readings:
 * x̂ = x̂₀ + S·(x_m − x_m,0). The coefficient of reading j is the central difference
 *   c_j = [y(x̂₀ + h_j·S_j) − y(x̂₀ − h_j·S_j)] / (2·h_j),  h_j = 0.1·σ_j,
 * where S_j is the j-th column of the gain (every reconciled value moves as the reconciliation
 * moves it when reading j moves), and u²(y) = Σ_ij c_i·c_j·cov(x_m,i, x_m,j). Readings no
 * balance reads enter with gain 1 on themselves. The 95 % interval is y ± k·u, k = 1.96 (normal
 * distribution, JCGM 100:2008 G.1.3 / table G.1). A Monte Carlo check per JCGM 101:2008 is in
 * tests/unit/cycle/figure-uncertainty.test.ts.
 *
 * Not determinable: an interval wider than half of the figure's meaningful span (0–100 % for an
 * efficiency or a fraction; 20 K for a terminal difference, approach, rise or subcooling — design
 * values of 2–10 K, *common practice*; the figure itself for powers, duties and the heat rate, i.e.
 * more than ±25 %) says nothing the engineer can use; the figure is then shown as "not
 * determinable from these instruments", with the readings that carry its variance and how much
 * better they would have to be.
 *
 * The reconciled state of each point is rebuilt here from the reconciled values exactly as the
 * analysis builds it (tests hold the two equal to the last digit at the solution).
 */
import type { ReconcileInput, ReconcileResult } from '../reconcile';
import { reconciledSensitivity } from '../reconcile/sensitivity';
import { SCALE, type EquationSystem, type HExpr, type PointRefs } from './equations';
import type { CycleModel, CyclePoint } from './model';
import { figureFunctions, type FigureState } from './performance';
import { propsSat, stateFromPH, stateFromPT, tsatSafe } from './properties';
import type { FigureUncertainty, PerformanceFigure } from './types';

const fin = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x);
const orNull = (x: number | null | undefined): number | null => (fin(x) ? x : null);

/** coverage factor of a 95 % interval, normal distribution (JCGM 100:2008, table G.1: 1.960) */
export const K95 = 1.96;
/** an interval wider than this fraction of the span is not determinable */
export const SPAN_FRACTION = 0.5;
/** the meaningful span of a temperature-difference figure, K (*common practice*) */
export const DIFFERENCE_SPAN_K = 20;
const STEP = 0.1;

/** The span a figure's interval is held against, in its unit. */
export function meaningfulSpan(f: Pick<PerformanceFigure, 'unit' | 'value'>): number | null {
  if (f.unit === '1') return 1;
  if (f.unit === 'K') return DIFFERENCE_SPAN_K;
  return fin(f.value) && f.value !== 0 ? Math.abs(f.value) : null;
}

/** How one point's reconciled state is built, and the variables it reads. */
interface PointPlan {
  pt: CyclePoint;
  r: PointRefs;
  sat: boolean;
  hx: HExpr | null;
  /** variables (or loose readings) p, T, h, s, x and the phase are built from */
  core: string[];
  /** the variable (or loose reading) of the mass flow */
  m: string | null;
}

function planPoints(model: CycleModel, eq: EquationSystem): PointPlan[] {
  return model.points.map((pt) => {
    const r = eq.points[pt.id];
    const sat = pt.phase === 'saturated-liquid' || pt.phase === 'saturated-vapour' || pt.phase === 'two-phase';
    const hx = r.h ?? eq.hGroups[r.hGroup]?.h ?? null;
    const core = new Set<string>();
    if ('var' in r.p) core.add(r.p.var);
    if (!sat && r.T && 'var' in r.T) core.add(r.T.var);
    if (hx) for (const d of hx.deps) core.add(d);
    if (r.x) core.add(r.x);
    return { pt, r, sat, hx, core: [...core], m: r.m };
  });
}

/** A value by id, SI: reconciled (internal units in `fv`) or a reading no balance reads (`loose`). */
function valueOf(
  eq: EquationSystem,
  fv: Readonly<Record<string, number>>,
  loose: ReadonlyMap<string, number>,
  id: string,
): number | null {
  if (id in fv) return fv[id] * SCALE[eq.vars[id]?.kind ?? 'T'];
  if (eq.notInBalance.includes(id)) return loose.get(id) ?? null;
  return null;
}

/** One point's reconciled state (as the analysis builds it in round/states.ts). */
function pointState(
  eq: EquationSystem,
  plan: PointPlan,
  fv: Readonly<Record<string, number>>,
  loose: ReadonlyMap<string, number>,
): FigureState {
  const { pt, r, sat, hx } = plan;
  const recV = (id: string) => valueOf(eq, fv, loose, id);
  const p = 'var' in r.p ? recV(r.p.var) : r.p.value * SCALE.p;
  let T: number | null = null;
  if (sat) T = fin(p) ? tsatSafe(p) : null;
  else if (r.T && 'var' in r.T) T = recV(r.T.var);
  let h: number | null = null;
  if (hx) {
    let known = true;
    for (const d of hx.deps) if (!fin(fv[d])) known = false;
    if (known) {
      const hv = hx.value(fv) * SCALE.h;
      h = fin(hv) ? hv : null;
    }
  }
  if (h === null && fin(p)) {
    if (pt.phase === 'saturated-liquid') h = propsSat(p).hf;
    else if (pt.phase === 'saturated-vapour') h = propsSat(p).hg;
    else if (!sat && fin(T)) h = stateFromPT(p, T)?.h ?? null;
  }
  const st = fin(p) && fin(h) ? stateFromPH(p, h) : null;
  let x: number | null = r.x ? recV(r.x) : null;
  if (x === null) x = pt.phase === 'saturated-liquid' ? 0 : pt.phase === 'saturated-vapour' ? 1 : (st?.x ?? null);
  if (T === null && st) T = st.T;
  const m = r.m ? recV(r.m) : null;
  return {
    p: orNull(p),
    T: orNull(T),
    h: orNull(h),
    s: orNull(st?.s),
    x: orNull(x),
    m: orNull(m),
    phase: st?.phase ?? null,
  };
}

/**
 * The reconciled state of every point from reconciled values `fv` (internal units, as reconcile()
 * returns them) and the SI values of readings no balance reads (`loose`).
 */
export function reconciledStates(
  model: CycleModel,
  eq: EquationSystem,
  fv: Readonly<Record<string, number>>,
  loose: ReadonlyMap<string, number>,
): Map<string, FigureState> {
  const out = new Map<string, FigureState>();
  for (const plan of planPoints(model, eq)) out.set(plan.pt.id, pointState(eq, plan, fv, loose));
  return out;
}

export interface FigureUncertaintyInput {
  model: CycleModel;
  eq: EquationSystem;
  /** the input reconcile() was called with */
  reconcileInput: ReconcileInput;
  result: ReconcileResult;
  /** accepted readings by tag (SI value and σ), for readings no balance reads */
  accepted: ReadonlyMap<string, { value: number; sigma: number }>;
  /** the figures performanceFigures gave for the reconciled state */
  figures: PerformanceFigure[];
}

const EMPTY: FigureState = { p: null, T: null, h: null, s: null, x: null, m: null, phase: null };

/** The figures with the uncertainty of each balanced value (figures without a value, or whose value cannot be perturbed, are returned unchanged). */
export function withUncertainty(input: FigureUncertaintyInput): PerformanceFigure[] {
  const { model, eq, result, accepted, figures } = input;
  const sens = reconciledSensitivity(input.reconcileInput, result, 'final');
  const n = sens.inputs.length;
  const fv = result.final.values;
  const loose = new Map<string, number>();
  for (const t of eq.notInBalance) {
    const a = accepted.get(t);
    if (a) loose.set(t, a.value);
  }
  const powerTag = new Map<string, string>();
  for (const i of model.instruments)
    if (i.quantity === 'power' && accepted.has(i.tag) && !powerTag.has(i.equipment!)) powerTag.set(i.equipment!, i.tag);
  const powerOf =
    (vals: Readonly<Record<string, number>>, lo: ReadonlyMap<string, number>) =>
    (gid: string): number | null => {
      const t = powerTag.get(gid);
      if (!t) return null;
      if (t in vals) return vals[t] * SCALE[eq.vars[t]?.kind ?? 'power'];
      return eq.notInBalance.includes(t) ? (lo.get(t) ?? null) : null;
    };

  // A move of one reading changes only the points that read a variable it moves, and only the
  // figures that read such a point (or a generator whose power reading it moves): the rest keep
  // their value at the solution. A figure is a deterministic function of the states it reads, so
  // when none of them changed it would take the same path to the same value.
  const plans = planPoints(model, eq);
  const nP = plans.length;
  const pointIndex = new Map(plans.map((pl, i) => [pl.pt.id, i]));
  const coreReaders = new Map<string, number[]>();
  const flowReaders = new Map<string, number[]>();
  plans.forEach((pl, i) => {
    for (const id of pl.core) (coreReaders.get(id) ?? coreReaders.set(id, []).get(id)!).push(i);
    if (pl.m) (flowReaders.get(pl.m) ?? flowReaders.set(pl.m, []).get(pl.m)!).push(i);
  });
  const genOfTag = new Map([...powerTag].map(([gid, t]) => [t, gid]));
  const fns = figureFunctions(model);
  const nF = fns.length;
  const baseStates = plans.map((pl) => pointState(eq, pl, fv, loose));
  const basePower = powerOf(fv, loose);
  const readsPoints: Set<number>[] = [];
  const readsGens: Set<string>[] = [];
  const baseValues = fns.map((fn, f) => {
    const pts = new Set<number>();
    const gens = new Set<string>();
    readsPoints[f] = pts;
    readsGens[f] = gens;
    return fn(
      (id) => {
        const i = pointIndex.get(id);
        if (i === undefined) return EMPTY;
        pts.add(i);
        return baseStates[i];
      },
      (gid) => {
        gens.add(gid);
        return basePower(gid);
      },
    );
  });
  const pointMark = new Uint8Array(nP);
  /** the figures with `changed` (ids of variables or loose readings) moved to `vals` / `lo` */
  const evaluate = (
    vals: Readonly<Record<string, number>>,
    lo: ReadonlyMap<string, number>,
    changed: readonly string[],
  ): (number | null)[] => {
    pointMark.fill(0);
    const gens = new Set<string>();
    for (const id of changed) {
      for (const i of flowReaders.get(id) ?? []) pointMark[i] |= 1;
      for (const i of coreReaders.get(id) ?? []) pointMark[i] |= 2;
      const g = genOfTag.get(id);
      if (g !== undefined) gens.add(g);
    }
    const states = baseStates.slice();
    for (let i = 0; i < nP; i++) {
      if (pointMark[i] & 2) states[i] = pointState(eq, plans[i], vals, lo);
      else if (pointMark[i] & 1) states[i] = { ...baseStates[i], m: orNull(valueOf(eq, vals, lo, plans[i].m!)) };
    }
    const get = (id: string): FigureState => {
      const i = pointIndex.get(id);
      return i === undefined ? EMPTY : states[i];
    };
    const power = powerOf(vals, lo);
    const out = baseValues.slice();
    for (let f = 0; f < nF; f++) {
      let moved = false;
      for (const i of readsPoints[f]) if (pointMark[i] !== 0) moved = true;
      for (const g of readsGens[f]) if (gens.has(g)) moved = true;
      if (moved) out[f] = fns[f](get, power);
    }
    return out;
  };
  // inputs: the readings the reconciliation used, then those no balance reads
  interface In {
    tag: string;
    sigma: number;
    /** values at ±h */
    move: (sign: 1 | -1) => (number | null)[];
    h: number;
  }
  const ins: In[] = [];
  sens.inputs.forEach((tag, j) => {
    const h = STEP * sens.inputSigmas[j];
    const changed = sens.outputs.filter((_, k) => sens.gain[k * n + j] !== 0);
    ins.push({
      tag,
      sigma: sens.inputSigmas[j],
      h,
      move: (sign) => {
        const v: Record<string, number> = { ...fv };
        sens.outputs.forEach((id, k) => {
          const g = sens.gain[k * n + j];
          if (g !== 0) v[id] = fv[id] + sign * h * g;
        });
        return evaluate(v, loose, changed);
      },
    });
  });
  for (const [tag, value] of loose) {
    const sigma = accepted.get(tag)!.sigma;
    const h = STEP * sigma;
    ins.push({ tag, sigma, h, move: (sign) => evaluate(fv, new Map([...loose, [tag, value + sign * h]]), [tag]) });
  }
  const coef = ins.map((inp) => {
    const up = inp.move(1);
    const dn = inp.move(-1);
    const c = new Array<number | null>(nF).fill(null);
    for (let f = 0; f < nF; f++) {
      const a = up[f];
      const b = dn[f];
      if (fin(a) && fin(b)) c[f] = (a - b) / (2 * inp.h);
    }
    return c;
  });
  const corr = sens.inputCorrelation;
  return figures.map((fig, f) => {
    if (!fin(fig.value)) return fig;
    if (coef.some((c) => c[f] === null)) return fig;
    // contribution of input i: c_i·σ_i·Σ_j ρ_ij·c_j·σ_j (sums to u²)
    const cs = coef.map((c, i) => c[f]! * ins[i].sigma);
    const contrib = cs.map((ci, i) => {
      if (!corr || i >= n) return ci * ci;
      let s = 0;
      for (let j = 0; j < n; j++) s += corr[i * n + j] * cs[j];
      return ci * s;
    });
    const u2 = contrib.reduce((a, b) => a + b, 0);
    const u = Math.sqrt(Math.max(0, u2));
    const U = K95 * u;
    const span = meaningfulSpan(fig);
    const determinable = span === null ? true : 2 * U <= SPAN_FRACTION * span;
    const order = contrib
      .map((c, i) => ({ tag: ins[i].tag, share: u2 > 0 ? c / u2 : 0 }))
      .filter((b) => b.share > 0)
      .sort((a, b) => b.share - a.share || (a.tag < b.tag ? -1 : a.tag > b.tag ? 1 : 0));
    const budget: { tag: string; share: number }[] = [];
    let cum = 0;
    for (const b of order) {
      if (budget.length >= 3 || cum >= 0.9) break;
      budget.push(b);
      cum += b.share;
    }
    let reduceBy: number | null = null;
    if (!determinable && span !== null && u2 > 0) {
      const target = ((SPAN_FRACTION * span) / (2 * K95)) ** 2;
      const dom = cum * u2;
      const rest = u2 - dom;
      reduceBy = target > rest && dom > 0 ? 1 / Math.sqrt((target - rest) / dom) : null;
    }
    const unc: FigureUncertainty = {
      method: 'gum-lpu',
      u,
      k: K95,
      U,
      determinable,
      span: span ?? Math.abs(fig.value),
      budget,
      reduceBy,
    };
    return { ...fig, uncertainty: unc };
  });
}
