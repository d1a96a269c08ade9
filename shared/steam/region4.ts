/**
 * IAPWS-IF97 region 4: the saturation line. IAPWS R7-97(2012), Sect. 8.
 */
import { REGION4_N } from './region4.coefficients';

const [n1, n2, n3, n4, n5, n6, n7, n8, n9, n10] = REGION4_N;

/** IF97 Eq. (30) (with Eq. (29b)): saturation pressure in Pa for 273.15 K ≤ T ≤ 647.096 K. No range check. */
export function psatEq30(T: number): number {
  const th = T + n9 / (T - n10);
  const A = th * th + n1 * th + n2;
  const B = n3 * th * th + n4 * th + n5;
  const C = n6 * th * th + n7 * th + n8;
  const r = (2 * C) / (-B + Math.sqrt(B * B - 4 * A * C));
  const r2 = r * r;
  return r2 * r2 * 1e6;
}

/** IF97 Eq. (31) (with Eq. (29a)): saturation temperature in K for 611.213 Pa ≤ p ≤ 22.064 MPa. No range check. */
export function tsatEq31(p: number): number {
  const beta = Math.sqrt(Math.sqrt(p / 1e6));
  const E = beta * beta + n3 * beta + n6;
  const F = n1 * beta * beta + n4 * beta + n7;
  const G = n2 * beta * beta + n5 * beta + n8;
  const D = (2 * G) / (-F - Math.sqrt(F * F - 4 * E * G));
  return (n10 + D - Math.sqrt((n10 + D) * (n10 + D) - 4 * (n9 + n10 * D))) / 2;
}
