/**
 * IAPWS-IF97 region 5 (high-temperature vapour, 1073.15 K < T ≤ 2273.15 K, p ≤ 50 MPa):
 * basic equation. IAPWS R7-97(2012), Sect. 7.
 */
import * as constants from './constants';
import * as powerSum from './power-sum';
import * as sums from './sums.generated';

const { REGION5_P_STAR, REGION5_T_STAR } = constants;
const { F, FX, FXX, FY, FYY, derivVector } = powerSum;
const { region5IdealSum, region5ResidualSum } = sums;

const ideal = derivVector();

/**
 * IF97 Eqs. (32)–(34): γ = γ° + γʳ with π = p/1 MPa, τ = 1000 K/T. Fills g with
 * [γ, γ_π, γ_ππ, γ_τ, γ_ττ, γ_πτ] (Tables 40, 41).
 */
export function region5Gibbs(p: number, T: number, g: Float64Array): void {
  const pi = p / REGION5_P_STAR;
  const tau = REGION5_T_STAR / T;
  region5IdealSum(tau, ideal); // Eq. (33) without ln π
  region5ResidualSum(pi, tau, g); // Eq. (34)
  g[F] += Math.log(pi) + ideal[F];
  g[FX] += 1 / pi;
  g[FXX] -= 1 / (pi * pi);
  g[FY] += ideal[FY];
  g[FYY] += ideal[FYY];
}
