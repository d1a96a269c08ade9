/**
 * analyseRound: one round's readings held against the cycle.
 *
 *  1. intake: each reading matched to its instrument (by tag or id), its σ from the reading or the
 *     instrument's accuracy spec (+ the barometric σ for gauge and vacuum readings); readings outside
 *     the instrument's range are noted, readings outside IF97 are set aside;
 *  2. the plant equations (equations.ts) reconciled by reconcile() (VDI 2048 weighted least squares,
 *     global χ² test, per-measurement test, serial elimination);
 *  3. state points, equipment balances and performance figures from the readings and from the
 *     reconciled values (suspects removed);
 *  4. findings: gross errors with the estimate the rest of the plant gives, a gauge read as absolute
 *     (or the reverse), twins disagreeing, saturated points whose p and T disagree, a declared phase
 *     contradicted, out of range, outside IF97, stuck values, missing readings, balances not closing.
 *
 * Deterministic: no clock, no randomness, every list in model order or sorted; the same inputs give
 * the same output bit for bit. Never NaN: a number that cannot be formed is null.
 */
import { correlationIn, reconcile, type Correlation, type ReconcileResult } from '../reconcile';
import { EXPLAINED_CORRELATION, type CorrelatedPair } from './evidence';
import { P_MAX, T_MAX_5, type SteamPhase } from '../steam';
import { sigmaFor } from '../uncertainty';
import { BAROMETRIC_MAX_PA, BAROMETRIC_MIN_PA, fromSI, fromSIDelta, unitLabel, type PressureRef, type Unit } from '../units';
import { buildEquations, SCALE, SI_UNIT_OF, type AcceptedReading, type BalanceSpec, type EquationSystem, type HExpr } from './equations';
import { showDelta, showKPa, showSI, showValue, showWithSpread, type Shown } from './format';
import { portUses, type CycleModel, type Equipment, type Instrument } from './model';
import { performanceFigures, type FigureState } from './performance';
import { P_LOW, propsPT, propsSat, stateFromPH, stateFromPT, stateFromPX, tsatSafe } from './properties';
import type {
  BalanceRow,
  BalanceValues,
  EquipmentBalance,
  Evidence,
  Finding,
  FindingKind,
  InstrumentResult,
  PointValues,
  ReconciliationOutput,
  RoundAnalysis,
  RoundContext,
  RoundReading,
  StatePointResult,
  VariableResult,
} from './types';
import { FINDING_KINDS } from './types';
import { validateModel } from './validate';
import { messages } from './messages';
import { ATTEND, NOTE, severityForCriticality, type Level } from './severity';

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

const fin = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x);
const orNull = (x: number | null | undefined): number | null => (fin(x) ? x : null);

interface Options {
  confidence: number;
  stuckRounds: number;
  barometricSigmaPa: number;
  coverage: number;
  maxIterations: number;
  tolerance: number;
}

function checkContext(context: RoundContext): Options {
  if (!context || typeof context !== 'object') throw new CycleError('INVALID_CONTEXT', 'analyseRound needs a context { barometricPa, … }');
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
    throw new CycleError('INVALID_CONTEXT', `context.options.${field} is ${String(value)}; it must be ${limit}`, { field, value });
  };
  if (!fin(opt.confidence) || opt.confidence <= 0 || opt.confidence >= 1) bad('confidence', opt.confidence, 'in (0, 1)');
  if (!Number.isInteger(opt.stuckRounds) || opt.stuckRounds < 3) bad('stuckRounds', opt.stuckRounds, 'a whole number ≥ 3');
  if (!fin(opt.barometricSigmaPa) || opt.barometricSigmaPa < 0) bad('barometricSigmaPa', opt.barometricSigmaPa, 'a finite number ≥ 0 (Pa)');
  if (!fin(opt.coverage) || opt.coverage <= 0) bad('coverage', opt.coverage, 'a finite number > 0');
  if (!Number.isInteger(opt.maxIterations) || opt.maxIterations < 1) bad('maxIterations', opt.maxIterations, 'a whole number ≥ 1');
  if (!fin(opt.tolerance) || opt.tolerance <= 0) bad('tolerance', opt.tolerance, 'a finite number > 0 (σ units)');
  if (context.previousRounds !== undefined && !Array.isArray(context.previousRounds)) {
    throw new CycleError('INVALID_CONTEXT', 'context.previousRounds must be an array of { readings } (oldest first)', { field: 'previousRounds' });
  }
  return opt;
}

// ---------------------------------------------------------------------------------------------
// small helpers

interface Combined {
  v: number;
  s: number;
}

/** Inverse-variance mean of readings. */
function combine(list: { value: number; sigma: number }[]): Combined | null {
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
  const n = i.quantity === 'pressure' ? nominal?.p : i.quantity === 'temperature' ? nominal?.T : i.quantity === 'massFlow' ? nominal?.m : undefined;
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

function shownOf(i: Instrument): Shown {
  return { quantity: i.quantity, unit: i.unit as Unit, ...(i.pressureReference ? { reference: i.pressureReference as PressureRef } : {}) };
}

/** The instrument's own-reference value of an absolute SI reading (Pa gauge / vacuum / absolute; others unchanged). */
function ownReference(i: Instrument, si: number, b: number): number {
  if (i.quantity !== 'pressure') return si;
  if (i.pressureReference === 'gauge') return si - b;
  if (i.pressureReference === 'vacuum') return b - si;
  return si;
}

function fromOwnReference(i: Instrument, own: number, b: number): number {
  if (i.quantity !== 'pressure') return own;
  if (i.pressureReference === 'gauge') return own + b;
  if (i.pressureReference === 'vacuum') return b - own;
  return own;
}

/** "0–100 bar(g)", "0–25 kPa(a)", "0–150 °C": the scale as printed on the face */
function rangeText(i: Instrument): string {
  const unit = i.unit as Unit;
  const conv = (x: number) => (i.quantity === 'pressure' ? fromSIDelta('pressure', x, unit) : fromSI(i.quantity, x, unit));
  const n = (x: number) => String(Number(x.toPrecision(6)));
  try {
    return `${n(conv(i.range.min))}–${n(conv(i.range.max))} ${unitLabel(unit, i.pressureReference as PressureRef | undefined)}`;
  } catch {
    return `${n(i.range.min)}–${n(i.range.max)} (SI)`;
  }
}

function joinNames(names: string[]): string {
  if (names.length <= 1) return names.join('');
  return `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
}

/** code-unit order: the same on every JavaScript engine (no locale) */
const cmp = (a: string, c: string) => (a < c ? -1 : a > c ? 1 : 0);

/** lower-case the first letter unless the word is an acronym ("Deaerator" → "deaerator", "LP heater" stays) */
const lcFirst = (t: string) => (t.length > 1 && t[1] === t[1].toLowerCase() ? t[0].toLowerCase() + t.slice(1) : t);

const KIND_ORDER = new Map<FindingKind, number>(FINDING_KINDS.map((k, i) => [k, i]));

// ---------------------------------------------------------------------------------------------

interface Intake {
  inst: Instrument;
  value: number;
  sigma: number;
}

interface PState extends FigureState {
  sp: number | null;
  sT: number | null;
  sh: number | null;
  sm: number | null;
  sx: number | null;
}

const EMPTY: PState = { p: null, T: null, h: null, s: null, x: null, m: null, phase: null, sp: null, sT: null, sh: null, sm: null, sx: null };

/** (measured − reconciled)/σ(correction) of a measurement in the reconciliation with the suspects removed; null where not tested. */
function signedFinal(res: ReconcileResult, tag: string): number | null {
  const z = res.final.z[tag];
  const c = res.final.corrections[tag];
  if (z === null || z === undefined || !fin(z) || !fin(c)) return null;
  return c > 0 ? -z : z;
}

/** Pairs of tested measurements whose corrections correlate by |ρ| ≥ EXPLAINED_CORRELATION (shared/cycle/evidence.ts), ρ to 4 places. */
function correlatedPairs(res: ReconcileResult): CorrelatedPair[] {
  const cov = res.correctionCovariance;
  const tested = cov.ids.filter((id) => res.z[id] !== null && res.z[id] !== undefined);
  const out: CorrelatedPair[] = [];
  for (let x = 0; x < tested.length; x++) {
    for (let y = x + 1; y < tested.length; y++) {
      const rho = correlationIn(cov, tested[x], tested[y]);
      if (rho !== null && Math.abs(rho) >= EXPLAINED_CORRELATION) out.push({ a: tested[x], b: tested[y], rho: Math.round(rho * 1e4) / 1e4 });
    }
  }
  return out;
}

/** Analyses one round. Throws CycleError only for a broken model or context; everything about the readings becomes a finding. */
export function analyseRound(modelIn: unknown, readings: readonly RoundReading[], context: RoundContext): RoundAnalysis {
  const v = validateModel(modelIn);
  if (!v.ok) {
    const first = v.errors[0];
    throw new CycleError(
      'INVALID_MODEL',
      `the cycle model is invalid: ${first.path}: ${first.message}${v.errors.length > 1 ? ` (and ${v.errors.length - 1} more)` : ''}`,
      { errors: v.errors },
    );
  }
  const model = v.model;
  const opt = checkContext(context);
  if (!Array.isArray(readings)) throw new CycleError('INVALID_READINGS', 'readings must be an array of { instrumentTag, valueSI, sigma? }');
  const b = context.barometricPa;
  const k = opt.coverage;

  const findings: Finding[] = [];
  const instByTag = new Map(model.instruments.map((i) => [i.tag, i]));
  const instById = new Map(model.instruments.filter((i) => i.id !== undefined).map((i) => [i.id!, i]));
  const eqById = new Map(model.equipment.map((e) => [e.id, e]));
  const pointById = new Map(model.points.map((p) => [p.id, p]));
  const idsOf = (tags: string[]) => tags.map((t) => instByTag.get(t)?.id).filter((x): x is string => x !== undefined);
  const add = (kind: FindingKind, severity: Level, tags: string[], message: string, evidence: Evidence, where: { equipmentId?: string; pointId?: string } = {}) => {
    findings.push({ kind, severity, instrumentTags: tags, instrumentIds: idsOf(tags), ...where, message, evidence });
  };
  const placeOf = (i: Instrument): { equipmentId?: string; pointId?: string } => (i.point ? { pointId: i.point } : { equipmentId: i.equipment });
  const placeLabel = (i: Instrument) => (i.point ? pointById.get(i.point)!.label : eqById.get(i.equipment!)!.label);

  // equipment criticality around each point
  const critAtPoint = new Map<string, number>();
  for (const e of model.equipment) {
    for (const u of portUses(e)) critAtPoint.set(u.point, Math.max(critAtPoint.get(u.point) ?? 1, e.criticality));
  }
  const critOf = (i: Instrument) => (i.point ? (critAtPoint.get(i.point) ?? 1) : (eqById.get(i.equipment!)?.criticality ?? 1));

  // ---------------------------------------------------------------- 1. intake
  const resolve = (r: RoundReading): Instrument | undefined =>
    (typeof r?.instrumentTag === 'string' ? instByTag.get(r.instrumentTag) : undefined) ??
    (typeof r?.instrumentId === 'string' ? instById.get(r.instrumentId) : undefined);

  const valid = new Map<string, RoundReading[]>();
  const invalid = new Set<string>();
  for (const r of readings) {
    const inst = resolve(r);
    if (!inst) {
      const name = String(r?.instrumentTag ?? r?.instrumentId ?? '(none)');
      add('unknown-instrument', NOTE, [], `A reading names instrument ${name}, which this unit does not have; it was left out.`, {
        instrument: name,
        value: fin(r?.valueSI) ? r.valueSI : null,
      });
      continue;
    }
    if (!fin(r.valueSI)) {
      add('invalid-reading', ATTEND, [inst.tag], `${inst.tag}: the reading ${String(r.valueSI)} is not a number; it was left out.`, { value: String(r.valueSI) }, placeOf(inst));
      invalid.add(inst.tag);
      continue;
    }
    valid.set(inst.tag, [...(valid.get(inst.tag) ?? []), r]);
  }

  const specSigma = (i: Instrument): number | null => specSigmaOf(model, i, b);
  const baroSigma = (i: Instrument) => (i.quantity === 'pressure' && i.pressureReference !== 'absolute' ? opt.barometricSigmaPa : 0);

  const accepted = new Map<string, Intake>();
  const excluded = new Set<string>();
  const readingSigma = new Map<string, number>();
  for (const inst of model.instruments) {
    const list = valid.get(inst.tag);
    if (!list) continue;
    const r = list[list.length - 1];
    if (list.length > 1) {
      add(
        'duplicate-reading',
        NOTE,
        [inst.tag],
        `${inst.tag} was read ${list.length} times in this round; the last reading was used.`,
        { values: list.map((x) => x.valueSI) },
        placeOf(inst),
      );
    }
    const value = r.valueSI;
    const shown = shownOf(inst);
    // σ
    let sigma: number | null = null;
    if (r.sigma !== undefined) {
      if (fin(r.sigma) && r.sigma > 0) sigma = r.sigma;
      else {
        add('invalid-reading', NOTE, [inst.tag], `${inst.tag}: the uncertainty given with the reading (${String(r.sigma)}) is not a positive number; the instrument's accuracy was used.`, { sigma: String(r.sigma) }, placeOf(inst));
      }
    }
    if (sigma === null) {
      const s = specSigma(inst);
      if (s === null || !(s > 0)) {
        excluded.add(inst.tag);
        add('invalid-reading', ATTEND, [inst.tag], `${inst.tag}: its accuracy specification gives no uncertainty for this reading; it was left out.`, { value }, placeOf(inst));
        continue;
      }
      sigma = Math.sqrt(s * s + baroSigma(inst) ** 2);
    }
    readingSigma.set(inst.tag, sigma);
    // range
    const own = ownReference(inst, value, b);
    if (own < inst.range.min || own > inst.range.max) {
      add(
        'out-of-range',
        ATTEND,
        [inst.tag],
        `${inst.tag} reads ${showValue(shown, value, b, sigma)}, ${own < inst.range.min ? 'below' : 'above'} its range ${rangeText(inst)}: check the reading, the instrument or its range.`,
        { value, ownReference: own, rangeMin: inst.range.min, rangeMax: inst.range.max },
        placeOf(inst),
      );
    }
    // IF97
    if (inst.quantity === 'pressure' || inst.quantity === 'temperature') {
      let why: string | null = null;
      if (inst.quantity === 'pressure' && value < P_LOW) why = `below ${P_LOW.toFixed(1)} Pa absolute, the triple-point pressure where the steam tables stop`;
      if (inst.quantity === 'pressure' && value > P_MAX) why = 'above 100 MPa absolute, the top of IAPWS-IF97';
      if (inst.quantity === 'temperature' && value < 273.15) why = 'below 0 °C, the bottom of IAPWS-IF97';
      if (inst.quantity === 'temperature' && value > T_MAX_5) why = 'above 2000 °C, the top of IAPWS-IF97';
      if (why) {
        excluded.add(inst.tag);
        add(
          'outside-if97',
          2,
          [inst.tag],
          `${inst.tag} reads ${showValue(shown, value, b, sigma)}, ${why}; it was left out of the balances.`,
          { value },
          placeOf(inst),
        );
        continue;
      }
    }
    accepted.set(inst.tag, { inst, value, sigma });
  }
  for (const inst of model.instruments) {
    if (accepted.has(inst.tag) || excluded.has(inst.tag) || invalid.has(inst.tag)) continue;
    add('missing-reading', NOTE, [inst.tag], `${inst.tag} (${inst.label ?? placeLabel(inst)}) was not read in this round.`, {}, placeOf(inst));
  }

  // ---------------------------------------------------------------- 2. equations and reconciliation
  const acc = new Map<string, AcceptedReading>([...accepted].map(([t, r]) => [t, { tag: t, value: r.value, sigma: r.sigma }]));
  const eq: EquationSystem = buildEquations(model, acc);
  let res: ReconcileResult | null = null;
  let recError: { code: string; message: string } | null = null;
  if (eq.measured.length === 0 || eq.constraints.length === 0) {
    recError = { code: 'NO_DATA', message: 'no reading of this round enters a balance: nothing to reconcile' };
  } else {
    try {
      // the barometric pressure is one common input of every gauge and vacuum reading: their errors
      // share its variance σ_b² (gauge: p = p_g + b; vacuum: p = b − p_v; both ∂p/∂b = 1; GUM §5.2)
      const sb2 = opt.barometricSigmaPa ** 2;
      const correlations: Correlation[] = [];
      if (sb2 > 0) {
        const onBaro = eq.measured.filter((m) => accepted.has(m.id) && baroSigma(accepted.get(m.id)!.inst) > 0);
        for (let x = 0; x < onBaro.length; x++) {
          for (let y = x + 1; y < onBaro.length; y++) correlations.push({ a: onBaro[x].id, b: onBaro[y].id, rho: sb2 / (onBaro[x].sigma * onBaro[y].sigma) });
        }
      }
      res = reconcile({
        correlations,
        measured: eq.measured,
        unmeasured: eq.unmeasured,
        constraints: eq.constraints,
        confidence: opt.confidence,
        maxIterations: opt.maxIterations,
        tolerance: opt.tolerance,
      });
    } catch (e) {
      const code = e && typeof e === 'object' && 'code' in e ? String((e as { code: unknown }).code) : 'ERROR';
      recError = { code, message: e instanceof Error ? e.message : String(e) };
    }
  }
  if (recError) {
    add(
      'reconciliation-failed',
      recError.code === 'NOT_REDUNDANT' || recError.code === 'NO_DATA' ? NOTE : ATTEND,
      [],
      recError.code === 'NOT_REDUNDANT' || recError.code === 'NO_DATA'
        ? `The readings of this round do not over-determine any balance, so none can be checked (${recError.message}).`
        : `The balances could not be reconciled for this round: ${recError.message}.`,
      { code: recError.code },
    );
  }
  const scaleOf = (id: string) => SCALE[eq.vars[id]?.kind ?? 'T'];
  const suspects = new Set(res?.suspects ?? []);
  /** final (suspects removed) value of a variable, SI; readings in no balance keep their value */
  const recV = (id: string): number | null => {
    if (res && id in res.final.values) return res.final.values[id] * scaleOf(id);
    if (eq.notInBalance.includes(id)) return accepted.get(id)?.value ?? null;
    return null;
  };
  const recS = (id: string): number | null => {
    if (res && id in res.final.sigmas) return res.final.sigmas[id] * scaleOf(id);
    if (eq.notInBalance.includes(id)) return accepted.get(id)?.sigma ?? null;
    return null;
  };

  // ---------------------------------------------------------------- 3. states
  /** an enthalpy expression at the final values (J/kg), null where a variable it reads is not determined */
  const evalFinal = (e: HExpr): number | null => {
    if (!res) return null;
    const fv = res.final.values;
    for (const d of e.deps) if (!fin(fv[d])) return null;
    const h = e.value(fv) * SCALE.h;
    return fin(h) ? h : null;
  };
  const measuredOf = (tags: string[]) => combine(tags.filter((t) => accepted.has(t)).map((t) => accepted.get(t)!));
  const recState = new Map<string, PState>();
  const measState = new Map<string, PState>();
  for (const pt of model.points) {
    const r = eq.points[pt.id];
    const sat = pt.phase === 'saturated-liquid' || pt.phase === 'saturated-vapour' || pt.phase === 'two-phase';
    // reconciled
    {
      const p = 'var' in r.p ? recV(r.p.var) : r.p.value * SCALE.p;
      const sp = 'var' in r.p ? recS(r.p.var) : null;
      let T: number | null = null;
      let sT: number | null = null;
      if (sat) T = fin(p) ? tsatSafe(p) : null;
      else if (r.T && 'var' in r.T) {
        T = recV(r.T.var);
        sT = recS(r.T.var);
      }
      const hx = r.h ?? (eq.hGroups[r.hGroup]?.h ?? null);
      let h: number | null = hx ? evalFinal(hx) : null;
      const hv = eq.hGroups[r.hGroup] && !eq.hGroups[r.hGroup].rep ? `h@${r.hGroup}` : null;
      const sh = !r.h && hv ? recS(hv) : null;
      if (h === null && fin(p)) {
        if (pt.phase === 'saturated-liquid') h = propsSat(p).hf;
        else if (pt.phase === 'saturated-vapour') h = propsSat(p).hg;
        else if (!sat && fin(T)) h = stateFromPT(p, T)?.h ?? null;
      }
      const st = fin(p) && fin(h) ? stateFromPH(p, h) : null;
      let x: number | null = r.x ? recV(r.x) : null;
      const sx = r.x ? recS(r.x) : null;
      if (x === null) x = pt.phase === 'saturated-liquid' ? 0 : pt.phase === 'saturated-vapour' ? 1 : (st?.x ?? null);
      if (T === null && st) T = st.T;
      const m = r.m ? recV(r.m) : null;
      const sm = r.m ? recS(r.m) : null;
      recState.set(pt.id, { p: orNull(p), T: orNull(T), h: orNull(h), s: orNull(st?.s), x: orNull(x), m: orNull(m), phase: st?.phase ?? null, sp: orNull(sp), sT: orNull(sT), sh: orNull(sh), sm: orNull(sm), sx: orNull(sx) });
    }
  }
  for (const pt of model.points) {
    const r = eq.points[pt.id];
    const sat = pt.phase === 'saturated-liquid' || pt.phase === 'saturated-vapour' || pt.phase === 'two-phase';
    let pm: Combined | null = null;
    if ('var' in r.p) {
      const src = eq.vars[r.p.var];
      if (src?.measured && src.pointId) pm = measuredOf(eq.points[src.pointId].tags.p);
    } else pm = { v: r.p.value * SCALE.p, s: 0 };
    const Tm = measuredOf(r.tags.T);
    let T = Tm?.v ?? null;
    const sT = Tm?.s ?? null;
    let h: number | null = null;
    let sh: number | null = null;
    let st: ReturnType<typeof stateFromPT> = null;
    if (pm) {
      const dp = Math.max(pm.v * 1e-6, 1e-3);
      if (sat) {
        if (T === null) T = tsatSafe(pm.v);
        if (pt.phase !== 'two-phase') {
          const liq = pt.phase === 'saturated-liquid';
          st = stateFromPX(pm.v, liq ? 0 : 1);
          const d = ((liq ? propsSat(pm.v + dp).hf - propsSat(pm.v - dp).hf : propsSat(pm.v + dp).hg - propsSat(pm.v - dp).hg) / (2 * dp));
          h = st?.h ?? null;
          sh = Math.abs(d) * pm.s;
        }
      } else if (Tm) {
        st = stateFromPT(pm.v, Tm.v);
        h = st?.h ?? null;
        const a = propsPT(pm.v, Tm.v, pt.phase);
        const d = (propsPT(pm.v + dp, Tm.v, pt.phase).h - propsPT(pm.v - dp, Tm.v, pt.phase).h) / (2 * dp);
        sh = Math.sqrt((a.cp * Tm.s) ** 2 + (d * pm.s) ** 2);
      }
    }
    const mm = measuredOf(r.tags.m);
    measState.set(pt.id, {
      p: orNull(pm?.v),
      T: orNull(T),
      h: orNull(h),
      s: orNull(st?.s),
      x: orNull(st?.x ?? (pt.phase === 'saturated-liquid' ? 0 : pt.phase === 'saturated-vapour' ? 1 : null)),
      m: orNull(mm?.v),
      phase: st?.phase ?? null,
      sp: orNull(pm?.s),
      sT: orNull(sT),
      sh: orNull(sh),
      sm: orNull(mm?.s),
      sx: null,
    });
  }
  const getRec = (id: string): PState => recState.get(id) ?? EMPTY;
  const getMeas = (id: string): PState => measState.get(id) ?? EMPTY;
  /** measured where measured, else reconciled (for the balance report) */
  const getMixed = (id: string): PState => {
    const m = getMeas(id);
    const r = getRec(id);
    return {
      ...r,
      m: m.m ?? r.m,
      sm: m.m !== null ? m.sm : r.sm,
      h: m.h ?? r.h,
      sh: m.h !== null ? m.sh : r.sh,
    };
  };
  const powerTags: Record<string, string[]> = {};
  for (const i of model.instruments) if (i.quantity === 'power' && accepted.has(i.tag)) (powerTags[i.equipment!] ??= []).push(i.tag);
  const measPower = (gid: string) => measuredOf(powerTags[gid] ?? [])?.v ?? null;
  const recPower = (gid: string) => {
    const t = powerTags[gid];
    return t && t.length ? recV(t[0]) : null;
  };

  const statePoints: StatePointResult[] = model.points.map((pt) => {
    const r = eq.points[pt.id];
    const rec = getRec(pt.id);
    const meas = getMeas(pt.id);
    const vals = (s: PState): PointValues => ({ p: s.p, T: s.T, h: s.h, s: s.s, x: s.x, m: s.m, phase: (s.phase as SteamPhase | null) ?? null });
    return {
      id: pt.id,
      label: pt.label,
      expectedPhase: pt.phase,
      circuit: pt.circuit ?? 'cycle',
      pressureSource: r.pressureSource,
      ...(r.pressureFrom ? { pressureFrom: r.pressureFrom } : {}),
      measured: vals(meas),
      reconciled: vals(rec),
      sigmas: { p: rec.sp, T: rec.sT, h: rec.sh, x: rec.sx, m: rec.sm },
    };
  });

  // ---------------------------------------------------------------- balances
  // every balance of the model is reported (those one stream or one enthalpy makes hold by construction too)
  const activeSpecs = eq.balances.filter((s) => s.kind !== 'power' || s.tags.length > 0);
  const rowValues = (spec: BalanceSpec, get: (id: string) => PState): { v: BalanceValues; sigma: number } | null => {
    const sq = (x: number) => x * x;
    const mk = (i: number, o: number): BalanceValues => {
      const den = Math.max(Math.abs(i), Math.abs(o));
      return { in: i, out: o, residual: i - o, relative: den > 0 ? (i - o) / den : null };
    };
    if (spec.kind === 'mass') {
      let i = 0;
      let o = 0;
      let s2 = 0;
      for (const p of spec.ins) {
        const st = get(p);
        if (!fin(st.m)) return null;
        i += st.m;
        s2 += sq(st.sm ?? 0);
      }
      for (const p of spec.outs) {
        const st = get(p);
        if (!fin(st.m)) return null;
        o += st.m;
        s2 += sq(st.sm ?? 0);
      }
      return { v: mk(i, o), sigma: Math.sqrt(s2) };
    }
    if (spec.kind === 'enthalpy') {
      const a = get(spec.from);
      const c = get(spec.to);
      if (!fin(a.h) || !fin(c.h)) return null;
      return { v: mk(a.h, c.h), sigma: Math.sqrt(sq(a.sh ?? 0) + sq(c.sh ?? 0)) };
    }
    const flowSum = (pts: string[]) => {
      let s = 0;
      let s2 = 0;
      for (const p of pts) {
        const st = get(p);
        if (!fin(st.m) || !fin(st.h)) return null;
        s += st.m * st.h;
        s2 += sq(st.h * (st.sm ?? 0)) + sq(st.m * (st.sh ?? 0));
      }
      return { s, s2 };
    };
    if (spec.kind === 'energy') {
      const i = flowSum(spec.ins);
      const o = flowSum(spec.outs);
      if (!i || !o) return null;
      return { v: mk(i.s, o.s), sigma: Math.sqrt(i.s2 + o.s2) };
    }
    if (spec.kind === 'duty') {
      const i = flowSum(spec.ins);
      const o = flowSum(spec.outs);
      const ci = get(spec.coolingIn!);
      const co = get(spec.coolingOut!);
      const mcw = fin(ci.m) ? ci.m : co.m;
      const smcw = fin(ci.m) ? ci.sm : co.sm;
      if (!i || !o || !fin(mcw) || !fin(ci.h) || !fin(co.h)) return null;
      const dh = co.h - ci.h;
      const s2 = i.s2 + o.s2 + sq(dh * (smcw ?? 0)) + sq(mcw * (ci.sh ?? 0)) + sq(mcw * (co.sh ?? 0));
      return { v: mk(i.s - o.s, mcw * dh), sigma: Math.sqrt(s2) };
    }
    if (spec.kind !== 'power') return null;
    let work = 0;
    let s2 = 0;
    for (const sec of spec.sections) {
      const i = flowSum(sec.ins);
      const o = flowSum(sec.outs);
      if (!i || !o) return null;
      work += i.s - o.s;
      s2 += i.s2 + o.s2;
    }
    const pMeasured = get === getRec ? recPower(spec.equipmentId) : measuredOf(spec.tags);
    const pv = typeof pMeasured === 'number' ? pMeasured : pMeasured?.v;
    if (!fin(pv)) return null;
    const sP = get === getRec ? 0 : (measuredOf(spec.tags)?.s ?? 0);
    return { v: mk(spec.efficiency * work, pv), sigma: Math.sqrt(spec.efficiency ** 2 * s2 + sP * sP) };
  };
  const rowsBySpec = new Map<string, BalanceRow>();
  for (const spec of activeSpecs) {
    const m = rowValues(spec, getMixed);
    const r = res ? rowValues(spec, getRec) : null;
    rowsBySpec.set(spec.id, {
      id: spec.id,
      kind: spec.kind,
      label: spec.label,
      unit: spec.kind === 'mass' ? 'kg/s' : spec.kind === 'enthalpy' ? 'J/kg' : 'W',
      measured: m ? m.v : null,
      reconciled: r ? r.v : null,
      measuredSigma: m && m.sigma > 0 ? m.sigma : null,
    });
  }
  const balances: EquipmentBalance[] = model.equipment.map((e) => ({
    equipmentId: e.id,
    kind: e.kind,
    label: e.label,
    rows: activeSpecs.filter((s) => s.equipmentId === e.id).map((s) => rowsBySpec.get(s.id)!),
  }));

  // ---------------------------------------------------------------- performance
  // measured basis: pressures, temperatures and enthalpies as read; a flow nobody reads from the reconciliation
  const getMeasFlows = (id: string): PState => {
    const m = getMeas(id);
    return m.m !== null ? m : { ...m, m: getRec(id).m, sm: getRec(id).sm };
  };
  const performance = performanceFigures(model, getRec, recPower, getMeasFlows, measPower);

  // ---------------------------------------------------------------- 4. findings
  const constraintsOf = new Map<string, string[]>();
  for (const ci of Object.values(eq.info)) for (const d of ci.deps) constraintsOf.set(d, [...(constraintsOf.get(d) ?? []), ci.id]);
  /** what an instrument is held against, in words: "its twin TI-102B and the generator balance" */
  const contextFor = (i: Instrument): { phrase: string; plural: boolean } => {
    const equipmentNames: string[] = [];
    const saturation: string[] = [];
    const partners: string[] = [];
    const pushU = (list: string[], x: string) => {
      if (!list.includes(x)) list.push(x);
    };
    const visit = (cid: string, depth: number) => {
      const ci = eq.info[cid];
      if (ci.kind === 'twin' && depth > 0) return;
      if (ci.kind === 'saturation') pushU(saturation, pointById.get(ci.pointId!)!.label);
      else if (ci.kind === 'twin' || ci.kind === 'stream') {
        const other = ci.deps.find((d) => d !== i.tag);
        if (other && !suspects.has(other)) {
          pushU(partners, other);
          // what holds the partner holds this one too
          if (depth === 0) for (const c of constraintsOf.get(other) ?? []) if (c !== cid) visit(c, 1);
        }
      } else if (ci.equipmentId) pushU(equipmentNames, eqById.get(ci.equipmentId)!.label);
    };
    for (const c of constraintsOf.get(i.tag) ?? []) visit(c, 0);
    const parts: string[] = [];
    const twin = partners.filter((t) => t === i.twin);
    const rest = partners.filter((t) => t !== i.twin);
    if (twin.length) parts.push(`its twin ${twin[0]}`);
    if (rest.length) parts.push(`${joinNames(rest)} on the same ${i.quantity === 'massFlow' ? 'stream' : 'point'}`);
    // a splitter or valve only passes the enthalpy on: name it when nothing else holds the reading
    const throughOnly = new Set(model.equipment.filter((e) => e.kind === 'splitter' || e.kind === 'throttle').map((e) => e.label));
    const real = equipmentNames.filter((n) => !throughOnly.has(n));
    const names = (real.length ? real : equipmentNames).map(lcFirst);
    if (names.length === 1) parts.push(`the ${names[0]} balance`);
    else if (names.length > 1) parts.push(`the ${names.length > 2 ? `${names.slice(0, 2).join(', ')} and other` : joinNames(names)} balances`);
    if (saturation.length) parts.push(`saturation at ${joinNames(saturation.map(lcFirst))}`);
    if (parts.length === 0) return { phrase: 'the rest of the readings', plural: true };
    return { phrase: joinNames(parts), plural: parts.length > 1 || names.length > 1 };
  };

  // gross errors
  if (res) {
    const zc = res.zCritical;
    for (const tag of res.suspects) {
      const inst = instByTag.get(tag)!;
      const reading = accepted.get(tag)!;
      const sc = scaleOf(tag);
      const z = res.z[tag] ?? null;
      const est = tag in res.final.values ? res.final.values[tag] * sc : null;
      const estS = tag in res.final.sigmas ? res.final.sigmas[tag] * sc : null;
      const group = res.suspectGroups[res.suspects.indexOf(tag)] ?? [tag];
      const alike = group.filter((t) => t !== tag && !suspects.has(t));
      const shown = shownOf(inst);
      const ctx = contextFor(inst);
      const who = alike.length ? `${[tag, ...alike].join(' or ')} (the balances cannot tell which)` : tag;
      let message: string;
      const evidence: Evidence = {
        reading: reading.value,
        sigma: reading.sigma,
        z,
        zCritical: zc,
        correction: (res.corrections[tag] ?? 0) * sc,
        estimate: est,
        estimateSigma: estS,
        coverage: k,
        chiSquare: res.chiSquare,
        chiSquareCritical: res.critical,
        dof: res.dof,
        alsoSuspect: alike,
      };
      if (est !== null && estS !== null) {
        const d = reading.value - est;
        const dOwn = inst.quantity === 'pressure' && inst.pressureReference === 'vacuum' ? -d : d;
        message = `${who} reads ${showDelta(shown, Math.abs(d), k * estS)} ${dOwn > 0 ? 'above' : 'below'} what ${ctx.phrase} allow${ctx.plural ? '' : 's'} (${showWithSpread(shown, est, k * estS, b)}).`;
        evidence.difference = d;
      } else {
        message = `${who} disagrees with ${ctx.phrase} (test value ${z === null ? '—' : z.toFixed(1)} against ${zc.toFixed(2)}); without it the rest of the plant cannot say what it should read.`;
      }
      add('gross-error', severityForCriticality(critOf(inst)), [tag, ...alike], message, evidence, placeOf(inst));
      // read as absolute / as gauge
      if (inst.quantity === 'pressure' && est !== null && estS !== null) {
        const U = k * Math.sqrt(estS * estS + reading.sigma * reading.sigma);
        const d = est - reading.value;
        const unit = inst.unit as Unit;
        if (inst.pressureReference === 'gauge' && Math.abs(d - b) <= U) {
          add(
            'gauge-read-as-absolute',
            ATTEND,
            [tag],
            `${tag} looks read as absolute: it reads ${showKPa(d)} below what ${ctx.phrase} allow${ctx.plural ? '' : 's'} (${showValue(shown, est, b, k * estS)}), which is the barometric pressure of this round (${showKPa(b)}). A ${unit}(g) value was probably entered as ${unit}(a).`,
            { reading: reading.value, estimate: est, difference: d, barometricPa: b, allowed: U, coverage: k },
            placeOf(inst),
          );
        } else if (inst.pressureReference === 'absolute' && Math.abs(-d - b) <= U) {
          add(
            'absolute-read-as-gauge',
            ATTEND,
            [tag],
            `${tag} looks read as gauge: it reads ${showKPa(-d)} above what ${ctx.phrase} allow${ctx.plural ? '' : 's'} (${showValue(shown, est, b, k * estS)}), which is the barometric pressure of this round (${showKPa(b)}). A ${unit}(a) value was probably entered as ${unit}(g).`,
            { reading: reading.value, estimate: est, difference: d, barometricPa: b, allowed: U, coverage: k },
            placeOf(inst),
          );
        } else if (inst.pressureReference === 'vacuum' && Math.abs(reading.value - (b - est)) <= U) {
          add(
            'gauge-read-as-absolute',
            ATTEND,
            [tag],
            `${tag} looks like a vacuum reading entered as absolute: its ${showKPa(reading.value)} is the vacuum the balances allow (${showValue(shown, est, b, k * estS)}), not the absolute pressure (${showKPa(est)} absolute). A ${unit} vac value was probably entered as ${unit}(a).`,
            { reading: reading.value, estimate: est, barometricPa: b, allowed: U, coverage: k },
            placeOf(inst),
          );
        }
      }
    }
  }

  // Twins and saturated points are constraints of the reconciliation: a disagreement between two
  // twins or between p and T at saturation is tested there once, by the global and the individual
  // tests above, and a suspect's message names the twin or the saturation that holds it
  // (contextFor). The phone's prompts at the gauge (shared/checks) stay liberal: they ask for a
  // re-read, they are not findings.

  // declared phase (a superheated or subcooled point): not a constraint of the reconciliation
  for (const pt of model.points) {
    const r = eq.points[pt.id];
    if (!('var' in r.p)) continue;
    const src = eq.vars[r.p.var];
    if (!src?.measured || !src.pointId) continue;
    const pTags = eq.points[src.pointId].tags.p.filter((t) => accepted.has(t));
    const pm = measuredOf(pTags);
    const Tm = measuredOf(r.tags.T);
    if (!pm || !Tm) continue;
    const spread = (tags: string[]) => {
      const xs = tags.filter((t) => accepted.has(t)).map((t) => accepted.get(t)!);
      for (let a = 0; a < xs.length; a++) for (let c = a + 1; c < xs.length; c++) if (Math.abs(xs[a].value - xs[c].value) > k * Math.hypot(xs[a].sigma, xs[c].sigma)) return true;
      return false;
    };
    if (spread(pTags) || spread(r.tags.T)) continue; // the twin finding speaks first
    const sat = pt.phase === 'saturated-liquid' || pt.phase === 'saturated-vapour' || pt.phase === 'two-phase';
    if (pm.v >= 22.064e6) continue;
    const Ts = tsatSafe(pm.v);
    const dp = Math.max(pm.v * 1e-6, 1e-3);
    const dTs = (tsatSafe(pm.v + dp) - tsatSafe(pm.v - dp)) / (2 * dp);
    const U = k * Math.hypot(Tm.s, dTs * pm.s);
    const dT = Tm.v - Ts;
    const tT = r.tags.T.filter((t) => accepted.has(t));
    const tP = pTags;
    const tempInst = instByTag.get(tT[0])!;
    const pInst = instByTag.get(tP[0])!;
    const sT = shownOf(tempInst);
    const pShown = showValue(shownOf(pInst), pm.v, b, pm.s);
    if (!sat && ((pt.phase === 'vapour' && dT < -U) || (pt.phase === 'liquid' && dT > U))) {
      const vap = pt.phase === 'vapour';
      add(
        'phase-mismatch',
        ATTEND,
        [...tT, ...tP],
        `At ${lcFirst(pt.label)}, expected ${vap ? 'superheated steam' : 'water below boiling'}, ${joinNames(tT)} read${tT.length > 1 ? '' : 's'} ${showValue(sT, Tm.v, b, U)}, ${showDelta(sT, Math.abs(dT), U)} ${vap ? 'below' : 'above'} the saturation temperature ${showValue(sT, Ts, b, U)} at ${pShown}: one of them is wrong, or the ${vap ? 'steam is wet' : 'water is flashing'}.`,
        { T: Tm.v, p: pm.v, tsat: Ts, difference: dT, allowed: U, coverage: k },
        { pointId: pt.id },
      );
    }
  }

  // stuck values
  const prev = context.previousRounds ?? [];
  if (prev.length >= opt.stuckRounds - 1) {
    const window = prev.slice(prev.length - (opt.stuckRounds - 1));
    const history = window.map((round) => {
      const m = new Map<string, number>();
      for (const r of Array.isArray(round?.readings) ? round.readings : []) {
        const inst = resolve(r);
        if (inst && fin(r.valueSI)) m.set(inst.tag, r.valueSI);
      }
      return m;
    });
    const neighbours = (i: Instrument): string[] => {
      const pts = new Set<string>();
      if (i.point) {
        pts.add(i.point);
        for (const e of model.equipment) {
          const uses = portUses(e);
          if (uses.some((u) => u.point === i.point)) for (const u of uses) pts.add(u.point);
        }
      } else {
        const e = eqById.get(i.equipment!)!;
        const hosts: Equipment[] = e.kind === 'generator' ? e.sections.map((s) => eqById.get(s)!) : [e];
        for (const h of hosts) for (const u of portUses(h)) pts.add(u.point);
      }
      return model.instruments
        .filter((o) => o.tag !== i.tag && ((o.point && pts.has(o.point)) || (o.equipment && o.equipment === i.equipment)))
        .map((o) => o.tag);
    };
    for (const inst of model.instruments) {
      const cur = accepted.get(inst.tag);
      if (!cur) continue;
      const same = history.every((h) => h.has(inst.tag) && Math.abs(h.get(inst.tag)! - cur.value) <= 1e-9 * Math.max(1, Math.abs(cur.value)));
      if (!same) continue;
      const moved: { tag: string; by: number }[] = [];
      for (const n of neighbours(inst)) {
        const nc = accepted.get(n);
        if (!nc || !history.every((h) => h.has(n))) continue;
        const by = Math.max(...history.map((h) => Math.abs(h.get(n)! - nc.value)));
        if (by > nc.sigma) moved.push({ tag: n, by });
      }
      if (moved.length === 0) continue;
      const shown = shownOf(inst);
      const movedText = moved
        .slice(0, 3)
        .map((m) => `${m.tag} by ${showDelta(shownOf(instByTag.get(m.tag)!), m.by, accepted.get(m.tag)!.sigma)}`)
        .join(', ');
      add(
        'stuck-value',
        ATTEND,
        [inst.tag],
        `${inst.tag} has read ${showValue(shown, cur.value, b, cur.sigma)} on the last ${opt.stuckRounds} rounds while its neighbours moved (${movedText}${moved.length > 3 ? ', …' : ''}): the needle or the reading may be stuck.`,
        { value: cur.value, rounds: opt.stuckRounds, neighboursMoved: moved.map((m) => m.tag), movedBy: moved.map((m) => m.by) },
        placeOf(inst),
      );
    }
  }

  // balances that do not close: only when the round as a whole fails its test; where a suspect
  // explains it the finding says so (a note: server/work-orders/from-findings.ts folds it into the
  // suspect's order as evidence), else it is the equipment's own finding
  // (balances that hold by construction — one stream, one enthalpy — only repeat what the gross-error test says)
  if (res && !res.passed) {
    for (const spec of activeSpecs) {
      if (!(spec.id in eq.info)) continue;
      const row = rowsBySpec.get(spec.id)!;
      if (!row.measured || !row.measuredSigma || spec.kind === 'enthalpy') continue;
      const zr = Math.abs(row.measured.residual) / row.measuredSigma;
      if (zr <= k) continue;
      const e = eqById.get(spec.equipmentId)!;
      const unit = row.unit === 'kg/s' ? 'kg/s' : 'W';
      const what = spec.kind === 'mass' ? 'mass balance' : spec.kind === 'power' ? 'turbine work against generator output' : spec.kind === 'duty' ? 'steam-side heat against cooling water' : 'energy balance';
      const rel = row.measured.relative;
      add(
        'balance-not-closed',
        res.suspects.length ? NOTE : severityForCriticality(e.criticality),
        [],
        messages.balanceNotClosed(
          e.label,
          what,
          showSI(row.measured.in, unit),
          showSI(row.measured.out, unit),
          rel === null ? '' : ` (${(Math.abs(rel) * 100).toFixed(1)} % apart)`,
          showSI(k * row.measuredSigma, unit),
          k,
          res.suspects,
        ),
        { in: row.measured.in, out: row.measured.out, residual: row.measured.residual, sigma: row.measuredSigma, coverage: k, kind: spec.kind, explainedBy: [...res.suspects] },
        { equipmentId: e.id },
      );
    }
  }

  findings.sort(
    (a, c) =>
      a.severity - c.severity ||
      KIND_ORDER.get(a.kind)! - KIND_ORDER.get(c.kind)! ||
      cmp(a.instrumentTags[0] ?? '', c.instrumentTags[0] ?? '') ||
      cmp(a.equipmentId ?? a.pointId ?? '', c.equipmentId ?? c.pointId ?? '') ||
      cmp(a.message, c.message),
  );

  // ---------------------------------------------------------------- instruments and reconciliation output
  const redundant = new Set(res?.redundant ?? []);
  const instruments: InstrumentResult[] = model.instruments.map((i) => {
    const a = accepted.get(i.tag);
    const inRec = !!res && i.tag in res.values;
    const sc = fin(SCALE[eq.vars[i.tag]?.kind ?? 'T']) ? scaleOf(i.tag) : 1;
    const status: InstrumentResult['status'] = !a ? (excluded.has(i.tag) ? 'excluded' : 'missing') : eq.notInBalance.includes(i.tag) ? 'not-in-balance' : 'used';
    return {
      tag: i.tag,
      ...(i.id ? { id: i.id } : {}),
      quantity: i.quantity,
      ...(i.point ? { pointId: i.point } : {}),
      ...(i.equipment ? { equipmentId: i.equipment } : {}),
      status,
      reading: a?.value ?? null,
      sigma: a?.sigma ?? readingSigma.get(i.tag) ?? null,
      reconciled: inRec ? res!.values[i.tag] * sc : status === 'not-in-balance' ? a!.value : null,
      reconciledSigma: inRec ? res!.sigmas[i.tag] * sc : status === 'not-in-balance' ? a!.sigma : null,
      correction: inRec ? res!.corrections[i.tag] * sc : status === 'not-in-balance' ? 0 : null,
      z: inRec ? (res!.z[i.tag] ?? null) : null,
      redundant: redundant.has(i.tag),
      suspect: suspects.has(i.tag),
      estimate: a ? recV(i.tag) : null,
      estimateSigma: a ? recS(i.tag) : null,
      u: !res ? null : suspects.has(i.tag) ? (res.eliminatedU[i.tag] ?? null) : signedFinal(res, i.tag),
    };
  });

  let reconciliation: ReconciliationOutput;
  if (!res) reconciliation = { ok: false, error: recError ?? { code: 'ERROR', message: 'no reconciliation' } };
  else {
    const observable = new Set(res.observable);
    const variables: VariableResult[] = Object.values(eq.vars)
      .filter((vi) => !vi.measured || vi.id in res!.values || suspects.has(vi.id))
      .filter((vi) => vi.measured ? eq.measured.some((m) => m.id === vi.id) : true)
      .map((vi) => {
        const sc = SCALE[vi.kind];
        const has = vi.id in res!.values;
        return {
          id: vi.id,
          kind: vi.kind,
          unit: SI_UNIT_OF[vi.kind],
          ...(vi.pointId ? { pointId: vi.pointId } : {}),
          ...(vi.equipmentId ? { equipmentId: vi.equipmentId } : {}),
          ...(vi.instrumentTag ? { instrumentTag: vi.instrumentTag } : {}),
          measured: vi.measured,
          value: has ? res!.values[vi.id] * sc : null,
          sigma: has ? res!.sigmas[vi.id] * sc : null,
          correction: vi.measured && has ? res!.corrections[vi.id] * sc : null,
          z: vi.measured ? (res!.z[vi.id] ?? null) : null,
          finalValue: vi.id in res!.final.values ? res!.final.values[vi.id] * sc : null,
          finalSigma: vi.id in res!.final.sigmas ? res!.final.sigmas[vi.id] * sc : null,
          redundant: redundant.has(vi.id),
          observable: vi.measured || observable.has(vi.id),
        };
      });
    reconciliation = {
      ok: true,
      chiSquare: res.chiSquare,
      dof: res.dof,
      critical: res.critical,
      passed: res.passed,
      zCritical: res.zCritical,
      iterations: res.iterations,
      suspects: [...res.suspects],
      final: { chiSquare: res.final.chiSquare, dof: res.final.dof, critical: res.final.critical, passed: res.final.passed },
      ...(res.eliminationError ? { eliminationError: { ...res.eliminationError } } : {}),
      constraintTests: { ...res.constraintTests },
      correlatedCorrections: correlatedPairs(res),
      variables,
      constraints: eq.constraints.map((c) => {
        const ci = eq.info[c.id];
        return { id: c.id, kind: ci.kind, ...(ci.equipmentId ? { equipmentId: ci.equipmentId } : {}), ...(ci.pointId ? { pointId: ci.pointId } : {}), label: ci.label };
      }),
    };
  }

  return {
    modelId: model.id,
    modelVersion: model.version,
    barometricPa: b,
    statePoints,
    balances,
    performance,
    instruments,
    reconciliation,
    findings,
  };
}
