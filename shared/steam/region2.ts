/**
 * IAPWS-IF97 region 2 (vapour): basic equation, the 2b/2c boundary and the backward equations
 * T(p, h), T(p, s) of subregions 2a, 2b, 2c. IAPWS R7-97(2012), Sect. 6.
 * (The metastable-vapour equation of Sect. 6.2 is not used.)
 */
import * as constants from './constants';
import * as powerSum from './power-sum';
import * as sums from './sums.generated';

const { REGION2_P_STAR, REGION2_T_STAR } = constants;
const { F, FX, FXX, FY, FYY, derivVector } = powerSum;
const {
  region2IdealSum,
  region2ResidualSum,
  region2aTPhSum,
  region2bTPhSum,
  region2cTPhSum,
  region2aTPsSum,
  region2bTPsSum,
  region2cTPsSum,
} = sums;
const [B2BC_1, B2BC_2, B2BC_3, B2BC_4, B2BC_5] = sums.B2BC_N;

const ideal = derivVector();

/**
 * IF97 Eqs. (15)–(17): γ = γ° + γʳ with π = p/1 MPa, τ = 540 K/T. Fills g with
 * [γ, γ_π, γ_ππ, γ_τ, γ_ττ, γ_πτ] of the sum (Tables 13, 14).
 */
export function region2Gibbs(p: number, T: number, g: Float64Array): void {
  const pi = p / REGION2_P_STAR;
  const tau = REGION2_T_STAR / T;
  region2IdealSum(tau, ideal); // Eq. (16) without ln π
  region2ResidualSum(pi, tau - 0.5, g); // Eq. (17)
  g[F] += Math.log(pi) + ideal[F];
  g[FX] += 1 / pi;
  g[FXX] -= 1 / (pi * pi);
  g[FY] += ideal[FY];
  g[FYY] += ideal[FYY];
}

/** Lowest pressure of subregion 2c, Pa: where B2bc meets the saturation line (IF97 Sect. 6.3.1). */
export const P_2BC_MIN = 6.546699678e6;
/** Subregions 2a/2b split at 4 MPa (IF97 Sect. 6.3.1). */
export const P_2AB = 4e6;
/** Subregions 2b/2c split by entropy at 5.85 kJ/(kg·K) for T(p, s) (IF97 Sect. 6.3.2). */
export const S_2BC = 5.85e3;

/** IF97 Eq. (20): pressure of the 2b/2c boundary B2bc as a function of h, Pa. */
export function b2bcP(h: number): number {
  const eta = h / 1e3;
  return (B2BC_1 + B2BC_2 * eta + B2BC_3 * eta * eta) * 1e6;
}

/** IF97 Eq. (21): enthalpy of the 2b/2c boundary B2bc as a function of p, J/kg. */
export function b2bcH(p: number): number {
  return (B2BC_4 + Math.sqrt((p / 1e6 - B2BC_5) / B2BC_3)) * 1e3;
}

/** IF97 Eq. (22): backward T(p, h), subregion 2a; π = p/1 MPa, η = h/2000 kJ/kg. */
export function region2aTPh(p: number, h: number): number {
  return region2aTPhSum(p / 1e6, h / 2000e3 - 2.1);
}
/** IF97 Eq. (23): backward T(p, h), subregion 2b. */
export function region2bTPh(p: number, h: number): number {
  return region2bTPhSum(p / 1e6 - 2, h / 2000e3 - 2.6);
}
/** IF97 Eq. (24): backward T(p, h), subregion 2c. */
export function region2cTPh(p: number, h: number): number {
  return region2cTPhSum(p / 1e6 + 25, h / 2000e3 - 1.8);
}

/** Subregion (a, b or c) that holds (p, h) for the backward equation T(p, h) (IF97 Sect. 6.3.1). */
export function region2SubregionPh(p: number, h: number): 'a' | 'b' | 'c' {
  if (p <= P_2AB) return 'a';
  if (p <= P_2BC_MIN) return 'b';
  return h >= b2bcH(p) ? 'b' : 'c';
}

/** IF97 Eqs. (22)–(24): backward T(p, h) of region 2, subregion chosen by Sect. 6.3.1. */
export function region2TPh(p: number, h: number): number {
  switch (region2SubregionPh(p, h)) {
    case 'a':
      return region2aTPh(p, h);
    case 'b':
      return region2bTPh(p, h);
    default:
      return region2cTPh(p, h);
  }
}

/** IF97 Eq. (25): backward T(p, s), subregion 2a; π = p/1 MPa, σ = s/2 kJ/(kg·K). */
export function region2aTPs(p: number, s: number): number {
  return region2aTPsSum(Math.sqrt(Math.sqrt(p / 1e6)), s / 2e3 - 2);
}
/** IF97 Eq. (26): backward T(p, s), subregion 2b; σ = s/0.7853 kJ/(kg·K). */
export function region2bTPs(p: number, s: number): number {
  return region2bTPsSum(p / 1e6, 10 - s / 0.7853e3);
}
/** IF97 Eq. (27): backward T(p, s), subregion 2c; σ = s/2.9251 kJ/(kg·K). */
export function region2cTPs(p: number, s: number): number {
  return region2cTPsSum(p / 1e6, 2 - s / 2.9251e3);
}

/** Subregion for the backward equation T(p, s) (IF97 Sect. 6.3.2). */
export function region2SubregionPs(p: number, s: number): 'a' | 'b' | 'c' {
  if (p <= P_2AB) return 'a';
  return s >= S_2BC ? 'b' : 'c';
}

/** IF97 Eqs. (25)–(27): backward T(p, s) of region 2. */
export function region2TPs(p: number, s: number): number {
  switch (region2SubregionPs(p, s)) {
    case 'a':
      return region2aTPs(p, s);
    case 'b':
      return region2bTPs(p, s);
    default:
      return region2cTPs(p, s);
  }
}
