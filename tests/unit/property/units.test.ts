/**
 * Property tests (fast-check) of shared/units: every unit of every quantity, every pressure
 * reference, random values and random site barometric pressures.
 *
 * Oracle, written out here independently of shared/units:
 *  - unit factors of NIST Special Publication 811 (2008), Appendix B.8, built from the exact
 *    defining constants (lb = 0.453 592 37 kg, in = 0.0254 m, g_n = 9.806 65 m/s², conventional
 *    mmHg = 13 595.1 kg/m³ · 1 mm · g_n, mmH₂O = 1000 kg/m³ · 1 mm · g_n, t/°C = T/K − 273.15,
 *    t/°F = 1.8·T/K − 459.67);
 *  - gauge and vacuum pressures: p_abs = p_baro + p_gauge, p_abs = p_baro − p_vac (definitions of
 *    the references, e.g. ISO 80000-4 item 4-15 remark, from memory);
 *  - barometric pressure from a site elevation: ICAO Standard Atmosphere, Doc 7488/3 (1993),
 *    troposphere p = p0·(1 + β·H/T0)^(−g0/(β·R)), H = r·z/(r + z).
 * Tolerances: 1e-12 relative to the larger of the value and the offset it is referred to (the
 * barometric pressure, 273.15 K, 459.67 °F): a round trip through an offset loses the digits the
 * offset holds and no more (common practice: a few ulps per floating-point operation).
 */
import fc from 'fast-check';
import { fixPropertySeed } from '../../helpers/property-seed';
import {
  convert,
  formatValue,
  fromSI,
  fromSIDelta,
  parseQuantity,
  PRESSURE_REFERENCES,
  QUANTITIES,
  toSI,
  toSIDelta,
  UnitError,
  unitLabel,
  UNITS_BY_QUANTITY,
  type PressureRef,
  type Quantity,
  type Unit,
} from '@/shared/units';

fixPropertySeed();

// a property's run time depends on the cases drawn; leave room on a loaded machine (whole suite on 2 cores)
jest.setTimeout(20_000);

// ---------------------------------------------------------------- independent oracle (SP 811)

const LB = 0.45359237; // kg, exact
const IN = 0.0254; // m, exact
const GN = 9.80665; // m/s², exact
const MMHG = 13595.1 * 0.001 * GN; // Pa, conventional mmHg
/** SI = (value + shift) · factor */
const SP811: Record<string, { factor: number; shift: number }> = {
  Pa: { factor: 1, shift: 0 },
  kPa: { factor: 1e3, shift: 0 },
  MPa: { factor: 1e6, shift: 0 },
  bar: { factor: 1e5, shift: 0 },
  mbar: { factor: 1e2, shift: 0 },
  psi: { factor: (LB * GN) / (IN * IN), shift: 0 },
  'kgf/cm²': { factor: GN / 1e-4, shift: 0 },
  inHg: { factor: 25.4 * MMHG, shift: 0 },
  mmHg: { factor: MMHG, shift: 0 },
  'mmH₂O': { factor: 1000 * 0.001 * GN, shift: 0 },
  '°C': { factor: 1, shift: 273.15 },
  '°F': { factor: 1 / 1.8, shift: 459.67 },
  K: { factor: 1, shift: 0 },
  'kg/s': { factor: 1, shift: 0 },
  'kg/h': { factor: 1 / 3600, shift: 0 },
  't/h': { factor: 1000 / 3600, shift: 0 },
  'lb/h': { factor: LB / 3600, shift: 0 },
  W: { factor: 1, shift: 0 },
  kW: { factor: 1e3, shift: 0 },
  MW: { factor: 1e6, shift: 0 },
  '%': { factor: 0.01, shift: 0 },
  mm: { factor: 1e-3, shift: 0 },
};

function icaoPressure(z: number): number {
  const r = 6356766;
  const H = (r * z) / (r + z);
  const beta = -0.0065;
  return 101325 * Math.pow(1 + (beta * H) / 288.15, -9.80665 / (beta * 287.05287));
}

/** Expected SI value by the oracle above. */
function expectedSI(
  quantity: Quantity,
  value: number,
  unit: string,
  reference: PressureRef | undefined,
  baro: number,
): number {
  const { factor, shift } = SP811[unit];
  const own = (value + shift) * factor;
  if (quantity !== 'pressure' || reference === 'absolute') return own;
  return reference === 'gauge' ? baro + own : baro - own;
}

const close = (actual: number, expected: number, scale: number, rel = 1e-12) =>
  Math.abs(actual - expected) <= rel * Math.max(Math.abs(expected), Math.abs(scale));

// ---------------------------------------------------------------- generators

interface Case {
  quantity: Quantity;
  unit: Unit;
  reference?: PressureRef;
}
const CASES: Case[] = QUANTITIES.flatMap((quantity) =>
  UNITS_BY_QUANTITY[quantity].flatMap((unit): Case[] =>
    quantity === 'pressure'
      ? PRESSURE_REFERENCES.map((reference) => ({ quantity, unit, reference }))
      : [{ quantity, unit }],
  ),
);

/** The site: a barometer reading (20–120 kPa, the module's plausibility range) or an elevation. */
const site = fc.oneof(
  fc.double({ min: 20_000, max: 120_000, noNaN: true }).map((b) => ({ ctx: { barometricPa: b }, baro: b })),
  fc.double({ min: -1000, max: 11_000, noNaN: true }).map((z) => ({ ctx: { elevationM: z }, baro: icaoPressure(z) })),
);

/**
 * A physically valid value in the case's unit: absolute pressure 1 mPa … 1 GPa (log-uniform),
 * gauge above −p_baro, vacuum below p_baro, temperature 1e-3 K … 1e5 K, other quantities any sign,
 * 1e-9 … 1e9 (log-uniform magnitudes, so small and large values are both drawn).
 */
function valueArb(c: Case, baro: number): fc.Arbitrary<number> {
  const { factor, shift } = SP811[c.unit];
  const logU = (lo: number, hi: number) =>
    fc.double({ min: Math.log10(lo), max: Math.log10(hi), noNaN: true }).map((e) => 10 ** e);
  if (c.quantity === 'pressure') {
    const absPa = logU(1e-3, 1e9);
    if (c.reference === 'absolute') return absPa.map((p) => p / factor);
    // p_abs = p_baro ± own: draw the absolute pressure, so both sides of 0 gauge are covered
    return absPa.map((p) => (c.reference === 'gauge' ? (p - baro) / factor : (baro - p) / factor));
  }
  if (c.quantity === 'temperature') return logU(1e-3, 1e5).map((T) => T / factor - shift);
  return fc.tuple(fc.boolean(), logU(1e-9, 1e9)).map(([neg, x]) => (neg ? -x : x));
}

const caseAndValue = fc
  .tuple(fc.constantFrom(...CASES), site)
  .chain(([c, s]) => valueArb(c, s.baro).map((value) => ({ ...c, value, ...s })))
  .filter(({ quantity, value, unit, reference, baro }) => {
    // a value whose SI result is not above 0 Pa / 0 K after rounding is refused, and rightly so
    const si = expectedSI(quantity, value, unit, reference, baro);
    return !(quantity === 'pressure' || quantity === 'temperature') || si > 1e-6;
  });

/** Offset the value is referred to, in the value's own unit (for the tolerance). */
function offsetScale(c: { quantity: Quantity; unit: string; reference?: PressureRef }, baro: number): number {
  const { factor, shift } = SP811[c.unit];
  if (c.quantity === 'pressure' && c.reference !== 'absolute') return baro / factor;
  return shift;
}

// ---------------------------------------------------------------- properties

describe('toSI agrees with the SP 811 factors and the reference definitions (every unit × reference, random site)', () => {
  test('toSI(value) = (value + shift)·factor, ± p_baro for gauge / vacuum (barometer or ICAO Doc 7488 elevation)', () => {
    fc.assert(
      fc.property(caseAndValue, ({ quantity, value, unit, reference, ctx, baro }) => {
        const si = toSI({ quantity, value, unit, reference }, ctx);
        const expected = expectedSI(quantity, value, unit, reference, baro);
        const scale = (offsetScale({ quantity, unit, reference }, baro) + Math.abs(value)) * SP811[unit].factor;
        expect(Number.isFinite(si)).toBe(true);
        expect(close(si, expected, scale)).toBe(true);
      }),
      { numRuns: 600 },
    );
  });

  test('fromSI(toSI(x)) = x to 1e-12 of max(|x|, offset) (common practice: lossless round trip)', () => {
    fc.assert(
      fc.property(caseAndValue, ({ quantity, value, unit, reference, ctx, baro }) => {
        const si = toSI({ quantity, value, unit, reference }, ctx);
        const back = fromSI(quantity, si, unit, reference, ctx);
        expect(close(back, value, offsetScale({ quantity, unit, reference }, baro))).toBe(true);
      }),
      { numRuns: 600 },
    );
  });

  test('convert to every other unit and reference of the same dimension and back returns the value', () => {
    fc.assert(
      fc.property(caseAndValue, fc.nat(), ({ quantity, value, unit, reference, ctx, baro }, pick) => {
        const targets = CASES.filter((c) => c.quantity === quantity && (quantity !== 'level' || c.unit === unit));
        const to = targets[pick % targets.length];
        const there = convert({ quantity, value, unit, reference }, to.unit, to.reference, ctx);
        // the oracle: the same absolute state expressed in the target unit / reference
        const si = expectedSI(quantity, value, unit, reference, baro);
        const { factor, shift } = SP811[to.unit];
        const own =
          quantity === 'pressure' && to.reference !== 'absolute'
            ? to.reference === 'gauge'
              ? si - baro
              : baro - si
            : si;
        const expected = own / factor - shift;
        // gauge and vacuum values carry the barometric pressure's digits, °C and °F those of their
        // offsets, in either unit of the pair (see the header): the tolerance scale in SI
        const refPa = quantity === 'pressure' && (reference !== 'absolute' || to.reference !== 'absolute') ? baro : 0;
        const siScale = Math.abs(si) + refPa + SP811[unit].shift * SP811[unit].factor + shift * factor;
        expect(close(there, expected, siScale / factor, 1e-11)).toBe(true);
        const back = convert({ quantity, value: there, unit: to.unit, reference: to.reference }, unit, reference, ctx);
        expect(close(back, value, siScale / SP811[unit].factor, 1e-11)).toBe(true);
      }),
      { numRuns: 600 },
    );
  });

  test('text round trip: parseQuantity(`${value} ${unitLabel}`) gives unit, reference and value back', () => {
    fc.assert(
      fc.property(caseAndValue, ({ quantity, value, unit, reference, ctx }) => {
        const text = `${value} ${unitLabel(unit, reference)}`;
        const parsed = parseQuantity(text, { expect: quantity });
        expect(parsed).toEqual({ value, unit, quantity, ...(reference ? { reference } : {}) });
        expect(toSI(parsed, ctx)).toBe(toSI({ quantity, value, unit, reference }, ctx));
      }),
      { numRuns: 400 },
    );
  });

  test('formatValue with d digits reads back within half a unit of the last digit', () => {
    fc.assert(
      fc.property(caseAndValue, fc.integer({ min: 0, max: 6 }), ({ quantity, value, unit, reference, ctx }, digits) => {
        fc.pre(Math.abs(value) < 1e9);
        const si = toSI({ quantity, value, unit, reference }, ctx);
        const text = formatValue(si, quantity, unit, reference, { ...ctx, digits });
        const parsed = parseQuantity(text, { expect: quantity });
        expect(parsed.unit).toBe(unit);
        expect(parsed.reference).toBe(reference);
        const shown = fromSI(quantity, si, unit, reference, ctx);
        expect(Math.abs(parsed.value - shown)).toBeLessThanOrEqual(
          0.5 * 10 ** -digits * (1 + 1e-9) + 1e-15 * Math.abs(shown),
        );
      }),
      { numRuns: 300 },
    );
  });

  test('differences: toSIDelta is value·factor (no offset, SP 811 B.8 note on intervals) and fromSIDelta undoes it', () => {
    fc.assert(
      fc.property(fc.constantFrom(...CASES), fc.double({ min: -1e9, max: 1e9, noNaN: true }), (c, value) => {
        const si = toSIDelta({ quantity: c.quantity, value, unit: c.unit });
        // 1e-300 floor: subnormal values keep fewer digits than any relative tolerance asks
        expect(close(si, value * SP811[c.unit].factor, 1e-300)).toBe(true);
        expect(close(fromSIDelta(c.quantity, si, c.unit), value, 1e-300)).toBe(true);
      }),
      { numRuns: 300 },
    );
  });
});

// ---------------------------------------------------------------- refusals

/** Runs f; returns what it returned or the error it threw. */
function outcome(f: () => unknown): { ok: true; value: unknown } | { ok: false; error: unknown } {
  try {
    return { ok: true, value: f() };
  } catch (error) {
    return { ok: false, error };
  }
}

/** Number-like garbage: NaN / Infinity spellings, huge exponents, decimal commas, stray signs. */
const numberGarbage = fc.oneof(
  fc.constantFrom(
    'NaN',
    'nan',
    '-NaN',
    'Infinity',
    '-Infinity',
    '+inf',
    'INF',
    '−Infinity',
    '1e400',
    '-1e999',
    '1,5',
    '12,75',
    '--1',
    '+-3',
    '.',
    'e5',
    '',
    '   ',
  ),
  fc.integer({ min: 309, max: 100_000 }).map((e) => `9.9e${e}`),
  fc.integer({ min: 309, max: 100_000 }).map((e) => `-1e+${e}`),
  fc.tuple(fc.integer({ min: 0, max: 99 }), fc.integer({ min: 1, max: 999 })).map(([a, b]) => `${a},${b}`),
);
const unitText = fc.constantFrom(...CASES.map((c) => unitLabel(c.unit, c.reference)));

describe('bad input: a UnitError that names the input, never NaN or Infinity (project rule: clear errors)', () => {
  test('random text: parseQuantity either returns a finite value of a known unit, or throws a UnitError quoting the text', () => {
    fc.assert(
      fc.property(
        fc.oneof(
          fc.string({ unit: 'binary', maxLength: 40 }),
          fc.tuple(numberGarbage, fc.constantFrom('', ' '), unitText).map(([n, sp, u]) => `${n}${sp}${u}`),
          fc.tuple(fc.double(), unitText).map(([x, u]) => `${x} ${u}`),
          fc
            .tuple(fc.double({ min: -1e6, max: 1e6, noNaN: true }), fc.string({ maxLength: 8 }))
            .map(([x, u]) => `${x} ${u}`),
        ),
        (text) => {
          const r = outcome(() => parseQuantity(text));
          if (r.ok) {
            const v = r.value as { value: number; unit: string };
            expect(Number.isFinite(v.value)).toBe(true);
            expect(SP811[v.unit]).toBeDefined();
            return;
          }
          expect(r.error).toBeInstanceOf(UnitError);
          const e = r.error as UnitError;
          if (text.trim() === '') {
            expect(e.code).toBe('empty');
            expect(e.message).toContain('empty input');
          } else {
            expect(e.message).toContain(JSON.stringify(text));
          }
          expect(e.input).toBe(text);
        },
      ),
      { numRuns: 1000 },
    );
  });

  test('NaN and ±Infinity to toSI / fromSI / convert / deltas: UnitError notFinite naming the value', () => {
    fc.assert(
      fc.property(fc.constantFrom(...CASES), fc.constantFrom(NaN, Infinity, -Infinity), site, (c, bad, s) => {
        const calls: (() => unknown)[] = [
          () => toSI({ quantity: c.quantity, value: bad, unit: c.unit, reference: c.reference }, s.ctx),
          () => fromSI(c.quantity, bad, c.unit, c.reference, s.ctx),
          () =>
            convert(
              { quantity: c.quantity, value: bad, unit: c.unit, reference: c.reference },
              c.unit,
              c.reference,
              s.ctx,
            ),
          () => toSIDelta({ quantity: c.quantity, value: bad, unit: c.unit }),
          () => fromSIDelta(c.quantity, bad, c.unit),
        ];
        for (const call of calls) {
          const r = outcome(call);
          expect(r.ok).toBe(false);
          const e = (r as { error: unknown }).error as UnitError;
          expect(e).toBeInstanceOf(UnitError);
          expect(e.code).toBe('notFinite');
          expect(e.message).toContain(String(bad));
        }
      }),
      { numRuns: 200 },
    );
  });

  test('huge finite values whose SI value (or value shown) overflows: UnitError naming the value, never ±Infinity', () => {
    fc.assert(
      fc.property(
        fc.constantFrom(...CASES),
        fc.double({ min: 1e290, max: Number.MAX_VALUE, noNaN: true }),
        fc.boolean(),
        site,
        (c, huge, neg, s) => {
          const value = neg ? -huge : huge;
          const calls: (() => unknown)[] = [
            () => toSI({ quantity: c.quantity, value, unit: c.unit, reference: c.reference }, s.ctx),
            () => fromSI(c.quantity, value, c.unit, c.reference, s.ctx),
            () =>
              convert(
                { quantity: c.quantity, value, unit: c.unit, reference: c.reference },
                c.unit,
                c.reference,
                s.ctx,
              ),
            () => toSIDelta({ quantity: c.quantity, value, unit: c.unit }),
            () => fromSIDelta(c.quantity, value, c.unit),
          ];
          for (const call of calls) {
            const r = outcome(call);
            if (r.ok) {
              expect(Number.isFinite(r.value as number)).toBe(true);
            } else {
              expect(r.error).toBeInstanceOf(UnitError);
              const m = (r.error as UnitError).message;
              // named in full or to the six significant figures messages print
              expect(m.includes(String(value)) || m.includes(String(Number(value.toPrecision(6))))).toBe(true);
            }
          }
        },
      ),
      { numRuns: 300 },
    );
  });

  test('site context: a barometer reading that is not finite or outside 20–120 kPa, or an elevation outside −1000…11 000 m, is refused naming it', () => {
    fc.assert(
      fc.property(
        fc.constantFrom(...CASES.filter((c) => c.reference && c.reference !== 'absolute')),
        fc.oneof(
          fc.constantFrom(NaN, Infinity, -Infinity).map((b) => ({ barometricPa: b }) as const),
          fc
            .oneof(fc.double({ max: 19_999.999, noNaN: true }), fc.double({ min: 120_000.001, noNaN: true }))
            .map((b) => ({ barometricPa: b })),
          fc.constantFrom(NaN, Infinity, -Infinity).map((z) => ({ elevationM: z })),
          fc
            .oneof(fc.double({ max: -1000.001, noNaN: true }), fc.double({ min: 11_000.001, noNaN: true }))
            .map((z) => ({ elevationM: z })),
        ),
        (c, ctx) => {
          const r = outcome(() => toSI({ quantity: c.quantity, value: 1, unit: c.unit, reference: c.reference }, ctx));
          expect(r.ok).toBe(false);
          const e = (r as { error: unknown }).error as UnitError;
          expect(e).toBeInstanceOf(UnitError);
          const given = 'barometricPa' in ctx ? ctx.barometricPa : ctx.elevationM;
          expect(e.message).toMatch('barometricPa' in ctx ? /barometric pressure/ : /elevation/);
          if (Number.isFinite(given)) expect(e.input).toBe(given);
          else expect(e.message).toContain(String(given));
        },
      ),
      { numRuns: 200 },
    );
  });

  test('a pressure without a reference, or with a made-up one, is refused naming the pressure', () => {
    fc.assert(
      fc.property(
        fc.constantFrom(...CASES.filter((c) => c.quantity === 'pressure')),
        fc.double({ min: 1, max: 1e6, noNaN: true }),
        fc.option(
          fc
            .string({ minLength: 1, maxLength: 10 })
            .filter((s) => !(PRESSURE_REFERENCES as readonly string[]).includes(s)),
          { nil: undefined },
        ),
        (c, value, reference) => {
          const r = outcome(() =>
            toSI(
              { quantity: 'pressure', value, unit: c.unit, reference: reference as PressureRef },
              { barometricPa: 1e5 },
            ),
          );
          expect(r.ok).toBe(false);
          const e = (r as { error: unknown }).error as UnitError;
          expect(e).toBeInstanceOf(UnitError);
          expect(e.code).toBe(reference === undefined ? 'missingReference' : 'badReference');
          expect(e.message).toContain(`${value} ${c.unit}`);
        },
      ),
      { numRuns: 200 },
    );
  });
});
