/**
 * Reading typed values: the spellings the trade writes on gauges and log sheets (bar(g), barg,
 * psig/psia, kgf/cm2, mmH2O, mmWC, "kPa vac", degC — common practice), number formats of
 * NIST SP 811 (2008) §10.5.3 (digits grouped in threes by a space) and labels read back.
 */

import {
  allSpellings,
  parseQuantity,
  parseUnit,
  PRESSURE_REFERENCES,
  PRESSURE_UNITS,
  unitLabel,
  UNITS_BY_QUANTITY,
} from '@/shared/units';

describe('pressure spellings with their reference (common practice on gauges and log sheets)', () => {
  test.each([
    ['12 bar(g)', 12, 'bar', 'gauge'],
    ['12 bar(a)', 12, 'bar', 'absolute'],
    ['12 barg', 12, 'bar', 'gauge'],
    ['12 bara', 12, 'bar', 'absolute'],
    ['12 bar g', 12, 'bar', 'gauge'],
    ['12bar(g)', 12, 'bar', 'gauge'],
    ['150 psig', 150, 'psi', 'gauge'],
    ['14.7 psia', 14.7, 'psi', 'absolute'],
    ['150 PSIG', 150, 'psi', 'gauge'],
    ['8 kgf/cm2 (g)', 8, 'kgf/cm²', 'gauge'],
    ['8 kg/cm²g', 8, 'kgf/cm²', 'gauge'],
    ['250 mmH2O(g)', 250, 'mmH₂O', 'gauge'],
    ['250 mmWC gauge', 250, 'mmH₂O', 'gauge'],
    ['85 kPa vacuum', 85, 'kPa', 'vacuum'],
    ['85 kPa(vac)', 85, 'kPa', 'vacuum'],
    ['85 kPa vac', 85, 'kPa', 'vacuum'],
    ['680 mmHg vac', 680, 'mmHg', 'vacuum'],
    ['28 inHg vac', 28, 'inHg', 'vacuum'],
    ['29.92 inHg(a)', 29.92, 'inHg', 'absolute'],
    ['1013 mbar(a)', 1013, 'mbar', 'absolute'],
    ['1013 hPa abs', 1013, 'mbar', 'absolute'],
    ['16.5 MPa(a)', 16.5, 'MPa', 'absolute'],
    ['16.5 mpa absolute', 16.5, 'MPa', 'absolute'],
    ['5 kPa (gage)', 5, 'kPa', 'gauge'],
  ])('%s', (text, value, unit, reference) => {
    expect(parseQuantity(text)).toEqual({ value, unit, quantity: 'pressure', reference });
  });

  test('a pressure unit with no reference parses without one (toSI then asks for it)', () => {
    expect(parseQuantity('12 bar')).toEqual({ value: 12, unit: 'bar', quantity: 'pressure' });
    expect(parseQuantity('760 mmHg')).toEqual({ value: 760, unit: 'mmHg', quantity: 'pressure' });
  });
});

describe('other quantities (spellings: SP 811 symbols and common ASCII forms)', () => {
  test.each([
    ['250 °C', 250, '°C', 'temperature'],
    ['250°C', 250, '°C', 'temperature'],
    ['250 degC', 250, '°C', 'temperature'],
    ['250 C', 250, '°C', 'temperature'],
    ['250 ºC', 250, '°C', 'temperature'],
    ['482 °F', 482, '°F', 'temperature'],
    ['482 degF', 482, '°F', 'temperature'],
    ['482 F', 482, '°F', 'temperature'],
    ['523.15 K', 523.15, 'K', 'temperature'],
    ['45 t/h', 45, 't/h', 'massFlow'],
    ['12.5 kg/s', 12.5, 'kg/s', 'massFlow'],
    ['45000 kg/h', 45000, 'kg/h', 'massFlow'],
    ['99 000 lb/hr', 99000, 'lb/h', 'massFlow'],
    ['120 MW', 120, 'MW', 'power'],
    ['850 kW', 850, 'kW', 'power'],
    ['50 %', 50, '%', 'level'],
    ['50%', 50, '%', 'level'],
    ['-120 mm', -120, 'mm', 'level'],
  ])('%s', (text, value, unit, quantity) => {
    expect(parseQuantity(text)).toEqual({ value, unit, quantity });
  });
});

describe('numbers (NIST SP 811 (2008) §10.5.3 digit grouping; ISO 80000-2 minus sign)', () => {
  test.each([
    ['101 325 Pa(a)', 101325],
    ['101\u2009325 Pa(a)', 101325],
    ['1 013.25 mbar(a)', 1013.25],
    ['1.2e5 Pa(a)', 120000],
    ['1.2E-1 MPa(a)', 0.12],
    ['.5 bar(g)', 0.5],
    ['+3 bar(g)', 3],
    ['\u22120.6 bar(g)', -0.6],
    ['  12   bar(g)  ', 12],
  ])('%s → %d', (text, value) => {
    expect(parseQuantity(text).value).toBeCloseTo(value, 12);
  });
});

describe('labels read back (unitLabel → parseUnit; project consistency)', () => {
  test('every pressure unit with every reference', () => {
    for (const unit of PRESSURE_UNITS) {
      for (const reference of PRESSURE_REFERENCES) {
        expect(parseUnit(unitLabel(unit, reference))).toEqual({ unit, quantity: 'pressure', reference });
      }
    }
  });

  test('every unit of every quantity without a reference', () => {
    for (const [quantity, units] of Object.entries(UNITS_BY_QUANTITY)) {
      for (const unit of units) expect(parseUnit(unitLabel(unit))).toEqual({ unit, quantity });
    }
  });

  test('no two accepted spellings differ only by letter case, so case-folding never picks the wrong unit', () => {
    const seen = new Map<string, string>();
    for (const { spelling, unit } of allSpellings()) {
      const folded = spelling.toLowerCase();
      const other = seen.get(folded);
      if (other !== undefined) expect(other).toBe(unit);
      seen.set(folded, unit);
    }
  });

  test('expect: a unit of the expected quantity passes', () => {
    expect(parseQuantity('250 °C', { expect: 'temperature' }).unit).toBe('°C');
  });
});
