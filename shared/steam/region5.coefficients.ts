/**
 * IAPWS-IF97 region 5 coefficients (IAPWS R7-97(2012), region 5 as extended to 50 MPa in 2007).
 *
 * Coefficients as printed in Tables 37 and 38 of IAPWS R7-97(2012).
 * They were carried into this file by a one-off script from the transcription in
 * python3-iapws 1.5.2 (iapws/iapws97.py, Debian), digit for digit; the releases' verification tables in
 * tests/unit/steam confirm them (a wrong row fails those tests).
 */
import type { Term } from './power-sum';

/** Table 37 — Eq. (33): γ°(π, τ) = ln π + Σ n°ᵢ τ^J°ᵢ, 6 terms (I is 0). */
export const REGION5_IDEAL: readonly Term[] = [
  { I: 0, J: 0, n: -0.13179983674201e2 },
  { I: 0, J: 1, n: 0.68540841634434e1 },
  { I: 0, J: -3, n: -0.24805148933466e-1 },
  { I: 0, J: -2, n: 0.36901534980333 },
  { I: 0, J: -1, n: -0.31161318213925e1 },
  { I: 0, J: 2, n: -0.32961626538917 },
];

/** Table 38 — Eq. (34): γʳ(π, τ) = Σ nᵢ π^Iᵢ τ^Jᵢ, 6 terms. */
export const REGION5_RESIDUAL: readonly Term[] = [
  { I: 1, J: 1, n: 0.15736404855259e-2 },
  { I: 1, J: 2, n: 0.90153761673944e-3 },
  { I: 1, J: 3, n: -0.50270077677648e-2 },
  { I: 2, J: 3, n: 0.22440037409485e-5 },
  { I: 2, J: 9, n: -0.41163275453471e-5 },
  { I: 3, J: 7, n: 0.37919454822955e-7 },
];
