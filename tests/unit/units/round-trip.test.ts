/**
 * toSI → fromSI gives the typed value back for every unit and every pressure reference
 * (property test, fast-check), and convert between units agrees with NIST SP 811 (2008) B.8 figures.
 */

import fc from 'fast-check';
import {
  convert,
  fromSI,
  fromSIDelta,
  PRESSURE_REFERENCES,
  QUANTITIES,
  toSI,
  toSIDelta,
  UnitError,
  UNITS_BY_QUANTITY,
  type Quantity,
} from '@/shared/units';
import { thrown } from './thrown';

const BARO = { barometricPa: 97_500 };

/** Values a plant instrument can show in each unit, kept to physically valid states. */
function valuesFor(quantity: Quantity, unit: string, reference?: string): fc.Arbitrary<number> {
  const d = { noNaN: true, noDefaultInfinity: true } as const;
  if (quantity === 'pressure') {
    const fromSIRange = (lo: number, hi: number) => [lo, hi].map((p) => fromSI('pressure', p, unit, 'absolute'));
    if (reference === 'absolute') {
      const [lo, hi] = fromSIRange(1, 1e8);
      return fc.double({ min: lo, max: hi, ...d });
    }
    // gauge: anything above −barometric; vacuum: up to just below barometric
    const [b] = fromSIRange(BARO.barometricPa, BARO.barometricPa);
    return reference === 'gauge'
      ? fc.double({ min: -b * 0.999, max: b * 1000, ...d })
      : fc.double({ min: -b, max: b * 0.999, ...d });
  }
  if (quantity === 'temperature') {
    const lo = fromSI('temperature', 1, unit);
    return fc.double({ min: lo, max: lo + 3000, ...d });
  }
  return fc.double({ min: -1e6, max: 1e6, ...d });
}

describe('round trips toSI → fromSI for every unit (common practice: lossless to 1e-12 relative)', () => {
  for (const quantity of QUANTITIES) {
    for (const unit of UNITS_BY_QUANTITY[quantity]) {
      const refs = quantity === 'pressure' ? PRESSURE_REFERENCES : [undefined];
      for (const reference of refs) {
        test(`${quantity} ${unit}${reference ? ` ${reference}` : ''}`, () => {
          fc.assert(
            fc.property(valuesFor(quantity, unit, reference), (value) => {
              const si = toSI({ quantity, value, unit, reference }, BARO);
              const back = fromSI(quantity, si, unit, reference, BARO);
              const scale = Math.max(
                Math.abs(value),
                quantity === 'pressure' ? fromSI('pressure', BARO.barometricPa, unit, 'absolute') : 1,
              );
              expect(Math.abs(back - value)).toBeLessThanOrEqual(1e-12 * scale);
            }),
            { numRuns: 200 },
          );
        });
      }
    }
  }

  test('differences: toSIDelta → fromSIDelta for every unit', () => {
    for (const quantity of QUANTITIES) {
      for (const unit of UNITS_BY_QUANTITY[quantity]) {
        fc.assert(
          fc.property(fc.double({ min: -1e6, max: 1e6, noNaN: true }), (value) => {
            const back = fromSIDelta(quantity, toSIDelta({ quantity, value, unit }), unit);
            expect(Math.abs(back - value)).toBeLessThanOrEqual(1e-12 * Math.max(1, Math.abs(value)));
          }),
          { numRuns: 50 },
        );
      }
    }
  });
});

describe('convert between units (figures derived from NIST SP 811 (2008) B.8 factors)', () => {
  test('1 bar = 14.5038 psi; 1 kgf/cm² = 0.980665 bar; 10 000 mmH₂O = 1 kgf/cm²', () => {
    expect(
      convert({ quantity: 'pressure', value: 1, unit: 'bar', reference: 'absolute' }, 'psi', 'absolute'),
    ).toBeCloseTo(14.5038, 4);
    expect(
      convert({ quantity: 'pressure', value: 1, unit: 'kgf/cm²', reference: 'gauge' }, 'bar', 'gauge', BARO),
    ).toBeCloseTo(0.980665, 12);
    expect(
      convert({ quantity: 'pressure', value: 10_000, unit: 'mmH₂O', reference: 'absolute' }, 'kgf/cm²', 'absolute'),
    ).toBeCloseTo(1, 12);
  });

  test('gauge → vacuum through the barometric pressure: −0.5 bar(g) = 50 kPa vac', () => {
    expect(
      convert({ quantity: 'pressure', value: -0.5, unit: 'bar', reference: 'gauge' }, 'kPa', 'vacuum', BARO),
    ).toBeCloseTo(50, 9);
  });

  test('100 °C = 212 °F; 1000 lb/h = 0.125998 kg/s; 450 t/h = 125 kg/s', () => {
    expect(convert({ quantity: 'temperature', value: 100, unit: '°C' }, '°F')).toBeCloseTo(212, 10);
    expect(convert({ quantity: 'massFlow', value: 1000, unit: 'lb/h' }, 'kg/s')).toBeCloseTo(0.125998, 6);
    expect(convert({ quantity: 'massFlow', value: 450, unit: 't/h' }, 'kg/s')).toBeCloseTo(125, 10);
  });

  test('level in % and level in mm do not convert without the span', () => {
    const e = thrown(UnitError, () => convert({ quantity: 'level', value: 50, unit: '%' }, 'mm'));
    expect(e.code).toBe('incompatibleUnits');
    expect(e.message).toBe("cannot convert level from % (fraction) to mm (length) without the instrument's span");
  });
});
