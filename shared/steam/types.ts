/** Result types of the steam tables. All values in SI base units. */

/** IAPWS-IF97 region: 1 compressed liquid, 2 vapour, 3 near-critical, 4 two-phase, 5 high-temperature vapour. */
export type SteamRegion = 1 | 2 | 3 | 4 | 5;

/** Region of a single-phase (p, T) state. */
export type SinglePhaseRegion = 1 | 2 | 3 | 5;

export type SteamPhase = 'liquid' | 'vapour' | 'supercritical' | 'two-phase';

export interface SteamState {
  /** pressure, Pa absolute */
  readonly p: number;
  /** temperature, K */
  readonly T: number;
  /** specific volume, m³/kg */
  readonly v: number;
  /** specific enthalpy, J/kg */
  readonly h: number;
  /** specific entropy, J/(kg·K) */
  readonly s: number;
  /** specific internal energy, J/kg */
  readonly u: number;
  /** specific isobaric heat capacity, J/(kg·K); null in the two-phase region (region 4) */
  readonly cp: number | null;
  /** specific isochoric heat capacity, J/(kg·K); null in the two-phase region */
  readonly cv: number | null;
  /** speed of sound, m/s; null in the two-phase region */
  readonly w: number | null;
  /** vapour mass fraction (quality) in the two-phase region, 0…1; null for a single-phase state */
  readonly x: number | null;
  readonly region: SteamRegion;
  readonly phase: SteamPhase;
}
