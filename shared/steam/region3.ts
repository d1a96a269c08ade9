/**
 * IAPWS-IF97 region 3: basic Helmholtz equation (IAPWS R7-97(2012), Sect. 5 … Eq. (28)) and the
 * backward equations of the supplementary release IAPWS SR3-03(2014): T(p,h), v(p,h), T(p,s),
 * v(p,s) for subregions 3a/3b, the 3a/3b boundary h3ab(p), and the region-3 saturation
 * pressures p3sat(h), p3sat(s).
 */
import * as constants from './constants';
import * as powerSum from './power-sum';
import * as sums from './sums.generated';

const { RHO_CRIT, T_CRIT } = constants;
const { F, FX, FXX } = powerSum;
const N1 = sums.REGION3_N1;
const [H3AB_1, H3AB_2, H3AB_3, H3AB_4] = sums.H3AB_N;

const {
  region3HelmholtzSum,
  region3aTPhSum,
  region3bTPhSum,
  region3aVPhSum,
  region3bVPhSum,
  region3aTPsSum,
  region3bTPsSum,
  region3aVPsSum,
  region3bVPsSum,
  region3PsatHSum,
  region3PsatSSum,
} = sums;

/**
 * IF97 Eq. (28): φ(δ, τ) = n1 ln δ + Σ nᵢ δ^Iᵢ τ^Jᵢ with δ = ρ/322 kg/m³, τ = 647.096 K/T. Fills f
 * with [φ, φ_δ, φ_δδ, φ_τ, φ_ττ, φ_δτ] (Table 32). φ itself (which needs a logarithm) is filled
 * only when withPhi is true; the solvers do without it.
 */
export function region3Helmholtz(rho: number, T: number, f: Float64Array, withPhi = true): void {
  const delta = rho / RHO_CRIT;
  const tau = T_CRIT / T;
  region3HelmholtzSum(delta, tau, f);
  if (withPhi) f[F] += N1 * Math.log(delta);
  f[FX] += N1 / delta;
  f[FXX] -= N1 / (delta * delta);
}

/** SR3 Eq. (1): enthalpy of the 3a/3b boundary, J/kg (π = p/1 MPa). */
export function h3ab(p: number): number {
  const pi = p / 1e6;
  return (H3AB_1 + pi * (H3AB_2 + pi * (H3AB_3 + pi * H3AB_4))) * 1e3;
}

/** Entropy of the 3a/3b boundary: the critical entropy, 4.41202148223476 kJ/(kg·K) (SR3 Sect. 3.3). */
export const S_3AB = 4.41202148223476e3;

/** SR3 Eq. (2): T(p, h) in subregion 3a; π = p/100 MPa, η = h/2300 kJ/kg, T* = 760 K. */
export function region3aTPh(p: number, h: number): number {
  return 760 * region3aTPhSum(p / 100e6 + 0.24, h / 2300e3 - 0.615);
}
/** SR3 Eq. (3): T(p, h) in subregion 3b; η = h/2800 kJ/kg, T* = 860 K. */
export function region3bTPh(p: number, h: number): number {
  return 860 * region3bTPhSum(p / 100e6 + 0.298, h / 2800e3 - 0.72);
}
/** SR3 Eq. (4): v(p, h) in subregion 3a; η = h/2100 kJ/kg, v* = 0.0028 m³/kg. */
export function region3aVPh(p: number, h: number): number {
  return 0.0028 * region3aVPhSum(p / 100e6 + 0.128, h / 2100e3 - 0.727);
}
/** SR3 Eq. (5): v(p, h) in subregion 3b; η = h/2800 kJ/kg, v* = 0.0088 m³/kg. */
export function region3bVPh(p: number, h: number): number {
  return 0.0088 * region3bVPhSum(p / 100e6 + 0.0661, h / 2800e3 - 0.72);
}
/** SR3 Eq. (6): T(p, s) in subregion 3a; σ = s/4.4 kJ/(kg·K), T* = 760 K. */
export function region3aTPs(p: number, s: number): number {
  return 760 * region3aTPsSum(p / 100e6 + 0.24, s / 4.4e3 - 0.703);
}
/** SR3 Eq. (7): T(p, s) in subregion 3b; σ = s/5.3 kJ/(kg·K), T* = 860 K. */
export function region3bTPs(p: number, s: number): number {
  return 860 * region3bTPsSum(p / 100e6 + 0.76, s / 5.3e3 - 0.818);
}
/** SR3 Eq. (8): v(p, s) in subregion 3a; σ = s/4.4 kJ/(kg·K), v* = 0.0028 m³/kg. */
export function region3aVPs(p: number, s: number): number {
  return 0.0028 * region3aVPsSum(p / 100e6 + 0.187, s / 4.4e3 - 0.755);
}
/** SR3 Eq. (9): v(p, s) in subregion 3b; σ = s/5.3 kJ/(kg·K), v* = 0.0088 m³/kg. */
export function region3bVPs(p: number, s: number): number {
  return 0.0088 * region3bVPsSum(p / 100e6 + 0.298, s / 5.3e3 - 0.816);
}

/** SR3 Eqs. (2), (3): backward T(p, h) of region 3, subregion by h3ab(p). */
export function region3TPh(p: number, h: number): number {
  return h <= h3ab(p) ? region3aTPh(p, h) : region3bTPh(p, h);
}
/** SR3 Eqs. (4), (5): backward v(p, h) of region 3. */
export function region3VPh(p: number, h: number): number {
  return h <= h3ab(p) ? region3aVPh(p, h) : region3bVPh(p, h);
}
/** SR3 Eqs. (6), (7): backward T(p, s) of region 3, subregion by s ≤ s_c. */
export function region3TPs(p: number, s: number): number {
  return s <= S_3AB ? region3aTPs(p, s) : region3bTPs(p, s);
}
/** SR3 Eqs. (8), (9): backward v(p, s) of region 3. */
export function region3VPs(p: number, s: number): number {
  return s <= S_3AB ? region3aVPs(p, s) : region3bVPs(p, s);
}

/** SR3 Eq. (10): saturation pressure on the region-3 boundary as a function of h, Pa (h'(623.15 K) ≤ h ≤ h''(623.15 K)). */
export function p3satH(h: number): number {
  const eta = h / 2600e3;
  return 22e6 * region3PsatHSum(eta - 1.02, eta - 0.608);
}

/** SR3 Eq. (11): saturation pressure on the region-3 boundary as a function of s, Pa (s'(623.15 K) ≤ s ≤ s''(623.15 K)). */
export function p3satS(s: number): number {
  const sigma = s / 5.2e3;
  return 22e6 * region3PsatSSum(sigma - 1.03, sigma - 0.699);
}
