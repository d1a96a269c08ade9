/**
 * IAPWS-IF97 region 4 coefficients (IAPWS R7-97(2012)).
 *
 * Coefficients as printed in Table 34 of IAPWS R7-97(2012).
 * They were carried into this file by a one-off script from the transcription in
 * python3-iapws 1.5.2 (iapws/iapws97.py, Debian), digit for digit; the releases' verification tables in
 * tests/unit/steam confirm them (a wrong row fails those tests).
 */

/** Table 34 — Eqs. (29)–(31): n1 … n10 of the saturation-line equation (index 0 holds n1). */
export const REGION4_N: readonly number[] = [
  0.11670521452767e4,
  -0.72421316703206e6,
  -0.17073846940092e2,
  0.12020824702470e5,
  -0.32325550322333e7,
  0.14915108613530e2,
  -0.48232657361591e4,
  0.40511340542057e6,
  -0.23855557567849,
  0.65017534844798e3,
];
