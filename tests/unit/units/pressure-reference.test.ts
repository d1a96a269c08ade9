/**
 * Gauge, vacuum and absolute pressure. Definitions: gauge pressure p_e = p − p_amb (ISO 80000-4,
 * item "gauge pressure"; from memory); a vacuum reading is p_amb − p (common practice of vacuum
 * gauges on condensers and deaerators). Worked figures below are plain arithmetic on those.
 */

import { barometricFromElevation, fromSI, parseQuantity, toSI, UnitError } from '@/shared/units';
import { thrown } from './thrown';

const STD = 101325; // standard atmosphere, Pa (SP 811 B.8: atmosphere, standard 1.013 25 E+05 Pa)

describe('absolute, gauge and vacuum pressures (ISO 80000-4 gauge pressure; vacuum common practice)', () => {
  test('12 bar(g) at 1013.25 mbar barometric = 1 301 325 Pa absolute', () => {
    expect(toSI(parseQuantity('12 bar(g)'), { barometricPa: STD })).toBeCloseTo(1_301_325, 6);
  });

  test('12 bar(a) ignores the barometric pressure', () => {
    expect(toSI(parseQuantity('12 bar(a)'), { barometricPa: 90_000 })).toBe(1.2e6);
    expect(toSI(parseQuantity('12 bar(a)'))).toBe(1.2e6);
  });

  test('0 psig at a standard atmosphere is 14.696 psia (SP 811 B.8 factors)', () => {
    const abs = toSI(parseQuantity('0 psig'), { barometricPa: STD });
    expect(fromSI('pressure', abs, 'psi', 'absolute')).toBeCloseTo(14.6959, 4);
  });

  test('680 mmHg vacuum under a 760 mmHg barometer is 80 mmHg absolute = 10 665.79 Pa', () => {
    const barometricPa = toSI({ quantity: 'pressure', value: 760, unit: 'mmHg', reference: 'absolute' });
    const abs = toSI(parseQuantity('680 mmHg vac'), { barometricPa });
    expect(abs).toBeCloseTo(80 * 133.322387415, 6);
    expect(fromSI('pressure', abs, 'mmHg', 'vacuum', { barometricPa })).toBeCloseTo(680, 9);
  });

  test('a slightly negative gauge reading (−0.6 bar(g)) is a valid sub-atmospheric pressure', () => {
    expect(toSI(parseQuantity('-0.6 bar(g)'), { barometricPa: STD })).toBeCloseTo(41_325, 6);
  });

  test('the barometric pressure comes from the site elevation when no reading is given (ICAO Doc 7488)', () => {
    const fromElevation = toSI(parseQuantity('1 bar(g)'), { elevationM: 1000 });
    expect(fromElevation).toBeCloseTo(1e5 + barometricFromElevation(1000), 6);
    expect(Math.abs(fromElevation - (1e5 + 89876))).toBeLessThanOrEqual(1); // 1000 m: 89 876 Pa (US Std Atm 1976, from memory)
  });

  test('a barometer reading wins over the elevation (DESIGN.md: reading first, else elevation)', () => {
    expect(toSI(parseQuantity('1 bar(g)'), { barometricPa: 95_000, elevationM: 0 })).toBe(195_000);
  });

  test('fromSI gives the gauge and vacuum readings back', () => {
    const ctx = { barometricPa: 98_000 };
    expect(fromSI('pressure', 1_298_000, 'bar', 'gauge', ctx)).toBeCloseTo(12, 12);
    expect(fromSI('pressure', 8_000, 'kPa', 'vacuum', ctx)).toBeCloseTo(90, 12);
    expect(fromSI('pressure', 8_000, 'kPa', 'absolute', ctx)).toBe(8);
  });

  test('gauge or vacuum with no barometric pressure is an error, never a silent 101.325 kPa', () => {
    for (const text of ['12 bar(g)', '600 mmHg vac']) {
      const e = thrown(UnitError, () => toSI(parseQuantity(text)));
      expect(e.code).toBe('missingBarometric');
    }
    const e = thrown(UnitError, () => toSI(parseQuantity('12 bar(g)')));
    expect(e.message).toBe(
      "12 bar gauge is a gauge pressure and needs the site's barometric pressure " +
        '(a barometer reading or the site elevation); none was given',
    );
    const back = thrown(UnitError, () => fromSI('pressure', 2e5, 'bar', 'vacuum'));
    expect(back.code).toBe('missingBarometric');
    expect(back.message).toBe(
      "200000 Pa shown as bar vacuum is a vacuum pressure and needs the site's barometric pressure " +
        '(a barometer reading or the site elevation); none was given',
    );
  });

  test('vacuum greater than the barometric pressure is an error naming both values', () => {
    const e = thrown(UnitError, () => toSI(parseQuantity('102 kPa vac'), { barometricPa: STD }));
    expect(e.code).toBe('nonPositiveAbsolute');
    expect(e.input).toBe('102 kPa vacuum');
    expect(e.message).toBe(
      '102 kPa vacuum with barometric pressure 101325 Pa gives absolute pressure -675 Pa, not above 0 Pa ' +
        '(a vacuum cannot exceed the barometric pressure)',
    );
  });

  test('gauge below −barometric, and absolute ≤ 0, are errors', () => {
    const g = thrown(UnitError, () => toSI(parseQuantity('-1.1 bar(g)'), { barometricPa: STD }));
    expect(g.message).toBe(
      '-1.1 bar gauge with barometric pressure 101325 Pa gives absolute pressure -8675 Pa, not above 0 Pa',
    );
    const a = thrown(UnitError, () => toSI(parseQuantity('0 kPa(a)')));
    expect(a.message).toBe('absolute pressure 0 kPa absolute is 0 Pa, not above 0 Pa');
    const back = thrown(UnitError, () => fromSI('pressure', -5, 'bar', 'absolute'));
    expect(back.message).toBe('absolute pressure -5 Pa is not above 0 Pa');
  });

  test('an implausible barometric pressure (unit slip) is refused, naming it and the range (project limits)', () => {
    const e = thrown(UnitError, () => toSI(parseQuantity('1 bar(g)'), { barometricPa: 1_013_000 }));
    expect(e.code).toBe('badBarometric');
    expect(e.input).toBe(1_013_000);
    expect(e.allowed).toEqual(['20000 Pa to 120000 Pa']);
    expect(e.message).toBe('barometric pressure 1013000 Pa is outside 20000 Pa to 120000 Pa; check its unit');
    const nan = thrown(UnitError, () => toSI(parseQuantity('1 bar(g)'), { barometricPa: NaN }));
    expect(nan.code).toBe('notFinite');
    expect(nan.message).toBe('barometric pressure must be a finite number of Pa, got NaN');
  });
});
