/**
 * Showing values: a space between number and unit symbol, also before °C and % (NIST SP 811 (2008)
 * §7.2 and §7.10.2), pressure references as the trade writes them (bar(g), psig — common practice).
 */

import { formatValue, unitLabel } from '@/shared/units';

describe('unitLabel (common practice: bar(g), bar(a), psig, psia, kPa vac)', () => {
  test.each([
    ['bar', 'gauge', 'bar(g)'],
    ['bar', 'absolute', 'bar(a)'],
    ['kPa', 'vacuum', 'kPa vac'],
    ['psi', 'gauge', 'psig'],
    ['psi', 'absolute', 'psia'],
    ['psi', 'vacuum', 'psi vac'],
    ['mmH₂O', 'gauge', 'mmH₂O(g)'],
  ] as const)('%s %s → %s', (unit, reference, label) => {
    expect(unitLabel(unit, reference)).toBe(label);
  });

  test('no reference: the unit alone', () => {
    expect(unitLabel('°C')).toBe('°C');
    expect(unitLabel('bar')).toBe('bar');
  });
});

describe('formatValue (SP 811 §7.2: space before the unit symbol, °C and % included)', () => {
  test('12 bar(g) at 1.01325 bar barometric, 2 decimals by default', () => {
    expect(formatValue(1_301_325, 'pressure', 'bar', 'gauge', { barometricPa: 101_325 })).toBe('12.00 bar(g)');
  });

  test('temperature, level, flow with chosen digits', () => {
    expect(formatValue(523.15, 'temperature', '°C', undefined, { digits: 1 })).toBe('250.0 °C');
    expect(formatValue(0.5, 'level', '%', undefined, { digits: 0 })).toBe('50 %');
    expect(formatValue(12.5, 'massFlow', 't/h', undefined, { digits: 1 })).toBe('45.0 t/h');
    expect(formatValue(8000, 'pressure', 'kPa', 'vacuum', { barometricPa: 98_000, digits: 1 })).toBe('90.0 kPa vac');
  });

  test('a value rounding to zero shows unsigned ("0.00", not "-0.00"; common practice)', () => {
    expect(formatValue(101_324.9, 'pressure', 'bar', 'gauge', { barometricPa: 101_325 })).toBe('0.00 bar(g)');
  });

  test('gauge from the site elevation (ICAO standard atmosphere, 0 m = 101 325 Pa)', () => {
    expect(formatValue(1_301_325, 'pressure', 'psi', 'gauge', { elevationM: 0, digits: 2 })).toBe('174.05 psig');
  });
});
