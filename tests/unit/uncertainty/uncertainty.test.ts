import {
  accuracySpecSchema,
  orificeCdUncertaintyPercent,
  sigmaFor,
  uncertaintyBudget,
  UncertaintyError,
  type AccuracySpec,
} from '@/shared/uncertainty';

const K = (c: number) => c + 273.15;
const R3 = Math.sqrt(3);

function codeOf(fn: () => unknown): string {
  try {
    fn();
  } catch (e) {
    expect(e).toBeInstanceOf(UncertaintyError);
    return (e as UncertaintyError).code;
  }
  throw new Error('expected an UncertaintyError');
}

describe('pressure gauges', () => {
  // EN 837-1: accuracy class = permissible error in % of the span; as a tolerance it is
  // rectangular, σ = a/√3 (GUM JCGM 100:2008 §4.3.7).
  test.each([
    [0.1, 25e5, 2500],
    [0.25, 16e5, 4000],
    [0.6, 10e5, 6000],
    [1, 40e5, 40000],
    [1.6, 25e5, 40000],
    [2.5, 6e5, 15000],
    [4, 1e5, 4000],
  ] as const)('EN 837-1 class %p, span %p Pa: ±a = %p Pa, σ = a/√3', (cls, span, a) => {
    expect(sigmaFor({ kind: 'en837', class: cls, spanPa: span }, 12e5)).toBeCloseTo(a / R3, 9);
  });
  test('EN 837-1: a class outside the standard list is refused', () => {
    expect(codeOf(() => sigmaFor({ kind: 'en837', class: 1.5, spanPa: 1e6 } as unknown as AccuracySpec, 5e5))).toBe(
      'INVALID_SPEC',
    );
  });
  // ASME B40.100 grades (from memory): 4A 0.1 %, 3A 0.25 %, 2A 0.5 %, 1A 1 % of span;
  // grade A 2-1-2 % (2 % in the outer quarters, 1 % in the middle half).
  test.each([
    ['4A', 0.1],
    ['3A', 0.25],
    ['2A', 0.5],
    ['1A', 1],
  ] as const)('ASME B40.100 grade %s = ±%p %% of span', (grade, pct) => {
    expect(sigmaFor({ kind: 'asmeB40', grade, spanPa: 20e5 }, 10e5)).toBeCloseTo(((pct / 100) * 20e5) / R3, 9);
  });
  test('ASME B40.100 grade A: 1 % mid-scale, 2 % in the end quarters; 2 % throughout without the scale start (simplification)', () => {
    const base = { kind: 'asmeB40', grade: 'A', spanPa: 10e5, rangeStartPa: 101325 } as const;
    expect(sigmaFor(base, 101325 + 5e5)).toBeCloseTo(1e4 / R3, 9);
    expect(sigmaFor(base, 101325 + 1e5)).toBeCloseTo(2e4 / R3, 9);
    expect(sigmaFor(base, 101325 + 9e5)).toBeCloseTo(2e4 / R3, 9);
    expect(sigmaFor({ kind: 'asmeB40', grade: 'A', spanPa: 10e5 }, 6e5)).toBeCloseTo(2e4 / R3, 9);
    expect(codeOf(() => sigmaFor(base, 101325 + 11e5))).toBe('OUT_OF_RANGE');
  });
});

describe('resistance thermometers, IEC 60751 tolerance classes ±(a + b·|t|)', () => {
  test.each([
    ['AA', 0, 0.1],
    ['AA', 100, 0.1 + 0.17],
    ['A', 0, 0.15],
    ['A', 100, 0.35], // IEC 60751 class A at 100 °C: ±0.35 °C
    ['A', -100, 0.35],
    ['B', 0, 0.3],
    ['B', 100, 0.8], // class B at 100 °C: ±0.8 °C
    ['B', 500, 2.8],
    ['C', 200, 2.6],
  ] as const)('class %s at %p °C: ±%p K', (cls, t, tol) => {
    expect(sigmaFor({ kind: 'iec60751', class: cls }, K(t))).toBeCloseTo(tol / R3, 9);
  });
  test('outside the class range (wire-wound, from memory) is refused naming the limit', () => {
    expect(codeOf(() => sigmaFor({ kind: 'iec60751', class: 'AA' }, K(300)))).toBe('OUT_OF_RANGE');
    expect(() => sigmaFor({ kind: 'iec60751', class: 'AA' }, K(300))).toThrow(/250 °C/);
    expect(codeOf(() => sigmaFor({ kind: 'iec60751', class: 'A' }, -5))).toBe('INVALID_VALUE');
  });
});

describe('thermocouples, IEC 60584-1 classes: larger of the fixed and the proportional tolerance', () => {
  test.each([
    ['K', 1, 200, 1.5], // 0.004·200 = 0.8 < 1.5
    ['K', 1, 500, 2.0], // 0.004·500 = 2.0 > 1.5
    ['K', 2, 300, 2.5], // 0.0075·300 = 2.25 < 2.5
    ['K', 2, 800, 6.0],
    ['N', 2, 1000, 7.5],
    ['K', 3, -190, 2.85], // 0.015·190
    ['J', 1, 600, 2.4],
    ['T', 1, 100, 0.5],
    ['T', 1, 300, 1.2],
    ['T', 2, 50, 1.0],
    ['E', 2, 600, 4.5],
  ] as const)('type %s class %p at %p °C: ±%p K', (type, cls, t, tol) => {
    expect(sigmaFor({ kind: 'iec60584', type, class: cls }, K(t))).toBeCloseTo(tol / R3, 9);
  });
  test('type J has no class 3; readings beyond a class range are refused', () => {
    expect(codeOf(() => sigmaFor({ kind: 'iec60584', type: 'J', class: 3 }, K(0)))).toBe('INVALID_SPEC');
    expect(codeOf(() => sigmaFor({ kind: 'iec60584', type: 'T', class: 1 }, K(400)))).toBe('OUT_OF_RANGE');
  });
});

describe('flow', () => {
  test('ISO 5167-2 orifice discharge coefficient uncertainty bands (from memory), 95 % → σ = U/1.96', () => {
    expect(orificeCdUncertaintyPercent(0.15)).toBeCloseTo(0.55, 12);
    expect(orificeCdUncertaintyPercent(0.5)).toBe(0.5);
    expect(orificeCdUncertaintyPercent(0.7)).toBeCloseTo(0.6669, 12);
    expect(sigmaFor({ kind: 'orifice', beta: 0.5 }, 40)).toBeCloseTo((0.005 * 40) / 1.96, 12);
    // with 0.8 % for the other terms (Δp, density…), in quadrature
    expect(sigmaFor({ kind: 'orifice', beta: 0.5, otherPercent: 0.8 }, 40)).toBeCloseTo(
      ((Math.hypot(0.5, 0.8) / 100) * 40) / 1.96,
      12,
    );
    expect(codeOf(() => sigmaFor({ kind: 'orifice', beta: 0.8 }, 40))).toBe('INVALID_SPEC');
  });
  test('% of reading as tolerance (σ = a/√3) or 95 % interval (σ = U/1.96, VDI 2048)', () => {
    expect(sigmaFor({ kind: 'percentReading', percent: 1, basis: 'tolerance' }, 50)).toBeCloseTo(0.5 / R3, 12);
    expect(sigmaFor({ kind: 'percentReading', percent: 1, basis: 'u95' }, 50)).toBeCloseTo(0.5 / 1.96, 12);
    // zero reading with no other component has no σ: refused rather than σ = 0
    expect(codeOf(() => sigmaFor({ kind: 'percentReading', percent: 1, basis: 'u95' }, 0))).toBe('ZERO_SIGMA');
  });
});

describe('generic specs and combination in quadrature (GUM §5.1.2)', () => {
  test('% of span, absolute, given σ', () => {
    expect(sigmaFor({ kind: 'percentSpan', percent: 0.5, span: 200, basis: 'tolerance' }, 3)).toBeCloseTo(1 / R3, 12);
    expect(sigmaFor({ kind: 'absolute', value: 0.98, basis: 'u95' }, 3)).toBeCloseTo(0.5, 12);
    expect(sigmaFor({ kind: 'sigma', sigma: 0.2 }, 3)).toBe(0.2);
  });
  test('reading resolution δ is rectangular with half-width δ/2: σ = δ/√12 (GUM F.2.2.1), added in quadrature', () => {
    // EN 837-1 class 1.6 gauge, 0…16 bar, scale division 0.5 bar read to half a division (δ = 0.25 bar)
    const b = uncertaintyBudget({ kind: 'en837', class: 1.6, spanPa: 16e5, resolution: 0.25e5 }, 8e5);
    const sClass = (0.016 * 16e5) / R3;
    const sRes = 0.25e5 / Math.sqrt(12);
    expect(b.components.map((c) => c.sigma)).toEqual([expect.closeTo(sClass, 6), expect.closeTo(sRes, 6)]);
    expect(b.sigma).toBeCloseTo(Math.hypot(sClass, sRes), 6);
    expect(sigmaFor({ kind: 'percentReading', percent: 1, basis: 'u95', resolution: 0.1 }, 0)).toBeCloseTo(
      0.1 / Math.sqrt(12),
      12,
    );
  });
  test('the zod schema refuses malformed specs, naming the field', () => {
    expect(accuracySpecSchema.safeParse({ kind: 'iec60751', class: 'D' }).success).toBe(false);
    expect(accuracySpecSchema.safeParse({ kind: 'percentReading', percent: -1, basis: 'u95' }).success).toBe(false);
    expect(accuracySpecSchema.safeParse({ kind: 'en837', class: 1.6, spanPa: 1e6 }).success).toBe(true);
    expect(() => sigmaFor({ kind: 'en837', class: 1.6, spanPa: -1 }, 1e5)).toThrow(/spanPa/);
    expect(codeOf(() => sigmaFor({ kind: 'bogus' } as unknown as AccuracySpec, 1))).toBe('INVALID_SPEC');
    expect(codeOf(() => sigmaFor({ kind: 'sigma', sigma: 1 }, Number.NaN))).toBe('INVALID_VALUE');
  });
});
