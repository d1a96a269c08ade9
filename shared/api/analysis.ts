/**
 * Wire schemas of round analyses, instrument health and the analysis job queue. Pure zod.
 * Values are SI absolute (Pa, K, kg/s, W) as everywhere between modules; the app converts.
 *
 *   GET /api/sites/:siteId/rounds/:roundId/analysis          → RoundAnalysisResponse
 *   GET /api/sites/:siteId/instruments?unitId=&status=&q=    → InstrumentListResponse
 *   GET /api/sites/:siteId/instruments/:tag/history?from=&to=&unitId=  → InstrumentHistoryResponse
 *   GET /api/sites/:siteId/analysis-jobs?state=              → AnalysisJobsResponse (admins, engineers)
 *   GET /api/sites/:siteId/exports/readings.csv?from=&to=    → text/csv
 */
import { z } from 'zod';
import type { EquipmentBalance, PerformanceFigure, InstrumentResult, StatePointResult } from '../cycle/types';
import { QUANTITIES } from '../units';
import { InstrumentStatus } from './sync';
import { ReconciliationSummary, WorkOrderRef } from './work-orders';

const arrayOf = <T>() => z.custom<T[]>((v) => Array.isArray(v), { message: 'Must be an array' });

export const FindingView = z.object({
  id: z.uuid(),
  kind: z.string(),
  /** 1 urgent, 2 attend to, 3 note (shared/cycle/severity.ts) */
  severity: z.number().int().min(1).max(3),
  instrumentTags: z.array(z.string()),
  instrumentIds: z.array(z.uuid()),
  equipmentRef: z.string().nullable(),
  pointRef: z.string().nullable(),
  message: z.string(),
  evidence: z.record(z.string(), z.unknown()),
  /** work orders this finding is evidence of */
  workOrders: z.array(WorkOrderRef),
});
export type FindingView = z.infer<typeof FindingView>;

/**
 * Where a reading the analysis used came from: this round (`own`), or another round of the unit
 * (the analysis is unit-level: for instruments the round's route does not read, the latest reading
 * of the unit's other rounds within ROUND_CHECK_WINDOW_HOURS (4 h) is borrowed). `roundId` null on a borrowed reading: its
 * round could not be told again (a later re-take replaced it).
 */
export const ReadingOrigin = z.object({
  tag: z.string(),
  pointId: z.string().nullable(),
  equipmentId: z.string().nullable(),
  own: z.boolean(),
  roundId: z.uuid().nullable(),
  /** the route of the round a borrowed reading came from */
  routeName: z.string().nullable(),
  /** the reading's device time */
  measuredAt: z.iso.datetime().nullable(),
});
export type ReadingOrigin = z.infer<typeof ReadingOrigin>;

export const RoundAnalysisResponse = z.object({
  id: z.uuid(),
  roundId: z.uuid(),
  unitId: z.uuid(),
  analysedAt: z.iso.datetime(),
  inputHash: z.string(),
  /** the unit's model version the analysis ran on */
  modelVersion: z.string(),
  /** the version the device held, when it said */
  deviceModelVersion: z.string().nullable(),
  /** the device recorded the round against another model version than the server analysed it with */
  modelVersionMismatch: z.boolean(),
  /**
   * The device's clock minus the server's when the round first arrived, s (positive: the device
   * is ahead). Device times of the round are evidence; the server's order never uses them.
   */
  clockSkewS: z.number().optional(),
  barometricPa: z.number(),
  barometricSource: z.enum(['reading', 'elevation']),
  reconciliation: ReconciliationSummary,
  statePoints: arrayOf<StatePointResult>(),
  balances: arrayOf<EquipmentBalance>(),
  performance: arrayOf<PerformanceFigure>(),
  instruments: arrayOf<InstrumentResult>(),
  findings: z.array(FindingView),
  /** one per reading the analysis used (instruments with a reading) */
  readingOrigins: z.array(ReadingOrigin).optional(),
});
export type RoundAnalysisResponse = z.infer<typeof RoundAnalysisResponse>;

// ------------------------------------------------------------------------------ instruments

export const InstrumentListQuery = z.object({
  unitId: z.uuid({ error: 'Must be a unit UUID' }).optional(),
  status: InstrumentStatus.optional(),
  /** tag prefix or part, case-insensitive */
  q: z.string().trim().min(1).max(40).optional(),
});
export type InstrumentListQuery = z.input<typeof InstrumentListQuery>;

export const InstrumentHealth = z.object({
  id: z.uuid(),
  unitId: z.uuid(),
  tag: z.string(),
  quantity: z.enum(QUANTITIES),
  /** SI unit of the figures below: Pa, K, kg/s, W, 1 (level) */
  siUnit: z.string(),
  gaugeUnit: z.string(),
  status: InstrumentStatus,
  /** the instrument's own readings of the last 30 days (by reading time, current analyses only) that a finding blamed on it (the only one named, the suspect, or the most corrected) */
  flags30d: z.number().int(),
  /** analyses of the last 30 days that reconciled it */
  samples30d: z.number().int(),
  /** mean |z| (normalised correction) over those */
  meanAbsZ30d: z.number().nullable(),
  /** mean (measured − reconciled), SI, signed: positive reads high; reconciled = the estimate with the suspects removed */
  biasSi30d: z.number().nullable(),
  /** standard uncertainty of that mean, SI: √(mean variance of (reading − estimate) / n) */
  biasUncertaintySi30d: z.number().nullable(),
  /** the pressure reference of the gauge (gauge, vacuum, absolute), null for other quantities */
  reference: z.enum(['absolute', 'gauge', 'vacuum']).nullable(),
  /**
   * Sequential evidence since its last calibration (shared/cycle/evidence.ts, Page's CUSUM on the
   * signed normalised corrections of its own rounds): the list is ordered by `cusum`, strongest first.
   */
  evidence: z.object({
    /** max(S⁺, S⁻) after its latest round */
    cusum: z.number(),
    /** the alarm threshold h */
    threshold: z.number(),
    /** 'high' when S⁺ ≥ S⁻ and the sum is above zero, 'low' when S⁻ leads, null at zero */
    direction: z.enum(['high', 'low']).nullable(),
    /** own rounds counted since the reset */
    rounds: z.number().int(),
    /** 'strong' at cusum ≥ h, 'some' at ≥ h/2, else 'none'; 'untested' with no tested round */
    level: z.enum(['strong', 'some', 'none', 'untested']),
    /** when the count restarted (last calibration record or done calibrate/check-group order), ISO */
    since: z.iso.datetime().nullable(),
  }),
  /**
   * Calibrations that closed an order opened by the evidence: confirmed when the as-found error
   * (as found − as left) exceeded 2σ of the instrument, refuted when it did not.
   */
  calibrations: z.object({ closed: z.number().int(), confirmed: z.number().int(), refuted: z.number().int() }),
  /** YYYY-MM-DD */
  lastCalibration: z.string().nullable(),
  calibrationIntervalDays: z.number().int().nullable(),
  /** last calibration + interval, YYYY-MM-DD */
  calibrationDue: z.string().nullable(),
  calibrationOverdue: z.boolean(),
  openWorkOrders: z.array(WorkOrderRef.extend({ kind: z.string(), status: z.string() })),
});
export type InstrumentHealth = z.infer<typeof InstrumentHealth>;

/**
 * The one order of the health list, on the server and the screen: the evidence since calibration,
 * strongest first (an alarm, cusum ≥ h, above everything); an instrument no balance tests ranks as
 * a quarter of h (nothing speaks for it: after some evidence, before none); then tag, then unit.
 */
export function byEvidence(a: InstrumentHealth, b: InstrumentHealth): number {
  const rank = (i: InstrumentHealth) =>
    i.evidence.level === 'untested' ? i.evidence.threshold * 0.25 : i.evidence.cusum;
  return rank(b) - rank(a) || a.tag.localeCompare(b.tag) || a.unitId.localeCompare(b.unitId);
}

export const InstrumentListResponse = z.object({ instruments: z.array(InstrumentHealth), asOf: z.iso.datetime() });
export type InstrumentListResponse = z.infer<typeof InstrumentListResponse>;

/** A date (YYYY-MM-DD, start of that day UTC) or an ISO date-time. */
export const TimeBound = z.union([z.iso.datetime({ offset: true }), z.iso.date()], {
  error: 'Must be a date (YYYY-MM-DD) or an ISO 8601 date-time',
});

export const InstrumentHistoryQuery = z.object({
  from: TimeBound.optional(),
  to: TimeBound.optional(),
  /** needed when two units of the site have an instrument of that tag */
  unitId: z.uuid({ error: 'Must be a unit UUID' }).optional(),
});
export type InstrumentHistoryQuery = z.input<typeof InstrumentHistoryQuery>;

export const HistoryPoint = z.object({
  analysisId: z.uuid(),
  roundId: z.uuid(),
  readingId: z.uuid().nullable(),
  /** the reading's device time */
  measuredAt: z.iso.datetime(),
  reading: z.number().nullable(),
  sigma: z.number().nullable(),
  reconciled: z.number().nullable(),
  reconciledSigma: z.number().nullable(),
  estimate: z.number().nullable(),
  estimateSigma: z.number().nullable(),
  z: z.number().nullable(),
  suspect: z.boolean(),
  /** findings of that analysis naming the instrument */
  findings: z.array(z.string()),
  /** the barometric pressure that analysis used, Pa absolute (to show a gauge or vacuum reading as read) */
  barometricPa: z.number().nullable(),
});
export type HistoryPoint = z.infer<typeof HistoryPoint>;

export const InstrumentHistoryResponse = z.object({
  instrument: z.object({
    id: z.uuid(),
    unitId: z.uuid(),
    tag: z.string(),
    quantity: z.enum(QUANTITIES),
    siUnit: z.string(),
    status: InstrumentStatus,
    /** the unit on the gauge's face and its pressure reference: the trend is drawn in these */
    gaugeUnit: z.string(),
    reference: z.enum(['absolute', 'gauge', 'vacuum']).nullable(),
  }),
  from: z.iso.datetime(),
  to: z.iso.datetime(),
  points: z.array(HistoryPoint),
  /** more points than the limit matched; narrow the range */
  truncated: z.boolean(),
});
export type InstrumentHistoryResponse = z.infer<typeof InstrumentHistoryResponse>;

// ------------------------------------------------------------------------------ jobs and exports

export const ANALYSIS_JOB_STATES = ['created', 'retry', 'active', 'completed', 'cancelled', 'failed'] as const;

export const AnalysisJobsQuery = z.object({
  state: z
    .string()
    .default('failed,active,retry')
    .transform((v) =>
      v
        .split(',')
        .map((x) => x.trim())
        .filter(Boolean),
    )
    .pipe(
      z
        .array(
          z.enum(ANALYSIS_JOB_STATES, { error: `Must be a comma-separated list of ${ANALYSIS_JOB_STATES.join(', ')}` }),
        )
        .min(1),
    ),
  limit: z.coerce.number().int().min(1).max(500).default(100),
});

export const AnalysisJob = z.object({
  id: z.uuid(),
  roundId: z.uuid(),
  state: z.enum(ANALYSIS_JOB_STATES),
  retryCount: z.number().int(),
  retryLimit: z.number().int(),
  createdOn: z.iso.datetime(),
  startedOn: z.iso.datetime().nullable(),
  completedOn: z.iso.datetime().nullable(),
  /** when a retry may start */
  startAfter: z.iso.datetime(),
  /** the error of the last failed attempt */
  error: z.string().nullable(),
});
export type AnalysisJob = z.infer<typeof AnalysisJob>;

export const AnalysisJobsResponse = z.object({ jobs: z.array(AnalysisJob) });
export type AnalysisJobsResponse = z.infer<typeof AnalysisJobsResponse>;

export const ExportRangeQuery = z.object({ from: TimeBound.optional(), to: TimeBound.optional() });
