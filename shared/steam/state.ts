/**
 * Steam and water states from IAPWS-IF97 (IAPWS R7-97(2012)): region choice, the forward
 * equations turned into properties, and the inverse problems (p,h), (p,s), (p,x), (T,x) solved
 * by Newton steps on the basic equations, started from the release's backward equations and
 * those of the supplementary releases SR3-03(2014) (region 3 T, v of (p,h) and (p,s)) and
 * SR5-05(2016) (region 3 v(p,T)).
 *
 * Hot paths allocate nothing but the returned state: derivative vectors are module scratch.
 */
import * as boundaries from './boundaries';
import * as constants from './constants';
import { SteamRangeError, formatQuantity, rangeError, requireFinite } from './errors';
import * as powerSum from './power-sum';
import * as region1 from './region1';
import * as region2 from './region2';
import * as region3 from './region3';
import * as region3Vpt from './region3-vpt';
import * as region4 from './region4';
import * as region5 from './region5';
import type { SinglePhaseRegion, SteamPhase, SteamRegion, SteamState } from './types';

// Local bindings of the imported names the hot paths use (why: shared/steam/index.ts).
const { b23P, b23T } = boundaries;
const { P_CRIT, P_MAX, P_MAX_5, R, RHO_CRIT, T_13, T_CRIT, T_MAX_2, T_MAX_5, T_MIN } = constants;
const { REGION1_P_STAR, REGION1_T_STAR, REGION2_P_STAR, REGION2_T_STAR, REGION5_P_STAR, REGION5_T_STAR } = constants;
const { F, FX, FXX, FY, FYY, FXY, derivVector } = powerSum;
const { region1Gibbs, region1TPh, region1TPs } = region1;
const { region2Gibbs, region2TPh, region2TPs } = region2;
const { p3satH, p3satS, region3Helmholtz, region3TPh, region3TPs, region3VPh, region3VPs } = region3;
const { vpt3, vpt3SaturatedSubregion, vpt3Subregion } = region3Vpt;
const { psatEq30, tsatEq31 } = region4;
const { region5Gibbs } = region5;

type GibbsRegion = 1 | 2 | 5;
/** Which property a (p, h) or (p, s) problem gives: specific enthalpy or specific entropy. */
type HOrS = 'h' | 's';

/** Lowest pressure of the saturation line: p_sat(273.15 K) by IF97 Eq. (30), ≈ 611.213 Pa. */
export const P_SAT_MIN = psatEq30(T_MIN);
/** Saturation pressure at 623.15 K by IF97 Eq. (30), ≈ 16.5292 MPa: where regions 1, 3 and 4 meet. */
export const P_SAT_623 = psatEq30(T_13);

const g = derivVector(); // Gibbs derivatives of regions 1, 2, 5
const f3 = derivVector(); // Helmholtz derivatives of region 3

// ---------------------------------------------------------------- forward equations

function gibbs(region: GibbsRegion, p: number, T: number): void {
  if (region === 1) region1Gibbs(p, T, g);
  else if (region === 2) region2Gibbs(p, T, g);
  else region5Gibbs(p, T, g);
}

function pStar(region: GibbsRegion): number {
  return region === 1 ? REGION1_P_STAR : region === 2 ? REGION2_P_STAR : REGION5_P_STAR;
}

function tStar(region: GibbsRegion): number {
  return region === 1 ? REGION1_T_STAR : region === 2 ? REGION2_T_STAR : REGION5_T_STAR;
}

/** Enthalpy (kind 'h', J/kg) or entropy (kind 's', J/(kg·K)) from the Gibbs scratch at T (IF97 Tables 3, 12, 39). */
function yFromGibbs(region: GibbsRegion, T: number, kind: HOrS): number {
  const tau = tStar(region) / T;
  return kind === 'h' ? R * T * tau * g[FY] : R * (tau * g[FY] - g[F]);
}

/** d(h)/dT = cp, d(s)/dT = cp/T at constant p, from the Gibbs scratch. */
function dyFromGibbs(region: GibbsRegion, T: number, kind: HOrS): number {
  const tau = tStar(region) / T;
  const cp = -R * tau * tau * g[FYY];
  return kind === 'h' ? cp : cp / T;
}

/** Specific volume from the Gibbs scratch, m³/kg. */
function vFromGibbs(region: GibbsRegion, p: number, T: number): number {
  return (R * T * (p / pStar(region)) * g[FX]) / p;
}

/** Enthalpy from the region-3 scratch, J/kg. */
function h3FromScratch(rho: number, T: number): number {
  return R * T * ((T_CRIT / T) * f3[FY] + (rho / RHO_CRIT) * f3[FX]);
}

/** Entropy from the region-3 scratch, J/(kg·K). */
function s3FromScratch(T: number): number {
  return R * ((T_CRIT / T) * f3[FY] - f3[F]);
}

function yGibbs(region: GibbsRegion, p: number, T: number, kind: HOrS): number {
  gibbs(region, p, T);
  return yFromGibbs(region, T, kind);
}

/** Phase name of a single-phase state. */
function phaseOf(p: number, T: number, region: SinglePhaseRegion): SteamPhase {
  if (region === 1) return 'liquid';
  if (T >= T_CRIT) return p >= P_CRIT ? 'supercritical' : 'vapour';
  if (region === 3) return p >= psatEq30(T) ? 'liquid' : 'vapour';
  return 'vapour';
}

/** Properties from the Gibbs scratch (IF97 Tables 3, 12, 39). */
function fromGibbs(region: GibbsRegion, p: number, T: number): SteamState {
  const pi = p / pStar(region);
  const tau = tStar(region) / T;
  const gp = g[FX];
  const gpp = g[FXX];
  const gt = g[FY];
  const gtt = g[FYY];
  const gpt = g[FXY];
  const RT = R * T;
  const a = gp - tau * gpt;
  return {
    p,
    T,
    v: (RT * pi * gp) / p,
    h: RT * tau * gt,
    s: R * (tau * gt - g[F]),
    u: RT * (tau * gt - pi * gp),
    cp: -R * tau * tau * gtt,
    cv: R * (-tau * tau * gtt + (a * a) / gpp),
    w: Math.sqrt((RT * gp * gp) / ((a * a) / (tau * tau * gtt) - gpp)),
    x: null,
    region,
    phase: phaseOf(p, T, region),
  };
}

/** Properties from the Helmholtz scratch of region 3 (IF97 Table 31); p is the requested pressure. */
function fromHelmholtz(p: number, rho: number, T: number): SteamState {
  const d = rho / RHO_CRIT;
  const tau = T_CRIT / T;
  const fd = f3[FX];
  const fdd = f3[FXX];
  const ft = f3[FY];
  const ftt = f3[FYY];
  const fdt = f3[FXY];
  const RT = R * T;
  const a = d * fd - d * tau * fdt;
  const b = 2 * d * fd + d * d * fdd;
  return {
    p,
    T,
    v: 1 / rho,
    h: RT * (tau * ft + d * fd),
    s: R * (tau * ft - f3[F]),
    u: RT * tau * ft,
    cp: R * (-tau * tau * ftt + (a * a) / b),
    cv: -R * tau * tau * ftt,
    w: Math.sqrt(RT * (b - (a * a) / (tau * tau * ftt))),
    x: null,
    region: 3,
    phase: phaseOf(p, T, 3),
  };
}

// ---------------------------------------------------------------- region 3 solvers

class SolverError extends Error {
  constructor(message: string) {
    super(`steam: ${message}`);
    this.name = 'SteamSolverError';
  }
}

/**
 * Density in region 3 at (p, T) by Newton steps on IF97 Eq. (28), from rho0 (an SR5 value). On
 * return f3 holds the Helmholtz derivatives at the returned density.
 *
 * Below the critical temperature an isotherm can cross p three times (liquid, unstable, vapour).
 * side = −1 asks for the vapour root and approaches it from lower density (where p(ρ) < p),
 * side = +1 the liquid root from higher density; on those branches p(ρ) is concave resp. convex,
 * so the Newton steps do not overshoot. side = 0 takes the root next to rho0.
 */
function density3(p: number, T: number, rho0: number, side: -1 | 0 | 1 = 0): number {
  const RT = R * T;
  let rho = rho0;
  let good = NaN; // last density on the wanted side of the root (side ≠ 0)
  let goodSlope = Infinity; // dp/dρ there
  let backSteps = 0;
  for (let it = 0; it < 300; it++) {
    region3Helmholtz(rho, T, f3, true);
    const d = rho / RHO_CRIT;
    const dfd = d * f3[FX];
    const p3 = rho * RT * dfd;
    const dpdrho = RT * (2 * dfd + d * d * f3[FXX]);
    if (side !== 0) {
      const onSide = side < 0 ? p3 < p : p3 > p;
      const stable = dpdrho > 0;
      if (!onSide || (!stable && Number.isNaN(good))) {
        if (stable && Math.abs(p3 - p) <= 5e-14 * p) return rho; // at the root already
        if (Number.isNaN(good)) {
          // move the start outwards, away from the other branch, past the root: by twice the
          // Newton distance to it where that is known, else by 0.3 %
          const dist = stable ? Math.abs((p - p3) / dpdrho) / rho : 0;
          rho *= 1 + side * Math.max(0.003, Math.min(2 * dist, 0.1));
        } else {
          rho = 0.5 * (rho + good); // an overshoot: back towards the wanted side
        }
        continue;
      }
      if (!stable) {
        // Past the spinodal without meeting p: this branch does not reach p at this T. That
        // happens only within ~10 kPa and 1e-5 K of the critical point, where the saturation
        // line Eq. (30) and region 3's own phase boundary differ by less than 1e-3 Pa. The
        // branch's closest approach, its spinodal, stands in for the root.
        return spinodal3(T, good, rho);
      }
      if (dpdrho > goodSlope && backSteps < 40) {
        // moving towards the root from outside, dp/dρ falls; a rise means the step leapt over
        // the unstable part onto the other branch: step back
        backSteps++;
        rho = 0.5 * (rho + good);
        continue;
      }
      good = rho;
      goodSlope = dpdrho;
    }
    // converged: the pressure met to its round-off (near the critical point dp/dρ → 0 and ρ is
    // then fixed by p only to ~1e-6)
    if (Math.abs(p3 - p) <= 5e-14 * p) return rho;
    let step = (p - p3) / dpdrho;
    if (!(dpdrho > 0) || !Number.isFinite(step)) {
      // unstable part of an isotherm: creep towards the branch the start belongs to
      step = (p > p3 ? 0.02 : -0.02) * rho;
    }
    // converged: a step below 1e-12
    if (Math.abs(step) <= 1e-12 * rho) return rho;
    const cap = 0.2 * rho;
    if (step > cap) step = cap;
    else if (step < -cap) step = -cap;
    rho += step;
  }
  throw new SolverError(`no convergence for the region-3 density at p = ${formatQuantity('p', p)}, T = ${T} K`);
}

/**
 * Density of the spinodal ((∂p/∂ρ)_T = 0) between a (dp/dρ > 0) and b (dp/dρ ≤ 0), by bisection;
 * f3 holds the derivatives there on return.
 */
function spinodal3(T: number, a: number, b: number): number {
  let lo = a;
  let hi = b;
  for (let it = 0; it < 60 && Math.abs(hi - lo) > 1e-13 * lo; it++) {
    const mid = 0.5 * (lo + hi);
    region3Helmholtz(mid, T, f3, false);
    const d = mid / RHO_CRIT;
    if (2 * d * f3[FX] + d * d * f3[FXX] > 0) lo = mid;
    else hi = mid;
  }
  region3Helmholtz(lo, T, f3, true);
  return lo;
}

/** Whether the last solve3 result is mechanically stable, (∂p/∂ρ)_T > 0. */
let solve3Stable = true;

/**
 * Region 3 state of given p and h (kind 'h') or s (kind 's'): Newton steps in (ρ, T) on IF97
 * Eq. (28), from the SR3 backward values.
 */
function solve3(p: number, y: number, kind: HOrS, rho0: number, T0: number): SteamState {
  let rho = rho0;
  let T = T0;
  for (let it = 0; it < 100; it++) {
    region3Helmholtz(rho, T, f3, true);
    const d = rho / RHO_CRIT;
    const tau = T_CRIT / T;
    const fd = f3[FX];
    const fdd = f3[FXX];
    const ftt = f3[FYY];
    const fdt = f3[FXY];
    const RT = R * T;
    const dfd = d * fd;
    const dtfdt = d * tau * fdt;
    const p3 = rho * RT * dfd;
    const pRho = RT * (2 * dfd + d * d * fdd);
    const pT = rho * R * (dfd - dtfdt);
    let y3: number;
    let yRho: number;
    let yT: number;
    if (kind === 'h') {
      y3 = RT * (tau * f3[FY] + dfd);
      yRho = (RT / rho) * (dtfdt + dfd + d * d * fdd);
      yT = R * (-tau * tau * ftt + dfd - dtfdt);
    } else {
      y3 = R * (tau * f3[FY] - f3[F]);
      yRho = (R / rho) * (dtfdt - dfd);
      yT = (-R * tau * tau * ftt) / T;
    }
    const F1 = p3 - p;
    const F2 = y3 - y;
    const det = pRho * yT - pT * yRho;
    let dRho = (-F1 * yT + F2 * pT) / det;
    let dT = (-F2 * pRho + F1 * yRho) / det;
    if (!Number.isFinite(dRho) || !Number.isFinite(dT)) break;
    // converged: steps below 1e-12, or both equations met to their round-off
    if (
      (Math.abs(dRho) <= 1e-12 * rho && Math.abs(dT) <= 1e-12 * T) ||
      (Math.abs(F1) <= 5e-14 * p && Math.abs(F2) <= 5e-14 * Math.abs(y))
    ) {
      solve3Stable = pRho > 0;
      return fromHelmholtz(p, rho, T);
    }
    const capRho = 0.25 * rho;
    if (dRho > capRho) dRho = capRho;
    else if (dRho < -capRho) dRho = -capRho;
    if (dT > 25) dT = 25;
    else if (dT < -25) dT = -25;
    rho += dRho;
    T += dT;
  }
  throw new SolverError(
    `no convergence in region 3 at p = ${formatQuantity('p', p)}, ${kind} = ${formatQuantity(kind, y)}`,
  );
}

/** Region 3 state at density rho (kg/m³) and T (K), straight from IF97 Eq. (28) (Table 31). */
export function region3State(rho: number, T: number): SteamState {
  region3Helmholtz(rho, T, f3, true);
  const d = rho / RHO_CRIT;
  return fromHelmholtz(rho * R * T * d * f3[FX], rho, T);
}

/** Region 3 state at (p, T): SR5 v(p, T) refined by Newton steps on IF97 Eq. (28). */
function state3PT(p: number, T: number): SteamState {
  // below T_c and p_c an isotherm may cross p more than once: pick the branch by p_sat(T),
  // liquid above it, vapour below
  const side = T < T_CRIT && p < P_CRIT ? (p >= psatEq30(T) ? 1 : -1) : 0;
  const rho = density3(p, T, 1 / vpt3(p, T), side);
  return fromHelmholtz(p, rho, T);
}

// ---------------------------------------------------------------- saturation

/** Saturated liquid (L) and vapour (V) at one (p, T) of the saturation line; module scratch. */
const sat = { vL: 0, hL: 0, sL: 0, vV: 0, hV: 0, sV: 0 };

/**
 * Fills `sat` at pressure p and its saturation temperature T: regions 1 and 2 up to 623.15 K,
 * region 3 (Eq. (28) at p = p_sat(T)) above, started from SR5's saturated subregions.
 */
function saturate(p: number, T: number): void {
  if (p <= P_SAT_623 && T <= T_13) {
    region1Gibbs(p, T, g);
    sat.vL = vFromGibbs(1, p, T);
    sat.hL = yFromGibbs(1, T, 'h');
    sat.sL = yFromGibbs(1, T, 's');
    region2Gibbs(p, T, g);
    sat.vV = vFromGibbs(2, p, T);
    sat.hV = yFromGibbs(2, T, 'h');
    sat.sV = yFromGibbs(2, T, 's');
    return;
  }
  const rhoL = density3(p, T, 1 / vpt3Subregion(vpt3SaturatedSubregion(p, false), p, T), 1);
  sat.vL = 1 / rhoL;
  sat.hL = h3FromScratch(rhoL, T);
  sat.sL = s3FromScratch(T);
  const rhoV = density3(p, T, 1 / vpt3Subregion(vpt3SaturatedSubregion(p, true), p, T), -1);
  sat.vV = 1 / rhoV;
  sat.hV = h3FromScratch(rhoV, T);
  sat.sV = s3FromScratch(T);
}

function twoPhase(p: number, T: number, x: number): SteamState {
  const v = sat.vL + x * (sat.vV - sat.vL);
  const h = sat.hL + x * (sat.hV - sat.hL);
  const s = sat.sL + x * (sat.sV - sat.sL);
  return { p, T, v, h, s, u: h - p * v, cp: null, cv: null, w: null, x, region: 4, phase: 'two-phase' };
}

// ---------------------------------------------------------------- input checks

function checkPressure(p: number): void {
  requireFinite('p', p);
  if (!(p > 0)) {
    throw new SteamRangeError(
      'p',
      p,
      0,
      'below',
      `p = ${formatQuantity('p', p)} is not above the IF97 limit of 0 Pa (absolute pressure must be positive)`,
    );
  }
  if (p > P_MAX) throw rangeError('p', p, P_MAX, 'above');
}

function checkPT(p: number, T: number): void {
  requireFinite('p', p);
  requireFinite('T', T);
  if (T < T_MIN) throw rangeError('T', T, T_MIN, 'below');
  if (T > T_MAX_5) throw rangeError('T', T, T_MAX_5, 'above');
  checkPressure(p);
  if (T > T_MAX_2 && p > P_MAX_5) throw rangeError('p', p, P_MAX_5, 'above', 'the IF97 limit', 'for T above 1073.15 K');
}

function checkQuality(x: number): void {
  requireFinite('x', x);
  if (x < 0) throw rangeError('x', x, 0, 'below', 'the quality limit');
  if (x > 1) throw rangeError('x', x, 1, 'above', 'the quality limit');
}

function checkSatPressure(p: number): void {
  requireFinite('p', p);
  if (p < P_SAT_MIN) {
    throw rangeError(
      'p',
      p,
      P_SAT_MIN,
      'below',
      'the IF97 saturation-line limit',
      '(p_sat at 273.15 K, just below the triple point)',
    );
  }
  if (p > P_CRIT) throw rangeError('p', p, P_CRIT, 'above', 'the critical pressure');
}

function checkSatTemperature(T: number): void {
  requireFinite('T', T);
  if (T < T_MIN) throw rangeError('T', T, T_MIN, 'below', 'the IF97 saturation-line limit');
  if (T > T_CRIT) throw rangeError('T', T, T_CRIT, 'above', 'the critical temperature');
}

// ---------------------------------------------------------------- public: (p, T), saturation

/**
 * IF97 region of a single-phase state (Sect. 2, Fig. 1): 1 for T ≤ 623.15 K and p ≥ p_sat(T);
 * 2 below p_sat(T), or above 623.15 K at p ≤ p_B23(T) up to 1073.15 K; 3 between 623.15 K and
 * B23; 5 above 1073.15 K. On the saturation line itself (p = p_sat(T)) it gives the liquid, 1 or 3.
 * Throws SteamRangeError outside IF97's range.
 */
export function regionPT(p: number, T: number): SinglePhaseRegion {
  checkPT(p, T);
  if (T > T_MAX_2) return 5;
  if (T <= T_13) return p >= psatEq30(T) ? 1 : 2;
  return p > b23P(T) ? 3 : 2;
}

/** State at pressure p (Pa) and temperature T (K). */
export function pt(p: number, T: number): SteamState {
  const region = regionPT(p, T);
  if (region === 3) return state3PT(p, T);
  gibbs(region, p, T);
  return fromGibbs(region, p, T);
}

/** Saturation temperature (K) at pressure p (Pa), IF97 Eq. (31); 611.213 Pa ≤ p ≤ 22.064 MPa. */
export function tsat(p: number): number {
  checkSatPressure(p);
  return tsatEq31(p);
}

/** Saturation pressure (Pa) at temperature T (K), IF97 Eq. (30); 273.15 K ≤ T ≤ 647.096 K. */
export function psat(T: number): number {
  checkSatTemperature(T);
  return psatEq30(T);
}

/** Saturated or wet state at pressure p (Pa) and quality x (0 = saturated liquid, 1 = saturated vapour). */
export function px(p: number, x: number): SteamState {
  checkSatPressure(p);
  checkQuality(x);
  const T = tsatEq31(p);
  saturate(p, T);
  return twoPhase(p, T, x);
}

/** Saturated or wet state at temperature T (K) and quality x. */
export function tx(T: number, x: number): SteamState {
  checkSatTemperature(T);
  checkQuality(x);
  const p = psatEq30(T);
  saturate(p, T);
  return twoPhase(p, T, x);
}

// ---------------------------------------------------------------- public: (p, h), (p, s)

/** Temperature bounds kept by the Newton steps of each Gibbs region (a little beyond the region). */
const T_LOW: Readonly<Record<GibbsRegion, number>> = { 1: 260, 2: 260, 5: 1000 };
const T_HIGH: Readonly<Record<GibbsRegion, number>> = { 1: 700, 2: 1150, 5: 2400 };

/** Gibbs-region state of given p and h or s: Newton steps in T from T0. */
function solveGibbs(region: GibbsRegion, p: number, y: number, kind: HOrS, T0: number): SteamState {
  let T = Number.isFinite(T0)
    ? Math.min(Math.max(T0, T_LOW[region]), T_HIGH[region])
    : 0.5 * (T_LOW[region] + T_HIGH[region]);
  let last = Infinity;
  for (let it = 0; it < 100; it++) {
    gibbs(region, p, T);
    const dT = (y - yFromGibbs(region, T, kind)) / dyFromGibbs(region, T, kind);
    if (!Number.isFinite(dT)) break;
    const rel = Math.abs(dT) / T;
    // converged: a step below 1e-13, or at the round-off floor (steps stop shrinking)
    if (rel <= 1e-13 || (rel <= 1e-10 && rel >= 0.5 * last)) return fromGibbs(region, p, T);
    last = rel;
    T += dT > 200 ? 200 : dT < -200 ? -200 : dT;
    // stay near the region, where the equation is physical
    if (T < T_LOW[region]) T = T_LOW[region];
    else if (T > T_HIGH[region]) T = T_HIGH[region];
  }
  throw new SolverError(
    `no convergence in region ${region} at p = ${formatQuantity('p', p)}, ${kind} = ${formatQuantity(kind, y)}`,
  );
}

/**
 * A region border y(p) (h or s along a line such as 623.15 K or the saturation line), tabulated
 * once at load on a ln p grid. `side` answers from the table when y is clearly on one side and
 * returns 0 when y is within the table's interpolation error of the border, where the caller
 * evaluates the border exactly. This spares most region choices any evaluation.
 */
class Border {
  private readonly lnLo: number;
  private readonly step: number;
  private readonly y: Float64Array;
  private readonly margin: number;
  private readonly pLo: number;
  private readonly pHi: number;

  constructor(pLo: number, pHi: number, fn: (p: number) => number, n = 256) {
    this.pLo = pLo;
    this.pHi = pHi;
    this.lnLo = Math.log(pLo);
    this.step = (Math.log(pHi) - this.lnLo) / n;
    this.y = new Float64Array(n + 1);
    for (let i = 0; i <= n; i++) this.y[i] = fn(Math.exp(this.lnLo + i * this.step));
    // interpolation error, sampled between the nodes, with a factor 4 to spare
    let err = 0;
    let scale = 0;
    for (let i = 0; i < n; i++) {
      for (const t of [0.25, 0.5, 0.75]) {
        const p = Math.exp(this.lnLo + (i + t) * this.step);
        err = Math.max(err, Math.abs(this.at(Math.log(p)) - fn(p)));
      }
      scale = Math.max(scale, Math.abs(this.y[i]));
    }
    this.margin = 4 * err + 1e-9 * scale;
  }

  private at(lnp: number): number {
    let u = (lnp - this.lnLo) / this.step;
    const last = this.y.length - 1;
    if (u < 0) u = 0;
    else if (u > last) u = last;
    const i = Math.min(Math.floor(u), last - 1);
    const t = u - i;
    return this.y[i] + t * (this.y[i + 1] - this.y[i]);
  }

  /** +1 if y is surely above the border at p, −1 surely below, 0 if it must be evaluated; lnp = ln(p/Pa). */
  side(p: number, lnp: number, y: number): -1 | 0 | 1 {
    if (p < this.pLo || p > this.pHi) return 0;
    const d = y - this.at(lnp);
    return d > this.margin ? 1 : d < -this.margin ? -1 : 0;
  }
}

interface Borders {
  /** 273.15 K, region 1, p_sat(273.15 K) … 100 MPa */
  bottom: Border;
  /** saturated liquid, region 1 at T_sat(p), p_sat(273.15 K) … p_sat(623.15 K) */
  liquid: Border;
  /** saturated vapour, region 2 at T_sat(p) */
  vapour: Border;
  /** 623.15 K, region 1, p_sat(623.15 K) … 100 MPa */
  b13: Border;
  /** B23, region 2 at T_B23(p), p_sat(623.15 K) … 100 MPa */
  b23: Border;
  /** 1073.15 K, region 2, 1 Pa … 100 MPa */
  b25: Border;
  /** 2273.15 K, region 5, 1 Pa … 50 MPa */
  top: Border;
}

function makeBorders(kind: HOrS): Borders {
  return {
    bottom: new Border(P_SAT_MIN, P_MAX, (p) => yGibbs(1, p, T_MIN, kind)),
    liquid: new Border(P_SAT_MIN, P_SAT_623, (p) => yGibbs(1, p, tsatEq31(p), kind)),
    vapour: new Border(P_SAT_MIN, P_SAT_623, (p) => yGibbs(2, p, tsatEq31(p), kind)),
    b13: new Border(P_SAT_623, P_MAX, (p) => yGibbs(1, p, T_13, kind)),
    b23: new Border(P_SAT_623, P_MAX, (p) => yGibbs(2, p, b23T(p), kind)),
    b25: new Border(1, P_MAX, (p) => yGibbs(2, p, T_MAX_2, kind)),
    top: new Border(1, P_MAX_5, (p) => yGibbs(5, p, T_MAX_5, kind)),
  };
}

const BORDERS_H = makeBorders('h');
const BORDERS_S = makeBorders('s');

/**
 * How far (J/kg or J/(kg·K)) an h or s may lie beyond a limit of the range and still be taken:
 * the round-off of evaluating h and s at the limit. Without it a state that pt accepts just inside
 * the range (273.15000000000003 K, what 32 °F becomes in double precision) could be refused by
 * ph or ps on its own h or s, whose last digits fall on the far side of the limit's.
 */
function limitSlack(kind: HOrS, yLimit: number, T: number): number {
  return 1e-12 * Math.max(Math.abs(yLimit), kind === 'h' ? R * T : R);
}

/** h or s of a region at a border temperature, moved by its round-off (limitSlack) towards `side`. */
function yBorder(region: GibbsRegion, p: number, T: number, kind: HOrS, side: 1 | -1): number {
  const y = yGibbs(region, p, T, kind);
  return y + side * limitSlack(kind, y, T);
}

/**
 * Region 2 or 5 above the saturation line / B23, given y ≥ the region-2 lower border. T0 replaces
 * the backward equation as the region-2 start where that is not valid (below 611.213 Pa).
 */
function solveVapour(p: number, lnp: number, y: number, kind: HOrS, T0?: number): SteamState {
  const b = kind === 'h' ? BORDERS_H : BORDERS_S;
  if (b.b25.side(p, lnp, y) >= 0) {
    const y25 = yGibbs(2, p, T_MAX_2, kind);
    // region 2 up to its 1073.15 K state, round-off included (a region-2 state a few ulps below
    // 1073.15 K stays region 2); beyond it region 5, or above 50 MPa the end of the range
    if (y > y25 + limitSlack(kind, y25, T_MAX_2)) {
      if (p > P_MAX_5) {
        throw rangeError(kind, y, y25, 'above', 'the IF97 limit', `at p = ${formatQuantity('p', p)} (1073.15 K)`);
      }
      // start region 5 from the 1073.15 K border: g holds region 2 there
      const dy = dyFromGibbs(2, T_MAX_2, kind);
      const T5 = kind === 'h' ? T_MAX_2 + (y - y25) / dy : T_MAX_2 * Math.exp((y - y25) / (dy * T_MAX_2));
      if (b.top.side(p, lnp, y) >= 0) {
        const yTop = yGibbs(5, p, T_MAX_5, kind);
        if (y > yTop + limitSlack(kind, yTop, T_MAX_5)) {
          throw rangeError(kind, y, yTop, 'above', 'the IF97 limit', `at p = ${formatQuantity('p', p)} (2273.15 K)`);
        }
      }
      return solveGibbs(5, p, y, kind, T5);
    }
  }
  const start = T0 ?? (kind === 'h' ? region2TPh(p, y) : region2TPs(p, y));
  return solveGibbs(2, p, y, kind, start);
}

function solveLiquid(p: number, y: number, kind: HOrS): SteamState {
  const T0 = kind === 'h' ? region1TPh(p, y) : region1TPs(p, y);
  return solveGibbs(1, p, y, kind, T0);
}

/** h and s of the wet region at 623.15 K (IF97 Eq. (30) with regions 1 and 2), widened by a margin. */
const DOME3: Readonly<Record<HOrS, readonly [number, number]>> = (() => {
  saturate(P_SAT_623, T_13);
  return {
    h: [sat.hL - 5e3, sat.hV + 5e3],
    s: [sat.sL - 10, sat.sV + 10],
  };
})();

/**
 * False when (p, h) or (p, s) above p_sat(623.15 K) is surely not wet: y outside the dome's
 * range, or p above the saturation pressure of SR3 Eqs. (10), (11) by more than 50 kPa (those
 * equations stay within 1 kPa of the region-3 saturation line, measured). Spares the exact
 * saturated states in most of region 3.
 */
function mayBeWet3(p: number, y: number, kind: HOrS): boolean {
  const dome = DOME3[kind];
  if (y <= dome[0] || y >= dome[1]) return false;
  return p < (kind === 'h' ? p3satH(y) : p3satS(y)) + 5e4;
}

/**
 * The (p, h) or (p, s) problem: region choice (IF97 Sect. 2, the borders taken in h or s at the
 * given p), then Newton steps. Where two regions' equations overlap at a border (IF97's
 * inconsistencies there are up to ~0.1 kJ/kg), the border value decides: up to h1(p, 623.15 K)
 * region 1, from h2(p, T_B23(p)) region 2, up to h2(p, 1073.15 K) region 2.
 */
function solvePY(p: number, y: number, kind: HOrS): SteamState {
  checkPressure(p);
  requireFinite(kind, y);
  const b = kind === 'h' ? BORDERS_H : BORDERS_S;
  const lnp = Math.log(p);
  // bottom of the range: 273.15 K (liquid, or vapour below p_sat(273.15 K))
  if (p < P_SAT_MIN || b.bottom.side(p, lnp, y) <= 0) {
    const yMin = yGibbs(p >= P_SAT_MIN ? 1 : 2, p, T_MIN, kind); // leaves g at (p, 273.15 K)
    if (y < yMin - limitSlack(kind, yMin, T_MIN)) {
      throw rangeError(kind, y, yMin, 'below', 'the IF97 limit', `at p = ${formatQuantity('p', p)} (273.15 K)`);
    }
    if (p < P_SAT_MIN) {
      // below p_sat(273.15 K) only vapour exists; the backward equations do not reach down
      // here, so start from the 273.15 K state with a constant-cp step
      const dy = dyFromGibbs(2, T_MIN, kind);
      const T0 = kind === 'h' ? T_MIN + (y - yMin) / dy : T_MIN * Math.exp((y - yMin) / (dy * T_MIN));
      return solveVapour(p, lnp, y, kind, T0);
    }
  }

  if (p <= P_SAT_623) {
    if (b.vapour.side(p, lnp, y) > 0) return solveVapour(p, lnp, y, kind);
    if (b.liquid.side(p, lnp, y) < 0) return solveLiquid(p, y, kind);
    const T = tsatEq31(p);
    saturate(p, T);
    const yL = kind === 'h' ? sat.hL : sat.sL;
    const yV = kind === 'h' ? sat.hV : sat.sV;
    if (y <= yL) return solveLiquid(p, y, kind);
    if (y >= yV) return solveVapour(p, lnp, y, kind);
    return twoPhase(p, T, (y - yL) / (yV - yL));
  }

  // p > p_sat(623.15 K): region 1 up to 623.15 K, region 3 up to B23, then region 2 (and 5)
  // (the border states with their round-off: a state a few ulps inside region 1 or 2 stays there)
  const s13 = b.b13.side(p, lnp, y);
  if (s13 < 0 || (s13 === 0 && y <= yBorder(1, p, T_13, kind, 1))) return solveLiquid(p, y, kind);
  const s23 = b.b23.side(p, lnp, y);
  if (s23 > 0 || (s23 === 0 && y >= yBorder(2, p, b23T(p), kind, -1))) return solveVapour(p, lnp, y, kind);
  let Ts = NaN;
  let vapourSide = false;
  if (p < P_CRIT && mayBeWet3(p, y, kind)) {
    Ts = tsatEq31(p);
    saturate(p, Ts);
    const yL = kind === 'h' ? sat.hL : sat.sL;
    const yV = kind === 'h' ? sat.hV : sat.sV;
    if (y > yL && y < yV) return twoPhase(p, Ts, (y - yL) / (yV - yL));
    vapourSide = y >= yV;
  }
  const T0 = kind === 'h' ? region3TPh(p, y) : region3TPs(p, y);
  const v0 = kind === 'h' ? region3VPh(p, y) : region3VPs(p, y);
  const st = solve3(p, y, kind, 1 / v0, T0);
  if (solve3Stable || Number.isNaN(Ts)) return st;
  // Within a few kPa of the critical point Newton can land on the unstable part of an
  // isotherm; then walk the stable branch on the input's side of the dome instead.
  return solve3Branch(p, y, kind, vapourSide ? -1 : 1, Ts);
}

/**
 * Region 3 state of given p and h or s on one stable branch (side −1 vapour, T ≥ Ts; +1 liquid,
 * T ≤ Ts): bisection in T, the density of each T from density3 on that branch. A slow but sure
 * fallback for the immediate neighbourhood of the critical point.
 */
function solve3Branch(p: number, y: number, kind: HOrS, side: -1 | 1, Ts: number): SteamState {
  const yAt = (T: number): number => {
    const rho = density3(p, T, 1 / vpt3(p, T), side);
    return kind === 'h' ? h3FromScratch(rho, T) : s3FromScratch(T);
  };
  let lo = side < 0 ? Ts : Ts - 1;
  let hi = side < 0 ? Ts + 1 : Ts;
  for (let it = 0; it < 80 && hi - lo > 1e-12 * lo; it++) {
    const mid = 0.5 * (lo + hi);
    if (yAt(mid) < y) lo = mid;
    else hi = mid;
  }
  const T = 0.5 * (lo + hi);
  const rho = density3(p, T, 1 / vpt3(p, T), side);
  return fromHelmholtz(p, rho, T);
}

/** State at pressure p (Pa) and specific enthalpy h (J/kg). */
export function ph(p: number, h: number): SteamState {
  return solvePY(p, h, 'h');
}

/** State at pressure p (Pa) and specific entropy s (J/(kg·K)). */
export function ps(p: number, s: number): SteamState {
  return solvePY(p, s, 's');
}

/** Region (1–5) of the state at (p, h); throws SteamRangeError like {@link ph}. */
export function regionPH(p: number, h: number): SteamRegion {
  return ph(p, h).region;
}

/** Region (1–5) of the state at (p, s); throws SteamRangeError like {@link ps}. */
export function regionPS(p: number, s: number): SteamRegion {
  return ps(p, s).region;
}
