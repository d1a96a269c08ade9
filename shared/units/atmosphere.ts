/**
 * Barometric pressure from a site's elevation, by the ICAO Standard Atmosphere
 * (ICAO Doc 7488/3, Manual of the ICAO Standard Atmosphere, 3rd ed., 1993), troposphere layer:
 *
 *   p = p₀ · [1 + β·(H − H₀)/T₀]^(−g₀/(β·R))          (Doc 7488, pressure in a layer with β ≠ 0)
 *   H = r·z / (r + z)                                  (geopotential from geometric altitude)
 *
 * with p₀ = 101 325 Pa, T₀ = 288.15 K, H₀ = 0, β = −0.0065 K/m, g₀ = 9.806 65 m/s²,
 * R = 287.052 87 J/(kg·K) (air), r = 6 356 766 m (nominal Earth radius of Doc 7488).
 *
 * A site's elevation above sea level, as maps give it, is a geometric height z; it is turned into
 * the geopotential altitude H the formula is written in (the two differ by 1.4 m at 3000 m, about
 * 13 Pa there). This is the standard atmosphere only: a barometer reading on the round, when there
 * is one, is better (weather moves the real pressure by ±3 % around it).
 */

import { UnitError } from './errors';

export const ICAO = {
  /** Sea-level pressure, Pa. */
  p0: 101325,
  /** Sea-level temperature, K. */
  T0: 288.15,
  /** Temperature gradient of the troposphere, K/m. */
  beta: -0.0065,
  /** Standard acceleration of gravity, m/s². */
  g0: 9.80665,
  /** Specific gas constant of air, J/(kg·K). */
  R: 287.05287,
  /** Nominal Earth radius for geopotential altitude, m. */
  r: 6356766,
  /** Bottom of the tables and top of the troposphere, geopotential m. */
  lowestH: -5000,
  tropopauseH: 11000,
} as const;

/**
 * Elevations accepted, geometric m. The top is the tropopause (Doc 7488 troposphere layer); the
 * bottom, −1000 m, is a project choice (the lowest dry land is about −430 m) that keeps every result
 * within the barometric-pressure plausibility limits of the conversions.
 */
export const ELEVATION_MIN_M = -1000;
export const ELEVATION_MAX_M = 11000;

/** Geopotential altitude H (m') from geometric altitude z (m), ICAO Doc 7488. */
export function geopotentialAltitude(z: number): number {
  return (ICAO.r * z) / (ICAO.r + z);
}

/** Pressure (Pa) of the ICAO standard troposphere at geopotential altitude H (m'). */
export function pressureAtGeopotential(H: number): number {
  checkFinite(H, 'geopotential altitude');
  if (H < ICAO.lowestH || H > ICAO.tropopauseH) {
    throw new UnitError(
      `geopotential altitude ${H} m is outside the ICAO standard troposphere ` +
        `(${ICAO.lowestH} m to ${ICAO.tropopauseH} m)`,
      { code: 'outOfRange', input: H, allowed: [`${ICAO.lowestH} m to ${ICAO.tropopauseH} m`] },
    );
  }
  const { p0, T0, beta, g0, R } = ICAO;
  return p0 * Math.pow(1 + (beta * H) / T0, -g0 / (beta * R));
}

/**
 * Barometric pressure (Pa, absolute) of the ICAO standard atmosphere at a site elevation z
 * (geometric metres above mean sea level).
 */
export function barometricFromElevation(elevationM: number): number {
  checkFinite(elevationM, 'elevation');
  if (elevationM < ELEVATION_MIN_M || elevationM > ELEVATION_MAX_M) {
    throw new UnitError(
      `elevation ${elevationM} m is outside ${ELEVATION_MIN_M} m to ${ELEVATION_MAX_M} m ` +
        `(the ICAO standard troposphere)`,
      { code: 'outOfRange', input: elevationM, allowed: [`${ELEVATION_MIN_M} m to ${ELEVATION_MAX_M} m`] },
    );
  }
  return pressureAtGeopotential(geopotentialAltitude(elevationM));
}

function checkFinite(x: number, what: string): void {
  if (typeof x !== 'number' || !Number.isFinite(x)) {
    throw new UnitError(`${what} must be a finite number of metres, got ${String(x)}`, {
      code: 'notFinite',
      input: typeof x === 'number' ? x : String(x),
    });
  }
}
