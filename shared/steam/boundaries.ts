/**
 * Boundary between regions 2 and 3 (the B23 equation). IAPWS R7-97(2012), Sect. 4, Table 1.
 */

/** Table 1 — Eqs. (5), (6): n1 … n5 of the B23 equation (typed from the release). */
export const B23_N: readonly number[] = [
  0.34805185628969e3, -0.11671859879975e1, 0.10192970039326e-2, 0.57254459862746e3, 0.1391883977887e2,
];

const [n1, n2, n3, n4, n5] = B23_N;

/** IF97 Eq. (5): pressure on B23 at temperature T (623.15 K ≤ T ≤ 863.15 K), Pa. */
export function b23P(T: number): number {
  return (n1 + n2 * T + n3 * T * T) * 1e6;
}

/** IF97 Eq. (6): temperature on B23 at pressure p (16.5292 MPa ≤ p ≤ 100 MPa), K. */
export function b23T(p: number): number {
  return n4 + Math.sqrt((p / 1e6 - n5) / n3);
}
