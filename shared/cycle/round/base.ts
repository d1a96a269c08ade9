/** What every stage of the round analysis shares: the error type, context checks, small helpers and the base context. */
import { correlationIn, type ReconcileResult } from '../../reconcile';
import { EXPLAINED_CORRELATION, type CorrelatedPair } from '../evidence';
import { sigmaFor } from '../../uncertainty';
import {
  BAROMETRIC_MAX_PA,
  BAROMETRIC_MIN_PA,
  fromSI,
  fromSIDelta,
  unitLabel,
  type PressureRef,
  type Unit,
} from '../../units';
import { type Shown } from '../format';
import { portUses, type CycleModel, type Instrument } from '../model';
import { type FigureState } from '../performance';
import type { Evidence, Finding, FindingKind, RoundContext } from '../types';
import { FINDING_KINDS } from '../types';
import { type Level } from '../severity';

export type CycleErrorCode = 'INVALID_MODEL' | 'INVALID_CONTEXT' | 'INVALID_READINGS';

export class CycleError extends Error {
  readonly code: CycleErrorCode;
  readonly details: Record<string, unknown>;
  constructor(code: CycleErrorCode, message: string, details: Record<string, unknown> = {}) {
    super(message);
    this.name = 'CycleError';
    this.code = code;
    this.details = details;
  }
}

export const fin = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x);
export const orNull = (x: number | null | undefined): number | null => (fin(x) ? x : null);

export interface Options {
  confidence: number;
  stuckRounds: number;
  barometricSigmaPa: number;
  coverage: number;
  maxIterations: number;
  tolerance: number;
}

export function checkContext(context: RoundContext): Options {
  if (!context || typeof context !== 'object')
    throw new CycleError('INVALID_CONTEXT', 'analyseRound needs a context { barometricPa, … }');
  const b = context.barometricPa;
  if (!fin(b) || b < BAROMETRIC_MIN_PA || b > BAROMETRIC_MAX_PA) {
    throw new CycleError(
      'INVALID_CONTEXT',
      `context.barometricPa is ${String(b)}; it must be a barometric pressure in Pa from ${BAROMETRIC_MIN_PA} to ${BAROMETRIC_MAX_PA}`,
      { field: 'barometricPa', value: b },
    );
  }
  const o = context.options ?? {};
  const opt: Options = {
    confidence: o.confidence ?? 0.95,
    stuckRounds: o.stuckRounds ?? 3,
    barometricSigmaPa: o.barometricSigmaPa ?? 0,
    coverage: o.coverage ?? 2,
    maxIterations: o.maxIterations ?? 50,
    tolerance: o.tolerance ?? 1e-8,
  };
  const bad = (field: string, value: unknown, limit: string) => {
    throw new CycleError('INVALID_CONTEXT', `context.options.${field} is ${String(value)}; it must be ${limit}`, {
      field,
      value,
    });
  };
  if (!fin(opt.confidence) || opt.confidence <= 0 || opt.confidence >= 1)
    bad('confidence', opt.confidence, 'in (0, 1)');
  if (!Number.isInteger(opt.stuckRounds) || opt.stuckRounds < 3)
    bad('stuckRounds', opt.stuckRounds, 'a whole number ≥ 3');
  if (!fin(opt.barometricSigmaPa) || opt.barometricSigmaPa < 0)
    bad('barometricSigmaPa', opt.barometricSigmaPa, 'a finite number ≥ 0 (Pa)');
  if (!fin(opt.coverage) || opt.coverage <= 0) bad('coverage', opt.coverage, 'a finite number > 0');
  if (!Number.isInteger(opt.maxIterations) || opt.maxIterations < 1)
    bad('maxIterations', opt.maxIterations, 'a whole number ≥ 1');
  if (!fin(opt.tolerance) || opt.tolerance <= 0) bad('tolerance', opt.tolerance, 'a finite number > 0 (σ units)');
  if (context.previousRounds !== undefined && !Array.isArray(context.previousRounds)) {
    throw new CycleError('INVALID_CONTEXT', 'context.previousRounds must be an array of { readings } (oldest first)', {
      field: 'previousRounds',
    });
  }
  return opt;
}

// ---------------------------------------------------------------------------------------------
// small helpers

export interface Combined {
  v: number;
  s: number;
}

/** Inverse-variance mean of readings. */
export function combine(list: { value: number; sigma: number }[]): Combined | null {
  if (list.length === 0) return null;
  let w = 0;
  let sw = 0;
  for (const r of list) {
    const wi = 1 / (r.sigma * r.sigma);
    w += wi;
    sw += wi * r.value;
  }
  return { v: sw / w, s: 1 / Math.sqrt(w) };
}

/**
 * The value an instrument's σ is taken at: the design (nominal) value of its point for its quantity,
 * else the middle of its range — never the reading itself, so a biased reading does not weigh itself
 * lighter or heavier (VDI 2048-1: the uncertainty is a property of the measurement, stated before
 * the value is known). SI absolute.
 */
export function sigmaReferenceValue(model: CycleModel, i: Instrument, barometricPa: number): number {
  const nominal = i.point ? model.points.find((p) => p.id === i.point)?.nominal : undefined;
  const n =
    i.quantity === 'pressure'
      ? nominal?.p
      : i.quantity === 'temperature'
        ? nominal?.T
        : i.quantity === 'massFlow'
          ? nominal?.m
          : undefined;
  if (fin(n) && n > 0) return n;
  return fromOwnReference(i, 0.5 * (i.range.min + i.range.max), barometricPa);
}

/** σ of an instrument from its accuracy spec at its reference value (null where the spec gives none). */
export function specSigmaOf(model: CycleModel, i: Instrument, barometricPa: number): number | null {
  try {
    const s = sigmaFor(i.accuracy, sigmaReferenceValue(model, i, barometricPa));
    return fin(s) && s > 0 ? s : null;
  } catch {
    return null;
  }
}

export function shownOf(i: Instrument): Shown {
  return {
    quantity: i.quantity,
    unit: i.unit as Unit,
    ...(i.pressureReference ? { reference: i.pressureReference as PressureRef } : {}),
  };
}

/** The instrument's own-reference value of an absolute SI reading (Pa gauge / vacuum / absolute; others unchanged). */
export function ownReference(i: Instrument, si: number, b: number): number {
  if (i.quantity !== 'pressure') return si;
  if (i.pressureReference === 'gauge') return si - b;
  if (i.pressureReference === 'vacuum') return b - si;
  return si;
}

export function fromOwnReference(i: Instrument, own: number, b: number): number {
  if (i.quantity !== 'pressure') return own;
  if (i.pressureReference === 'gauge') return own + b;
  if (i.pressureReference === 'vacuum') return b - own;
  return own;
}

/** "0–100 bar(g)", "0–25 kPa(a)", "0–150 °C": the scale as printed on the face */
export function rangeText(i: Instrument): string {
  const unit = i.unit as Unit;
  const conv = (x: number) =>
    i.quantity === 'pressure' ? fromSIDelta('pressure', x, unit) : fromSI(i.quantity, x, unit);
  const n = (x: number) => String(Number(x.toPrecision(6)));
  try {
    return `${n(conv(i.range.min))}–${n(conv(i.range.max))} ${unitLabel(unit, i.pressureReference as PressureRef | undefined)}`;
  } catch {
    return `${n(i.range.min)}–${n(i.range.max)} (SI)`;
  }
}

export { joinNames, lcFirst } from '../messages';

/** code-unit order: the same on every JavaScript engine (no locale) */
export const cmp = (a: string, c: string) => (a < c ? -1 : a > c ? 1 : 0);

export const KIND_ORDER = new Map<FindingKind, number>(FINDING_KINDS.map((k, i) => [k, i]));

// ---------------------------------------------------------------------------------------------

export interface Intake {
  inst: Instrument;
  value: number;
  sigma: number;
}

export interface PState extends FigureState {
  sp: number | null;
  sT: number | null;
  sh: number | null;
  sm: number | null;
  sx: number | null;
}

export const EMPTY: PState = {
  p: null,
  T: null,
  h: null,
  s: null,
  x: null,
  m: null,
  phase: null,
  sp: null,
  sT: null,
  sh: null,
  sm: null,
  sx: null,
};

/** (measured − reconciled)/σ(correction) of a measurement in the reconciliation with the suspects removed; null where not tested. */
export function signedFinal(res: ReconcileResult, tag: string): number | null {
  const z = res.final.z[tag];
  const c = res.final.corrections[tag];
  if (z === null || z === undefined || !fin(z) || !fin(c)) return null;
  return c > 0 ? -z : z;
}

/** Pairs of tested measurements whose corrections correlate by |ρ| ≥ EXPLAINED_CORRELATION (shared/cycle/evidence.ts), ρ to 4 places. */
export function correlatedPairs(res: ReconcileResult): CorrelatedPair[] {
  const cov = res.correctionCovariance;
  const tested = cov.ids.filter((id) => res.z[id] !== null && res.z[id] !== undefined);
  const out: CorrelatedPair[] = [];
  for (let x = 0; x < tested.length; x++) {
    for (let y = x + 1; y < tested.length; y++) {
      const rho = correlationIn(cov, tested[x], tested[y]);
      if (rho !== null && Math.abs(rho) >= EXPLAINED_CORRELATION)
        out.push({ a: tested[x], b: tested[y], rho: Math.round(rho * 1e4) / 1e4 });
    }
  }
  return out;
}

/** The round's model, options and look-ups every stage shares, and the findings list they add to. */
export function makeBase(model: CycleModel, opt: Options, context: RoundContext) {
  const b = context.barometricPa;
  const k = opt.coverage;

  const findings: Finding[] = [];
  const instByTag = new Map(model.instruments.map((i) => [i.tag, i]));
  const instById = new Map(model.instruments.filter((i) => i.id !== undefined).map((i) => [i.id!, i]));
  const eqById = new Map(model.equipment.map((e) => [e.id, e]));
  const pointById = new Map(model.points.map((p) => [p.id, p]));
  const idsOf = (tags: string[]) => tags.map((t) => instByTag.get(t)?.id).filter((x): x is string => x !== undefined);
  const add = (
    kind: FindingKind,
    severity: Level,
    tags: string[],
    message: string,
    evidence: Evidence,
    where: { equipmentId?: string; pointId?: string } = {},
  ) => {
    findings.push({ kind, severity, instrumentTags: tags, instrumentIds: idsOf(tags), ...where, message, evidence });
  };
  const placeOf = (i: Instrument): { equipmentId?: string; pointId?: string } =>
    i.point ? { pointId: i.point } : { equipmentId: i.equipment };
  const placeLabel = (i: Instrument) => (i.point ? pointById.get(i.point)!.label : eqById.get(i.equipment!)!.label);

  // equipment criticality around each point
  const critAtPoint = new Map<string, number>();
  for (const e of model.equipment) {
    for (const u of portUses(e)) critAtPoint.set(u.point, Math.max(critAtPoint.get(u.point) ?? 1, e.criticality));
  }
  const critOf = (i: Instrument) =>
    i.point ? (critAtPoint.get(i.point) ?? 1) : (eqById.get(i.equipment!)?.criticality ?? 1);

  return {
    model,
    opt,
    context,
    b,
    k,
    findings,
    instByTag,
    instById,
    eqById,
    pointById,
    idsOf,
    add,
    placeOf,
    placeLabel,
    critOf,
  };
}

/** The context every stage starts from. */
export type BaseCtx = ReturnType<typeof makeBase>;
