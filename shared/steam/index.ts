/**
 * Steam and water properties by IAPWS-IF97 (IAPWS R7-97(2012)) with the backward equations of
 * the release and of the supplementary releases SR3-03(2014) and SR5-05(2016).
 * Pure TypeScript, no Node built-ins: runs on the server and in the app.
 *
 * Every value is in SI base units: Pa (absolute), K, J/kg, J/(kg·K), m³/kg, m/s.
 * Input outside IF97's range, not finite, or inconsistent throws {@link SteamRangeError}.
 *
 * The region modules bind the imported names their hot paths use to local constants
 * (`const { PowerSum } = powerSum;`): some module loaders (tsx among them) turn each use of an
 * imported name into a getter call, which inner loops should not pay for.
 */
export { ph, ps, pt, px, tx, tsat, psat, regionPT, regionPH, regionPS, P_SAT_MIN, P_SAT_623 } from './state';
export { SteamRangeError } from './errors';
export type { SteamInput, SteamRangeSide } from './errors';
export type { SteamState, SteamRegion, SteamPhase, SinglePhaseRegion } from './types';
export {
  R,
  T_CRIT,
  P_CRIT,
  RHO_CRIT,
  T_TRIPLE,
  P_TRIPLE,
  T_MIN,
  T_MAX_2,
  T_MAX_5,
  P_MAX,
  P_MAX_5,
  T_13,
} from './constants';
export { b23P, b23T } from './boundaries';
