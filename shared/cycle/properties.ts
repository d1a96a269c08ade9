/**
 * IF97 wrappers for the balances: never throw, never NaN, smooth where the reconciliation steps.
 *
 * A point declared liquid or vapour gets its enthalpy from pt(p, T) on its own side of the
 * saturation line; if (p, T) lies on the other side (a gross error, or a step of the iteration),
 * h is continued linearly from 1 mK inside its side with the slope cp there. This keeps h(T)
 * continuous and monotone so that the least-squares iteration can walk the point back, and the
 * analysis reports the wrong side as a finding. Inputs beyond IF97's range are clamped to it for
 * the same reason and flagged (`clamped`); the analysis refuses such readings before they get
 * here, so clamping only ever holds an iterate inside the tables.
 *
 * SI in and out: Pa, K, J/kg, J/(kg·K).
 */
import * as steam from '../steam';
import type { SteamState } from '../steam';

// bound once: some module loaders (tsx among them) turn each use of an imported name into a getter
// call, which the analysis' inner loops should not pay for (as in ../steam/index.ts)
const { P_CRIT, P_MAX, P_SAT_MIN, T_MAX_2, T_MIN, ph, pt, px, tsat } = steam;
import type { PointPhase } from './model';

/** Side margin (K): the linear continuation starts this far inside the declared side. */
const SIDE = 1e-3;
/** Lowest pressure used for a single-phase state (Pa); below the triple point pressure ice, not vapour, would form. */
export const P_LOW = P_SAT_MIN;

export interface PTProps {
  h: number;
  s: number;
  /** ∂h/∂T at constant p */
  cp: number;
  /** the state lies on the other side of the saturation line than declared (continued linearly) */
  wrongSide: boolean;
  /** p or T was clamped into IF97's range */
  clamped: boolean;
}

export function clampP(p: number): number {
  return p < P_LOW ? P_LOW : p > P_MAX ? P_MAX : p;
}
export function clampT(T: number): number {
  return T < T_MIN ? T_MIN : T > T_MAX_2 ? T_MAX_2 : T;
}
export function clampSatP(p: number): number {
  return p < P_SAT_MIN ? P_SAT_MIN : p > P_CRIT ? P_CRIT : p;
}

function fromState(st: SteamState): { h: number; s: number; cp: number } {
  return { h: st.h, s: st.s, cp: st.cp ?? 0 };
}

/** Saturation temperature with the pressure clamped to the saturation line (611.213 Pa … 22.064 MPa). */
export function tsatSafe(p: number): number {
  return tsat(clampSatP(Number.isFinite(p) ? p : P_SAT_MIN));
}

/** h, s, cp at (p, T) for a point declared liquid, vapour or any (single-phase). */
export function propsPT(pIn: number, TIn: number, phase: PointPhase): PTProps {
  const pOk = Number.isFinite(pIn) ? pIn : P_LOW;
  const TOk = Number.isFinite(TIn) ? TIn : T_MIN;
  const p = clampP(pOk);
  const T = clampT(TOk);
  const clamped = p !== pIn || T !== TIn;
  if ((phase === 'liquid' || phase === 'vapour') && p < P_CRIT) {
    const Ts = tsat(p);
    if (phase === 'vapour' && T < Ts + SIDE) {
      const Ta = Math.min(Ts + SIDE, T_MAX_2);
      const a = fromState(pt(p, Ta));
      return { h: a.h + a.cp * (T - Ta), s: a.s + (a.cp / Ta) * (T - Ta), cp: a.cp, wrongSide: T < Ts, clamped };
    }
    if (phase === 'liquid' && T > Ts - SIDE) {
      const Ta = Math.max(Ts - SIDE, T_MIN);
      const a = fromState(pt(p, Ta));
      return { h: a.h + a.cp * (T - Ta), s: a.s + (a.cp / Ta) * (T - Ta), cp: a.cp, wrongSide: T > Ts, clamped };
    }
  }
  const st = fromState(pt(p, T));
  return { ...st, wrongSide: false, clamped };
}

export interface SatProps {
  T: number;
  hf: number;
  hg: number;
  sf: number;
  sg: number;
  clamped: boolean;
}

/** Saturated liquid and vapour at p (clamped to the saturation line). */
export function propsSat(pIn: number): SatProps {
  const p = clampSatP(Number.isFinite(pIn) ? pIn : P_SAT_MIN);
  const f = px(p, 0);
  const g = px(p, 1);
  return { T: f.T, hf: f.h, hg: g.h, sf: f.s, sg: g.s, clamped: p !== pIn };
}

/** Enthalpy of a point: single-phase from (p, T), saturated from p, two-phase from (p, x) with x continued linearly beyond 0…1. */
export function enthalpyOf(phase: PointPhase, p: number, T: number, x: number): number {
  switch (phase) {
    case 'saturated-liquid':
      return propsSat(p).hf;
    case 'saturated-vapour':
      return propsSat(p).hg;
    case 'two-phase': {
      const s = propsSat(p);
      return s.hf + x * (s.hg - s.hf);
    }
    default:
      return propsPT(p, T, phase).h;
  }
}

export interface StateSummary {
  p: number;
  T: number;
  h: number;
  s: number;
  /** quality, null outside the two-phase region */
  x: number | null;
  phase: SteamState['phase'];
}

/** The IF97 state at (p, h), or null outside the tables. */
export function stateFromPH(p: number, h: number): StateSummary | null {
  if (!Number.isFinite(p) || !Number.isFinite(h)) return null;
  try {
    const st = ph(p, h);
    return { p: st.p, T: st.T, h: st.h, s: st.s, x: st.x, phase: st.phase };
  } catch {
    return null;
  }
}

/** The IF97 state at (p, T), or null outside the tables (no side continuation: what IF97 says the state is). */
export function stateFromPT(p: number, T: number): StateSummary | null {
  if (!Number.isFinite(p) || !Number.isFinite(T)) return null;
  try {
    const st = pt(p, T);
    return { p: st.p, T: st.T, h: st.h, s: st.s, x: st.x, phase: st.phase };
  } catch {
    return null;
  }
}

/** Saturated or wet state at (p, x), or null outside the saturation line / 0…1. */
export function stateFromPX(p: number, x: number): StateSummary | null {
  if (!Number.isFinite(p) || !Number.isFinite(x)) return null;
  try {
    const st = px(p, x);
    return { p: st.p, T: st.T, h: st.h, s: st.s, x: st.x, phase: st.phase };
  } catch {
    return null;
  }
}
