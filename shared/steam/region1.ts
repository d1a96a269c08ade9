/**
 * IAPWS-IF97 region 1 (compressed liquid): basic equation and backward equations.
 * IAPWS R7-97(2012), Sect. 5.
 */
import * as constants from './constants';
import * as powerSum from './power-sum';
import * as sums from './sums.generated';

const { REGION1_P_STAR, REGION1_T_STAR } = constants;
const { FX, FXY } = powerSum;
const { region1GibbsSum, region1TPhSum, region1TPsSum } = sums;

/**
 * IF97 Eq. (7): γ(π, τ) with π = p/16.53 MPa, τ = 1386 K/T. Fills g with
 * [γ, γ_π, γ_ππ, γ_τ, γ_ττ, γ_πτ] (Table 4).
 */
export function region1Gibbs(p: number, T: number, g: Float64Array): void {
  const pi = p / REGION1_P_STAR;
  const tau = REGION1_T_STAR / T;
  region1GibbsSum(7.1 - pi, tau - 1.222, g);
  // d/dπ = −d/d(7.1 − π)
  g[FX] = -g[FX];
  g[FXY] = -g[FXY];
}

/** IF97 Eq. (11): backward T(p, h) in region 1; θ = Σ nᵢ π^Iᵢ (η + 1)^Jᵢ, π = p/1 MPa, η = h/2500 kJ/kg. */
export function region1TPh(p: number, h: number): number {
  return region1TPhSum(p / 1e6, h / 2500e3 + 1);
}

/** IF97 Eq. (13): backward T(p, s) in region 1; θ = Σ nᵢ π^Iᵢ (σ + 2)^Jᵢ, π = p/1 MPa, σ = s/1 kJ/(kg·K). */
export function region1TPs(p: number, s: number): number {
  return region1TPsSum(p / 1e6, s / 1e3 + 2);
}
