/**
 * Conversion factors against NIST Special Publication 811 (2008), Appendix B.8. SP 811 prints most
 * factors to seven significant figures; a rounded factor is checked to half a unit of its last
 * printed digit, an exact one (printed in bold there) to floating-point precision.
 */

import { fromSI, toSI, toSIDelta, unitInfo, UNITS_BY_QUANTITY, type Measure } from '@/shared/units';

/** |actual − printed| ≤ half a unit in the last printed digit. */
function toPrinted(actual: number, printed: string): void {
  const decimals = (printed.split('.')[1] ?? '').length;
  expect(Math.abs(actual - Number(printed))).toBeLessThanOrEqual(0.5 * 10 ** -decimals * (1 + 1e-9));
}

const pa = (value: number, unit: string): number =>
  toSI({ quantity: 'pressure', value, unit, reference: 'absolute' } as Measure);

describe('pressure factors, NIST SP 811 (2008) Appendix B.8', () => {
  test('bar 1.0 E+05 Pa, millibar 1.0 E+02 Pa (exact); kPa, MPa by SI prefix', () => {
    expect(pa(1, 'bar')).toBe(1e5);
    expect(pa(1, 'mbar')).toBe(100);
    expect(pa(1, 'kPa')).toBe(1000);
    expect(pa(1, 'MPa')).toBe(1e6);
    expect(pa(1, 'Pa')).toBe(1);
  });

  test('pound-force per square inch (psi) 6.894 757 E+03 Pa', () => {
    toPrinted(pa(1, 'psi'), '6894.757');
  });

  test('psi equals lb × g_n / in² from the exact SP 811 definitions (0.453 592 37 kg, 9.806 65 m/s², 0.0254 m)', () => {
    expect(pa(1, 'psi')).toBeCloseTo((0.45359237 * 9.80665) / 0.0254 ** 2, 9);
  });

  test('kilogram-force per square centimeter 9.806 65 E+04 Pa (exact)', () => {
    expect(pa(1, 'kgf/cm²')).toBeCloseTo(98066.5, 9);
  });

  test('inch of mercury, conventional (inHg) 3.386 389 E+03 Pa — not the 32 °F figure 3.386 38 E+03', () => {
    toPrinted(pa(1, 'inHg'), '3386.389');
    expect(Math.abs(pa(1, 'inHg') - 3386.38)).toBeGreaterThan(0.005);
  });

  test('millimeter of mercury, conventional (mmHg) 1.333 224 E+02 Pa; defined 133.322 387 415 Pa', () => {
    toPrinted(pa(1, 'mmHg'), '133.3224');
    expect(pa(1, 'mmHg')).toBeCloseTo(133.322387415, 12);
  });

  test('millimeter of water, conventional (mmH2O) 9.806 65 E+00 Pa (exact)', () => {
    expect(pa(1, 'mmH₂O')).toBeCloseTo(9.80665, 12);
  });

  test('standard atmosphere 101 325 Pa = 760 mmHg = 29.921 inHg = 14.696 psi (SP 811 B.8 atmosphere, standard; values from memory)', () => {
    const atm = 101325;
    // The conventional mmHg is not the torr (101 325/760 Pa): 760 mmHg = 101 325.01 Pa.
    expect(fromSI('pressure', atm, 'mmHg', 'absolute')).toBeCloseTo(760, 3);
    expect(pa(760, 'mmHg') - atm).toBeCloseTo(0.0144, 4);
    toPrinted(fromSI('pressure', atm, 'inHg', 'absolute'), '29.921');
    toPrinted(fromSI('pressure', atm, 'psi', 'absolute'), '14.696');
  });
});

describe('temperature, NIST SP 811 (2008) B.8: T/K = t/°C + 273.15, T/K = (t/°F + 459.67)/1.8', () => {
  const k = (value: number, unit: string) => toSI({ quantity: 'temperature', value, unit } as Measure);

  test('ice point 0 °C = 32 °F = 273.15 K; steam point 100 °C = 212 °F = 373.15 K; −40 °C = −40 °F', () => {
    expect(k(0, '°C')).toBeCloseTo(273.15, 12);
    expect(k(32, '°F')).toBeCloseTo(273.15, 12);
    expect(k(100, '°C')).toBeCloseTo(373.15, 12);
    expect(k(212, '°F')).toBeCloseTo(373.15, 12);
    expect(k(-40, '°F')).toBeCloseTo(k(-40, '°C'), 12);
    expect(k(273.15, 'K')).toBe(273.15);
  });

  test('degree Fahrenheit (interval) 5.555 556 E−01 K; degree Celsius (interval) 1 K', () => {
    toPrinted(toSIDelta({ quantity: 'temperature', value: 1, unit: '°F' }), '0.5555556');
    expect(toSIDelta({ quantity: 'temperature', value: 9, unit: '°F' })).toBeCloseTo(5, 12);
    expect(toSIDelta({ quantity: 'temperature', value: 5, unit: '°C' })).toBe(5);
    expect(toSIDelta({ quantity: 'temperature', value: 5, unit: 'K' })).toBe(5);
  });
});

describe('mass flow, power and level, NIST SP 811 (2008) B.8', () => {
  const kgs = (value: number, unit: string) => toSI({ quantity: 'massFlow', value, unit } as Measure);

  test('pound per hour (lb/h) 1.259 979 E−04 kg/s', () => {
    toPrinted(kgs(1, 'lb/h') * 1e4, '1.259979');
  });

  test('ton, metric 1.0 E+03 kg (exact): 36 t/h = 10 kg/s; 3600 kg/h = 1 kg/s', () => {
    expect(kgs(36, 't/h')).toBeCloseTo(10, 12);
    expect(kgs(3600, 'kg/h')).toBeCloseTo(1, 12);
    expect(kgs(1, 'kg/s')).toBe(1);
  });

  test('SI prefixes (SP 811 Table 5): 1 MW = 1000 kW = 1e6 W; 1 mm = 0.001 m; 1 % = 0.01', () => {
    const w = (value: number, unit: string) => toSI({ quantity: 'power', value, unit } as Measure);
    expect(w(1, 'MW')).toBe(1e6);
    expect(w(1000, 'kW')).toBe(1e6);
    expect(w(1, 'W')).toBe(1);
    expect(toSI({ quantity: 'level', value: 1, unit: 'mm' })).toBe(0.001);
    expect(toSI({ quantity: 'level', value: 50, unit: '%' })).toBe(0.5);
  });

  test('every unit in the pickers has its table entry with the same quantity (project consistency)', () => {
    for (const [quantity, units] of Object.entries(UNITS_BY_QUANTITY)) {
      for (const unit of units) expect(unitInfo(unit)?.quantity).toBe(quantity);
    }
  });
});
