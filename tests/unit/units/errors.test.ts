/**
 * Every refusal of the units module: a UnitError whose code, input, allowed list and message name
 * what was given and what would do (project rule: bad input gives a clear error, never NaN).
 * Unit names in the allowed lists are the SP 811 symbols.
 */

import {
  formatValue,
  fromSI,
  fromSIDelta,
  parseQuantity,
  parseUnit,
  toSI,
  toSIDelta,
  unitLabel,
  UnitError,
  type Measure,
} from '@/shared/units';
import { thrown } from './thrown';

const PRESSURE = 'Pa, kPa, MPa, bar, mbar, psi, kgf/cm², inHg, mmHg, mmH₂O';
const ALL = `${PRESSURE}, °C, °F, K, kg/s, kg/h, t/h, lb/h, W, kW, MW, %, mm`;
const REF_HINT = '(pressures with (a), (g) or vac, e.g. "bar(g)", "psia", "kPa vac")';

describe('parseQuantity refusals (project rule: name the input and what is allowed)', () => {
  test.each([
    ['', 'empty', 'empty input; expected a number and a unit, e.g. "12 bar(g)"'],
    ['   ', 'empty', 'empty input; expected a number and a unit, e.g. "12 bar(g)"'],
    ['bar 12', 'badNumber', '"bar 12" does not start with a number; expected e.g. "12 bar(g)"'],
    ['12,5 bar(g)', 'badNumber', '"12,5 bar(g)" uses a decimal comma; write a decimal point, e.g. "12.5"'],
    ['NaN °C', 'notFinite', '"NaN °C" is not a finite number'],
    ['-Infinity K', 'notFinite', '"-Infinity K" is not a finite number'],
    ['1e999 Pa(a)', 'notFinite', '"1e999 Pa(a)" is not a finite number'],
    ['12', 'unknownUnit', `"12" has no unit; allowed: ${ALL}`],
    ['12 atm', 'unknownUnit', `in "12 atm": unknown unit "atm"; allowed: ${ALL} ${REF_HINT}`],
    ['250 °C(g)', 'badReference', 'in "250 °C(g)": unit "°C(g)": temperature takes no pressure reference (gauge)'],
  ])('%j → %s', (text, code, message) => {
    const e = thrown(UnitError, () => parseQuantity(text));
    expect(e.code).toBe(code);
    expect(e.input).toBe(text);
    expect(e.message).toBe(message);
  });

  test('with an expected quantity: its units only, and a unit of another quantity is refused', () => {
    const unknown = thrown(UnitError, () => parseQuantity('12 atm', { expect: 'pressure' }));
    expect(unknown.code).toBe('unknownUnit');
    expect(unknown.allowed).toEqual(PRESSURE.split(', '));
    expect(unknown.message).toBe(
      `in "12 atm": unknown pressure unit "atm"; allowed: ${PRESSURE} with (a), (g) or vac, e.g. "bar(g)", "psia", "kPa vac"`,
    );
    const wrong = thrown(UnitError, () => parseQuantity('250 °C', { expect: 'pressure' }));
    expect(wrong.code).toBe('wrongQuantity');
    expect(wrong.unit).toBe('°C');
    expect(wrong.message).toBe(`in "250 °C": "°C" is a temperature unit, not a pressure unit; allowed: ${PRESSURE}`);
    const noUnit = thrown(UnitError, () => parseQuantity('12', { expect: 'temperature' }));
    expect(noUnit.message).toBe('"12" has no unit; allowed: °C, °F, K');
  });

  test('parseUnit: empty and unknown', () => {
    expect(thrown(UnitError, () => parseUnit('')).message).toBe(`unit is empty; allowed: ${ALL}`);
    const e = thrown(UnitError, () => parseUnit('furlong'));
    expect(e.code).toBe('unknownUnit');
    expect(e.message).toBe(`unknown unit "furlong"; allowed: ${ALL} ${REF_HINT}`);
  });
});

describe('toSI / fromSI refusals (project rule: never a silent NaN or default)', () => {
  const cases: [string, Measure, string, string][] = [
    [
      'NaN',
      { quantity: 'power', value: NaN, unit: 'MW' },
      'notFinite',
      'power value must be a finite number, got NaN (unit MW)',
    ],
    [
      'Infinity',
      { quantity: 'pressure', value: Infinity, unit: 'bar', reference: 'absolute' },
      'notFinite',
      'pressure value must be a finite number, got Infinity (unit bar)',
    ],
    [
      'unknown unit',
      { quantity: 'massFlow', value: 1, unit: 'gal/min' },
      'unknownUnit',
      'unknown mass flow unit "gal/min"; allowed: kg/s, kg/h, t/h, lb/h',
    ],
    [
      'unit of another quantity',
      { quantity: 'pressure', value: 1, unit: '°C', reference: 'gauge' },
      'wrongQuantity',
      `"°C" is a temperature unit, not a pressure unit; allowed: ${PRESSURE}`,
    ],
    [
      'empty unit',
      { quantity: 'pressure', value: 1, unit: '', reference: 'gauge' },
      'empty',
      `pressure unit is empty; allowed: ${PRESSURE}`,
    ],
    [
      'unknown quantity',
      { quantity: 'flow' as never, value: 1, unit: 'kg/s' },
      'wrongQuantity',
      'unknown quantity "flow"; allowed: pressure, temperature, massFlow, power, level',
    ],
    [
      'pressure without reference',
      { quantity: 'pressure', value: 12, unit: 'bar' },
      'missingReference',
      'pressure 12 bar has no reference; say whether it is absolute, gauge or vacuum (e.g. "bar(a)", "bar(g)", "kPa vac")',
    ],
    [
      'reference not one of the three',
      { quantity: 'pressure', value: 12, unit: 'bar', reference: 'gage' as never },
      'badReference',
      'pressure reference "gage" of 12 bar is not one of absolute, gauge, vacuum',
    ],
    [
      'reference on a temperature',
      { quantity: 'temperature', value: 12, unit: '°C', reference: 'gauge' },
      'badReference',
      'temperature 12 °C takes no pressure reference, got "gauge"',
    ],
    [
      'reference written into the unit',
      { quantity: 'pressure', value: 12, unit: 'bar(g)' },
      'unknownUnit',
      'unit "bar(g)" carries a pressure reference; give unit "bar" with reference "gauge"',
    ],
    [
      'below absolute zero (SP 811: T/K = t/°C + 273.15)',
      { quantity: 'temperature', value: -300, unit: '°C' },
      'nonPositiveAbsolute',
      'temperature -300 °C is -26.85 K, not above absolute zero',
    ],
  ];
  test.each(cases)('%s', (_name, measure, code, message) => {
    const e = thrown(UnitError, () => toSI(measure, { barometricPa: 101325 }));
    expect(e.code).toBe(code);
    expect(e.message).toBe(message);
  });

  test('fromSI: NaN, 0 K, pressure without reference', () => {
    const nan = thrown(UnitError, () => fromSI('temperature', NaN, 'K'));
    expect(nan.message).toBe('SI temperature value must be a finite number, got NaN (unit K)');
    const zero = thrown(UnitError, () => fromSI('temperature', 0, '°C'));
    expect(zero.code).toBe('nonPositiveAbsolute');
    expect(zero.message).toBe('temperature 0 K is not above absolute zero');
    const noRef = thrown(UnitError, () => fromSI('pressure', 1e5, 'bar'));
    expect(noRef.code).toBe('missingReference');
    expect(noRef.message).toBe(
      'pressure 100000 Pa shown in bar has no reference; say whether it is absolute, gauge or vacuum (e.g. "bar(a)", "bar(g)", "kPa vac")',
    );
  });

  test('differences: NaN, Infinity, unit of another quantity', () => {
    expect(thrown(UnitError, () => toSIDelta({ quantity: 'temperature', value: NaN, unit: '°F' })).message).toBe(
      'temperature difference must be a finite number, got NaN (unit °F)',
    );
    expect(thrown(UnitError, () => fromSIDelta('pressure', Infinity, 'bar')).message).toBe(
      'SI pressure difference must be a finite number, got Infinity (unit bar)',
    );
    expect(thrown(UnitError, () => toSIDelta({ quantity: 'temperature', value: 1, unit: 'bar' })).message).toBe(
      '"bar" is a pressure unit, not a temperature unit; allowed: °C, °F, K',
    );
  });

  test('formatting: digits out of range, unknown reference', () => {
    const d = thrown(UnitError, () => formatValue(1e5, 'pressure', 'bar', 'absolute', { digits: 1.5 }));
    expect(d.code).toBe('outOfRange');
    expect(d.message).toBe('digits must be a whole number from 0 to 12, got 1.5');
    const r = thrown(UnitError, () => unitLabel('bar', 'gage' as never));
    expect(r.message).toBe('pressure reference "gage" is not one of absolute, gauge, vacuum');
  });
});
