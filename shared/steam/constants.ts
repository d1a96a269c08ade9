/**
 * Constants of IAPWS-IF97 (IAPWS R7-97(2012), "Revised Release on the IAPWS Industrial
 * Formulation 1997 for the Thermodynamic Properties of Water and Steam"), in SI base units.
 * Each names its unit and where in the release it is defined.
 */

/** Specific gas constant of water, J/(kg·K). IF97 Eq. (1). */
export const R = 461.526;

/** Critical temperature, K. IF97 Eq. (2). */
export const T_CRIT = 647.096;
/** Critical pressure, Pa (22.064 MPa). IF97 Eq. (3). */
export const P_CRIT = 22.064e6;
/** Critical density, kg/m³. IF97 Eq. (4). */
export const RHO_CRIT = 322;

/** Triple-point temperature, K. IF97 Eq. (8) (T_t = 273.16 K). */
export const T_TRIPLE = 273.16;
/** Triple-point pressure, Pa. IF97 Eq. (9) (p_t = 611.657 Pa). */
export const P_TRIPLE = 611.657;

/** Lowest temperature of IF97's range, K (273.15 K). IF97 Sect. 2. */
export const T_MIN = 273.15;
/** Upper temperature of regions 1–3 and lower bound of region 5, K (1073.15 K). IF97 Sect. 2. */
export const T_MAX_2 = 1073.15;
/** Highest temperature of IF97's range (region 5), K (2273.15 K). IF97 Sect. 2. */
export const T_MAX_5 = 2273.15;
/** Highest pressure for T ≤ 1073.15 K, Pa (100 MPa). IF97 Sect. 2. */
export const P_MAX = 100e6;
/** Highest pressure in region 5 (T > 1073.15 K), Pa (50 MPa). IF97 Sect. 2 (2007 revision). */
export const P_MAX_5 = 50e6;

/** Boundary temperature between regions 1 and 3, K (623.15 K). IF97 Sect. 2, Fig. 1. */
export const T_13 = 623.15;

/** Reducing quantities of the region equations (IF97 Eqs. (7), (15), (28), (32)). */
export const REGION1_P_STAR = 16.53e6; // Pa, Eq. (7)
export const REGION1_T_STAR = 1386; // K, Eq. (7)
export const REGION2_P_STAR = 1e6; // Pa, Eq. (15)
export const REGION2_T_STAR = 540; // K, Eq. (15)
export const REGION5_P_STAR = 1e6; // Pa, Eq. (32)
export const REGION5_T_STAR = 1000; // K, Eq. (32)
