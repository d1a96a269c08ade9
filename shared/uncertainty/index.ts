/**
 * Default measurement uncertainties from an instrument's accuracy specification, for readings
 * entered without a σ. Every figure below names its standard; where the figure is recalled rather
 * than copied from the standard's text it says "from memory".
 *
 * Conventions:
 *  - a tolerance (maximum permissible error ±a) counts as a rectangular distribution:
 *    σ = a/√3 (GUM, JCGM 100:2008 §4.3.7);
 *  - a 95 % interval ±U counts as normal: σ = U/1.96 (VDI 2048 part 1);
 *  - a reading resolution δ (the smallest step the reader tells apart: one scale division, or half
 *    a division when the technician reads to half divisions) is rectangular with half-width δ/2:
 *    σ = δ/√12 (GUM F.2.2.1);
 *  - components are independent and combined in quadrature (GUM §5.1.2 with unit sensitivities).
 *
 * Inputs and results are SI: Pa for pressures, K for temperatures (a tolerance in °C is the same
 * number of kelvin; the class formulas take the reading in °C, t = T − 273.15), kg/s or any unit
 * of the reading for flows. Pure, browser-safe.
 */
import { z } from 'zod';

export type UncertaintyErrorCode = 'INVALID_SPEC' | 'INVALID_VALUE' | 'OUT_OF_RANGE' | 'ZERO_SIGMA';

export class UncertaintyError extends Error {
  readonly code: UncertaintyErrorCode;
  readonly details: Record<string, unknown>;
  constructor(code: UncertaintyErrorCode, message: string, details: Record<string, unknown> = {}) {
    super(message);
    this.name = 'UncertaintyError';
    this.code = code;
    this.details = details;
  }
}

/** σ of a rectangular distribution of half-width a (GUM §4.3.7) */
export const RECTANGULAR_DIVISOR = Math.sqrt(3);
/** coverage factor of a 95 % interval (VDI 2048 part 1) */
export const COVERAGE_95 = 1.96;

// ---------------------------------------------------------------------------------------------
// schema

const positive = z.number().positive();
const resolution = positive.optional();
const basis = z.enum(['tolerance', 'u95']);
export type Basis = z.infer<typeof basis>;

/** EN 837-1 accuracy classes: permissible error in % of the span (measuring range). */
export const EN837_CLASSES = [0.1, 0.25, 0.6, 1, 1.6, 2.5, 4] as const;
/**
 * ASME B40.100 accuracy grades, % of span (from memory). Grade A: ±2 % in the first and last
 * quarter of the span, ±1 % in the middle half ("2-1-2 %").
 */
export const ASME_B40_GRADES = { '4A': 0.1, '3A': 0.25, '2A': 0.5, '1A': 1, A: 1 } as const;
const ASME_GRADE_A_ENDS = 2;

export const accuracySpecSchema = z.discriminatedUnion('kind', [
  z.object({
    kind: z.literal('en837'),
    class: z.literal(EN837_CLASSES),
    spanPa: positive,
    resolution,
  }),
  z.object({
    kind: z.literal('asmeB40'),
    grade: z.enum(['4A', '3A', '2A', '1A', 'A']),
    spanPa: positive,
    /** lower end of the scale, in the same reference as the reading (absolute Pa); enables grade A's position bands */
    rangeStartPa: z.number().optional(),
    resolution,
  }),
  z.object({ kind: z.literal('iec60751'), class: z.enum(['AA', 'A', 'B', 'C']), resolution }),
  z.object({
    kind: z.literal('iec60584'),
    type: z.enum(['K', 'N', 'J', 'T', 'E']),
    class: z.union([z.literal(1), z.literal(2), z.literal(3)]),
    resolution,
  }),
  z.object({
    kind: z.literal('orifice'),
    /** diameter ratio d/D, ISO 5167-2 range 0.1 ≤ β ≤ 0.75 */
    beta: z.number().min(0.1).max(0.75),
    /** 95 % relative uncertainty (%) of everything else (Δp, density, diameters, expansibility), combined in quadrature */
    otherPercent: z.number().min(0).optional(),
    resolution,
  }),
  z.object({ kind: z.literal('percentReading'), percent: positive, basis, resolution }),
  z.object({ kind: z.literal('percentSpan'), percent: positive, span: positive, basis, resolution }),
  z.object({ kind: z.literal('absolute'), value: positive, basis, resolution }),
  z.object({ kind: z.literal('sigma'), sigma: positive, resolution }),
]);

export type AccuracySpec =
  | { kind: 'en837'; class: (typeof EN837_CLASSES)[number]; spanPa: number; resolution?: number }
  | { kind: 'asmeB40'; grade: keyof typeof ASME_B40_GRADES; spanPa: number; rangeStartPa?: number; resolution?: number }
  | { kind: 'iec60751'; class: 'AA' | 'A' | 'B' | 'C'; resolution?: number }
  | { kind: 'iec60584'; type: 'K' | 'N' | 'J' | 'T' | 'E'; class: 1 | 2 | 3; resolution?: number }
  | { kind: 'orifice'; beta: number; otherPercent?: number; resolution?: number }
  | { kind: 'percentReading'; percent: number; basis: Basis; resolution?: number }
  | { kind: 'percentSpan'; percent: number; span: number; basis: Basis; resolution?: number }
  | { kind: 'absolute'; value: number; basis: Basis; resolution?: number }
  | { kind: 'sigma'; sigma: number; resolution?: number };

// compile-time check that the hand-written union and the schema agree
type SchemaType = z.infer<typeof accuracySpecSchema>;
type Same<A, B> = [A] extends [B] ? ([B] extends [A] ? true : false) : false;
const schemaMatchesType: Same<SchemaType, AccuracySpec> = true;
void schemaMatchesType;

// ---------------------------------------------------------------------------------------------
// class tables

/**
 * IEC 60751 (industrial platinum resistance thermometers) tolerance classes: ±(a + b·|t|) °C, and
 * the validity ranges for wire-wound elements (from memory of IEC 60751:2008 table 1).
 */
export const IEC60751_CLASSES = {
  AA: { fixed: 0.1, perDegree: 0.0017, minC: -50, maxC: 250 },
  A: { fixed: 0.15, perDegree: 0.002, minC: -100, maxC: 450 },
  B: { fixed: 0.3, perDegree: 0.005, minC: -196, maxC: 600 },
  C: { fixed: 0.6, perDegree: 0.01, minC: -196, maxC: 600 },
} as const;

interface TcClass {
  fixed: number;
  proportional: number;
  minC: number;
  maxC: number;
}
/**
 * IEC 60584-1:2013 thermocouple tolerance classes: the larger of ±fixed °C and ±proportional·|t|,
 * over the class's range (from memory of IEC 60584-1 table 2). Type J has no class 3.
 */
export const IEC60584_CLASSES: Record<'K' | 'N' | 'J' | 'T' | 'E', Partial<Record<1 | 2 | 3, TcClass>>> = {
  K: {
    1: { fixed: 1.5, proportional: 0.004, minC: -40, maxC: 1000 },
    2: { fixed: 2.5, proportional: 0.0075, minC: -40, maxC: 1200 },
    3: { fixed: 2.5, proportional: 0.015, minC: -200, maxC: 40 },
  },
  N: {
    1: { fixed: 1.5, proportional: 0.004, minC: -40, maxC: 1000 },
    2: { fixed: 2.5, proportional: 0.0075, minC: -40, maxC: 1200 },
    3: { fixed: 2.5, proportional: 0.015, minC: -200, maxC: 40 },
  },
  J: {
    1: { fixed: 1.5, proportional: 0.004, minC: -40, maxC: 750 },
    2: { fixed: 2.5, proportional: 0.0075, minC: -40, maxC: 750 },
  },
  T: {
    1: { fixed: 0.5, proportional: 0.004, minC: -40, maxC: 350 },
    2: { fixed: 1.0, proportional: 0.0075, minC: -40, maxC: 350 },
    3: { fixed: 1.0, proportional: 0.015, minC: -200, maxC: 40 },
  },
  E: {
    1: { fixed: 1.5, proportional: 0.004, minC: -40, maxC: 800 },
    2: { fixed: 2.5, proportional: 0.0075, minC: -40, maxC: 900 },
    3: { fixed: 2.5, proportional: 0.015, minC: -200, maxC: 40 },
  },
};

/**
 * ISO 5167-2:2003 §5.3.3.1, orifice plates (Reader-Harris/Gallagher C): relative uncertainty of
 * the discharge coefficient at about 95 % (from memory): (0.7 − β) % for 0.1 ≤ β < 0.2,
 * 0.5 % for 0.2 ≤ β ≤ 0.6, (1.667β − 0.5) % for 0.6 < β ≤ 0.75.
 */
export function orificeCdUncertaintyPercent(beta: number): number {
  if (!(beta >= 0.1 && beta <= 0.75)) {
    throw new UncertaintyError('OUT_OF_RANGE', `orifice beta ${beta} is outside ISO 5167-2's 0.1 ≤ β ≤ 0.75`, { beta });
  }
  if (beta < 0.2) return 0.7 - beta;
  if (beta <= 0.6) return 0.5;
  return 1.667 * beta - 0.5;
}

// ---------------------------------------------------------------------------------------------
// evaluation

export interface UncertaintyComponent {
  source: string;
  distribution: 'rectangular' | 'normal';
  /** half-width of the tolerance, or the 95 % interval, in SI */
  halfWidth: number;
  sigma: number;
}

export interface UncertaintyBudget {
  sigma: number;
  components: UncertaintyComponent[];
}

const rect = (source: string, a: number): UncertaintyComponent => ({
  source,
  distribution: 'rectangular',
  halfWidth: a,
  sigma: a / RECTANGULAR_DIVISOR,
});
const normal95 = (source: string, u: number): UncertaintyComponent => ({
  source,
  distribution: 'normal',
  halfWidth: u,
  sigma: u / COVERAGE_95,
});
const byBasis = (source: string, a: number, b: Basis) => (b === 'tolerance' ? rect(source, a) : normal95(source, a));

function celsius(valueK: number, what: string): number {
  if (!(valueK > 0))
    throw new UncertaintyError(
      'INVALID_VALUE',
      `${what}: temperature ${valueK} K must be > 0 K (give the reading in kelvin)`,
      { value: valueK },
    );
  return valueK - 273.15;
}

function checkRange(t: number, minC: number, maxC: number, what: string): void {
  if (t < minC || t > maxC) {
    throw new UncertaintyError(
      'OUT_OF_RANGE',
      `${what} is specified from ${minC} °C to ${maxC} °C; the reading is ${t.toFixed(2)} °C`,
      {
        valueC: t,
        minC,
        maxC,
      },
    );
  }
}

/** Parses a spec (zod) and throws an UncertaintyError naming the offending field. */
export function parseAccuracySpec(spec: unknown): AccuracySpec {
  const r = accuracySpecSchema.safeParse(spec);
  if (!r.success) {
    const issues = r.error.issues.map((i) => `${i.path.join('.') || '(spec)'}: ${i.message}`).join('; ');
    throw new UncertaintyError('INVALID_SPEC', `invalid accuracy spec ${JSON.stringify(spec)}: ${issues}`, {
      spec,
      issues: r.error.issues,
    });
  }
  return r.data as AccuracySpec;
}

/** The components of the standard uncertainty of a reading, and their quadrature sum. */
export function uncertaintyBudget(specIn: AccuracySpec, valueSI: number): UncertaintyBudget {
  const spec = parseAccuracySpec(specIn);
  if (typeof valueSI !== 'number' || !Number.isFinite(valueSI)) {
    throw new UncertaintyError('INVALID_VALUE', `reading is ${valueSI}, must be a finite number in SI units`, {
      value: valueSI,
    });
  }
  const comps: UncertaintyComponent[] = [];
  switch (spec.kind) {
    case 'en837':
      comps.push(rect(`EN 837-1 class ${spec.class}`, (spec.class / 100) * spec.spanPa));
      break;
    case 'asmeB40': {
      let pct: number = ASME_B40_GRADES[spec.grade];
      if (spec.grade === 'A') {
        // Simplification: without the scale's lower end the end-quarter figure (2 %) is used over the
        // whole span (conservative); with it, 1 % in the middle half and 2 % in the outer quarters.
        if (spec.rangeStartPa === undefined) pct = ASME_GRADE_A_ENDS;
        else {
          const pos = (valueSI - spec.rangeStartPa) / spec.spanPa;
          if (pos < 0 || pos > 1) {
            throw new UncertaintyError(
              'OUT_OF_RANGE',
              `reading ${valueSI} Pa is outside the gauge scale ${spec.rangeStartPa}…${spec.rangeStartPa + spec.spanPa} Pa`,
              {
                value: valueSI,
              },
            );
          }
          pct = pos >= 0.25 && pos <= 0.75 ? 1 : ASME_GRADE_A_ENDS;
        }
      }
      comps.push(rect(`ASME B40.100 grade ${spec.grade}`, (pct / 100) * spec.spanPa));
      break;
    }
    case 'iec60751': {
      const t = celsius(valueSI, `IEC 60751 class ${spec.class}`);
      const c = IEC60751_CLASSES[spec.class];
      checkRange(t, c.minC, c.maxC, `IEC 60751 class ${spec.class} (wire-wound)`);
      comps.push(rect(`IEC 60751 class ${spec.class}`, c.fixed + c.perDegree * Math.abs(t)));
      break;
    }
    case 'iec60584': {
      const c = IEC60584_CLASSES[spec.type][spec.class];
      if (!c)
        throw new UncertaintyError('INVALID_SPEC', `IEC 60584-1 defines no class ${spec.class} for type ${spec.type}`, {
          spec,
        });
      const t = celsius(valueSI, `IEC 60584-1 type ${spec.type} class ${spec.class}`);
      checkRange(t, c.minC, c.maxC, `IEC 60584-1 type ${spec.type} class ${spec.class}`);
      comps.push(
        rect(`IEC 60584-1 type ${spec.type} class ${spec.class}`, Math.max(c.fixed, c.proportional * Math.abs(t))),
      );
      break;
    }
    case 'orifice': {
      const cd = orificeCdUncertaintyPercent(spec.beta);
      comps.push(normal95(`ISO 5167-2 discharge coefficient (β = ${spec.beta})`, (cd / 100) * Math.abs(valueSI)));
      if (spec.otherPercent)
        comps.push(normal95('other flow-meter terms', (spec.otherPercent / 100) * Math.abs(valueSI)));
      break;
    }
    case 'percentReading':
      comps.push(byBasis(`${spec.percent} % of reading`, (spec.percent / 100) * Math.abs(valueSI), spec.basis));
      break;
    case 'percentSpan':
      comps.push(byBasis(`${spec.percent} % of span`, (spec.percent / 100) * spec.span, spec.basis));
      break;
    case 'absolute':
      comps.push(byBasis('absolute', spec.value, spec.basis));
      break;
    case 'sigma':
      comps.push({ source: 'given σ', distribution: 'normal', halfWidth: spec.sigma * COVERAGE_95, sigma: spec.sigma });
      break;
  }
  if (spec.resolution !== undefined) {
    comps.push({
      source: 'reading resolution',
      distribution: 'rectangular',
      halfWidth: spec.resolution / 2,
      sigma: spec.resolution / Math.sqrt(12),
    });
  }
  const sigma = Math.sqrt(comps.reduce((s, c) => s + c.sigma * c.sigma, 0));
  if (!(sigma > 0) || !Number.isFinite(sigma)) {
    throw new UncertaintyError(
      'ZERO_SIGMA',
      `accuracy spec ${spec.kind} gives σ = ${sigma} at reading ${valueSI}; add a resolution or a span term`,
      {
        spec,
        value: valueSI,
      },
    );
  }
  return { sigma, components: comps };
}

/** Standard uncertainty σ (SI) of a reading from its accuracy spec. */
export function sigmaFor(spec: AccuracySpec, valueSI: number): number {
  return uncertaintyBudget(spec, valueSI).sigma;
}
