/**
 * IAPWS-IF97 region 3 backward equations v(p, T): the supplementary release IAPWS SR5-05(2016)
 * ("Revised Supplementary Release on Backward Equations for Specific Volume as a Function of
 * Pressure and Temperature v(p,T) for Region 3"). Subregion boundaries (Eqs. (1)–(3)), subregion
 * choice (Tables 2 and 10 of SR5, cited from memory of the release) and the 26 equations
 * v(p, T) (Eqs. (4), (5)). Used as starting values for Newton steps on IF97 Eq. (28).
 */
import { PowerSum } from './power-sum';
import { VPT3_BOUNDARY_LOG, VPT3_BOUNDARY_POLY, VPT3_SUBREGIONS, type Vpt3Subregion } from './region3-vpt.coefficients';
import * as region4 from './region4';

const { psatEq30, tsatEq31 } = region4;

type PolyName = keyof typeof VPT3_BOUNDARY_POLY;
type LogName = keyof typeof VPT3_BOUNDARY_LOG;

function poly(name: PolyName, pMPa: number): number {
  const n = VPT3_BOUNDARY_POLY[name];
  let t = 0;
  for (let i = n.length - 1; i >= 0; i--) t = t * pMPa + n[i];
  return t;
}

function logForm(name: LogName, pMPa: number): number {
  const n = VPT3_BOUNDARY_LOG[name];
  const l = Math.log(pMPa);
  return n[0] + n[1] * l + n[2] * l * l + n[3] / l + n[4] / (l * l);
}

/** SR5 Eq. (2): T3ab(p), K (p in Pa). */
export const t3ab = (p: number): number => logForm('ab', p / 1e6);
/** SR5 Eq. (1): T3cd(p), K. */
export const t3cd = (p: number): number => poly('cd', p / 1e6);
/** SR5 Eq. (3): T3ef(p) = 3.727888004 (p − 22.064 MPa)/MPa + 647.096 K. */
export const t3ef = (p: number): number => 3.727888004 * (p / 1e6 - 22.064) + 647.096;
/** SR5 Eq. (1): T3gh(p), K. */
export const t3gh = (p: number): number => poly('gh', p / 1e6);
/** SR5 Eq. (1): T3ij(p), K. */
export const t3ij = (p: number): number => poly('ij', p / 1e6);
/** SR5 Eq. (1): T3jk(p), K. */
export const t3jk = (p: number): number => poly('jk', p / 1e6);
/** SR5 Eq. (1): T3mn(p), K. */
export const t3mn = (p: number): number => poly('mn', p / 1e6);
/** SR5 Eq. (2): T3op(p), K. */
export const t3op = (p: number): number => logForm('op', p / 1e6);
/** SR5 Eq. (1): T3qu(p), K. */
export const t3qu = (p: number): number => poly('qu', p / 1e6);
/** SR5 Eq. (1): T3rx(p), K. */
export const t3rx = (p: number): number => poly('rx', p / 1e6);
/** SR5 Eq. (1): T3uv(p), K. */
export const t3uv = (p: number): number => poly('uv', p / 1e6);
/** SR5 Eq. (2): T3wx(p), K. */
export const t3wx = (p: number): number => logForm('wx', p / 1e6);

/** Pressure where T3cd meets the saturation line, Pa (SR5 Sect. 3.1: 19.00881189173929 MPa). */
export const P_3CD = 19.00881189173929e6;
/** Saturation pressure at 643.15 K (Eq. (30)), Pa: lower end of the near-critical subregions. */
export const P_SAT_643 = psatEq30(643.15);
/** SR5 Table 10 pressures, Pa. */
const P_3UY_SAT = 21.93161551e6; // 3u/3y split on the saturated-liquid side
const P_3XZ_SAT = 21.90096265e6; // 3x/3z split on the saturated-vapour side

interface Compiled {
  readonly sub: Vpt3Subregion;
  readonly sum: PowerSum;
}

const COMPILED: ReadonlyMap<string, Compiled> = new Map(
  VPT3_SUBREGIONS.map((sub) => [sub.id, { sub, sum: new PowerSum(sub.rows) }] as const),
);

/** SR5 Eqs. (4), (5): v(p, T) of subregion `id`, m³/kg, with no check that (p, T) lies in it. */
export function vpt3Subregion(id: string, p: number, T: number): number {
  const c = COMPILED.get(id);
  if (!c) throw new Error(`unknown region-3 subregion '${id}'`);
  const { sub, sum } = c;
  const pi = p / sub.pStar - sub.a;
  const th = T / sub.tStar - sub.b;
  if (sub.exponential) return sub.vStar * Math.exp(sum.value(pi, th)); // Eq. (5), 3n
  const x = sub.c === 1 ? pi : sub.c === 0.5 ? Math.sqrt(pi) : Math.pow(pi, sub.c);
  let y: number;
  if (sub.d === 1) y = th;
  else if (sub.d === 4) {
    const t2 = th * th;
    y = t2 * t2;
  } else if (sub.d === 0.25) y = Math.sqrt(Math.sqrt(th));
  else y = Math.pow(th, sub.d);
  const w = sum.value(x, y);
  if (sub.e === 1) return sub.vStar * w;
  if (sub.e === 4) {
    const w2 = w * w;
    return sub.vStar * w2 * w2;
  }
  return sub.vStar * Math.pow(w, sub.e);
}

/**
 * SR5 Tables 2 and 10: the subregion of region 3 that holds (p, T). Input must lie in region 3
 * (623.15 K < T < T_B23(p), p > 16.529 MPa).
 */
export function vpt3SubregionOf(p: number, T: number): string {
  const pm = p / 1e6;
  if (pm > 40) return T <= t3ab(p) ? 'a' : 'b';
  if (pm > 25) {
    if (T <= t3cd(p)) return 'c';
    if (T <= t3ab(p)) return 'd';
    if (T <= t3ef(p)) return 'e';
    return 'f';
  }
  if (pm > 23) {
    if (T <= t3cd(p)) return 'c';
    if (T <= t3gh(p)) return pm > 23.5 ? 'g' : 'l';
    if (T <= t3ef(p)) return 'h';
    if (T <= t3ij(p)) return 'i';
    if (T <= t3jk(p)) return 'j';
    return 'k';
  }
  if (pm > 22.5) {
    if (T <= t3cd(p)) return 'c';
    if (T <= t3gh(p)) return 'l';
    if (T <= t3mn(p)) return 'm';
    if (T <= t3ef(p)) return 'n';
    if (T <= t3op(p)) return 'o';
    if (T <= t3ij(p)) return 'p';
    if (T <= t3jk(p)) return 'j';
    return 'k';
  }
  if (p > P_SAT_643) {
    if (T <= t3cd(p)) return 'c';
    if (T <= t3qu(p)) return 'q';
    if (T > t3rx(p)) return T <= t3jk(p) ? 'r' : 'k';
    // SR5 Table 10: the near-critical auxiliary subregions, T3qu < T ≤ T3rx
    if (pm > 22.11) {
      if (T <= t3uv(p)) return 'u';
      if (T <= t3ef(p)) return 'v';
      if (T <= t3wx(p)) return 'w';
      return 'x';
    }
    if (pm > 22.064) {
      if (T <= t3uv(p)) return 'u';
      if (T <= t3ef(p)) return 'y';
      if (T <= t3wx(p)) return 'z';
      return 'x';
    }
    if (T <= tsatEq31(p)) {
      if (p <= P_3UY_SAT) return 'u';
      return T <= t3uv(p) ? 'u' : 'y';
    }
    if (p <= P_3XZ_SAT) return 'x';
    return T <= t3wx(p) ? 'z' : 'x';
  }
  if (pm > 20.5) {
    if (T <= t3cd(p)) return 'c';
    if (T <= tsatEq31(p)) return 's';
    return T <= t3jk(p) ? 'r' : 'k';
  }
  if (p > P_3CD) {
    if (T <= t3cd(p)) return 'c';
    return T <= tsatEq31(p) ? 's' : 't';
  }
  return T <= tsatEq31(p) ? 'c' : 't';
}

/** SR5: backward v(p, T) of region 3, m³/kg. */
export function vpt3(p: number, T: number): number {
  return vpt3Subregion(vpt3SubregionOf(p, T), p, T);
}

/**
 * SR5 Tables 2 and 10 on the saturation line: the subregion of the saturated liquid (x = 0) or
 * saturated vapour (x = 1) at pressure p (16.529 MPa < p < 22.064 MPa).
 */
export function vpt3SaturatedSubregion(p: number, vapour: boolean): string {
  if (!vapour) {
    if (p < P_3CD) return 'c';
    if (p < P_SAT_643) return 's';
    if (p < P_3UY_SAT) return 'u';
    return 'y';
  }
  if (p < 20.5e6) return 't';
  if (p < P_SAT_643) return 'r';
  if (p < P_3XZ_SAT) return 'x';
  return 'z';
}
