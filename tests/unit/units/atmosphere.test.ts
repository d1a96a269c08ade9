/**
 * ICAO Standard Atmosphere (Doc 7488/3), troposphere. Table values are from memory: the ICAO table
 * by geopotential altitude, and the U.S. Standard Atmosphere 1976 table by geometric altitude
 * (identical to the ICAO atmosphere below 32 km). Both were re-derived here with the Doc 7488
 * formula before use; tables give 5 significant figures, so the tolerance is 1 Pa.
 */

import { barometricFromElevation, geopotentialAltitude, pressureAtGeopotential, UnitError } from '@/shared/units';
import { thrown } from './thrown';

describe('ICAO standard atmosphere by geopotential altitude (ICAO Doc 7488 table, from memory)', () => {
  test.each([
    [-500, 107478],
    [0, 101325],
    [500, 95461],
    [1000, 89875],
    [2000, 79495],
    [3000, 70108],
    [5000, 54020],
    [11000, 22632],
  ])('H = %d m′ → %d Pa', (H, p) => {
    expect(Math.abs(pressureAtGeopotential(H) - p)).toBeLessThanOrEqual(1);
  });
});

describe('barometricFromElevation uses geometric site elevation (U.S. Standard Atmosphere 1976 geometric table, from memory)', () => {
  test.each([
    [0, 101325],
    [1000, 89876],
    [2000, 79501],
    [3000, 70121],
    [5000, 54048],
    [11000, 22700],
  ])('z = %d m → %d Pa', (z, p) => {
    expect(Math.abs(barometricFromElevation(z) - p)).toBeLessThanOrEqual(1);
  });

  test('geopotential altitude of 3000 m geometric is 2998.6 m′ (Doc 7488: H = r·z/(r + z), r = 6 356 766 m)', () => {
    expect(geopotentialAltitude(3000)).toBeCloseTo(2998.58, 2);
    expect(geopotentialAltitude(0)).toBe(0);
  });

  test('pressure falls with elevation over the whole accepted range (ICAO troposphere: monotonic)', () => {
    let previous = Infinity;
    for (let z = -1000; z <= 11000; z += 250) {
      const p = barometricFromElevation(z);
      expect(p).toBeLessThan(previous);
      previous = p;
    }
  });

  test('outside −1000 m … 11 000 m, or not a number: UnitError naming the elevation and the range', () => {
    const low = thrown(UnitError, () => barometricFromElevation(-1001));
    expect(low.code).toBe('outOfRange');
    expect(low.input).toBe(-1001);
    expect(low.message).toBe('elevation -1001 m is outside -1000 m to 11000 m (the ICAO standard troposphere)');
    const high = thrown(UnitError, () => barometricFromElevation(12000));
    expect(high.message).toBe('elevation 12000 m is outside -1000 m to 11000 m (the ICAO standard troposphere)');
    const nan = thrown(UnitError, () => barometricFromElevation(NaN));
    expect(nan.code).toBe('notFinite');
    expect(nan.message).toBe('elevation must be a finite number of metres, got NaN');
    const above = thrown(UnitError, () => pressureAtGeopotential(11001));
    expect(above.message).toBe(
      'geopotential altitude 11001 m is outside the ICAO standard troposphere (-5000 m to 11000 m)',
    );
  });
});
