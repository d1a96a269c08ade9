/**
 * Wire schemas of work orders. Pure zod: the server parses requests and builds responses with
 * these, the app reads them.
 *
 *   GET  /api/sites/:siteId/work-orders?status=&priority=&kind=&unitId=&tag=&assigneeId=&q=&sort=&limit=&offset=
 *                                              → WorkOrderListResponse
 *   GET  /api/sites/:siteId/work-orders/:id     → WorkOrderDetail (evidence, history, calibrations)
 *   POST /api/sites/:siteId/work-orders/:id/triage|assign|schedule|start|close|cancel|merge|comment
 *                                              → WorkOrderDetail
 *   GET  /api/sites/:siteId/exports/work-orders.csv
 *
 * Status flow: open → triaged → scheduled → in-progress → done; any open status → cancelled (with a
 * reason). A move the flow does not allow is a 409 `conflict` naming the states.
 */
import { z } from 'zod';
import { PRESSURE_REFERENCES } from '../units';

/** check-group: instruments the balances cannot tell apart, checked together (one order names them all) */
export const WORK_ORDER_KINDS = ['calibrate', 'repair', 'inspect', 'clean', 'check-group'] as const;
export const WorkOrderKind = z.enum(WORK_ORDER_KINDS, { error: `Must be one of ${WORK_ORDER_KINDS.join(', ')}` });
export type WorkOrderKind = z.infer<typeof WorkOrderKind>;

export const WORK_ORDER_STATUSES = ['open', 'triaged', 'scheduled', 'in-progress', 'done', 'cancelled'] as const;
export const WorkOrderStatus = z.enum(WORK_ORDER_STATUSES, {
  error: `Must be one of ${WORK_ORDER_STATUSES.join(', ')}`,
});
export type WorkOrderStatus = z.infer<typeof WorkOrderStatus>;

/** The actions of POST …/work-orders/:id/<action>. */
export const WORK_ORDER_ACTIONS = [
  'triage',
  'assign',
  'schedule',
  'start',
  'close',
  'cancel',
  'merge',
  'comment',
] as const;
export type WorkOrderAction = (typeof WORK_ORDER_ACTIONS)[number];

/** 1 most urgent, 3 least. */
export const Priority = z
  .number({ error: 'Must be 1, 2 or 3' })
  .int('Must be 1, 2 or 3')
  .min(1, 'Must be 1, 2 or 3')
  .max(3, 'Must be 1, 2 or 3');
export type Priority = z.infer<typeof Priority>;

/** A calendar date, YYYY-MM-DD. */
export const DateOnly = z.iso.date({ error: 'Must be a date like 2025-12-01 (YYYY-MM-DD)' });

const comment = z
  .string({ error: 'Must be a string' })
  .trim()
  .min(1, 'Must not be empty')
  .max(4000, 'Must be at most 4000 characters');

export const UserRef = z.object({ id: z.uuid(), name: z.string() });
export const WorkOrderRef = z.object({ id: z.uuid(), number: z.string() });

export const WorkOrderSummary = z.object({
  id: z.uuid(),
  /** "WO-0001", per site */
  number: z.string(),
  siteId: z.uuid(),
  unitId: z.uuid(),
  kind: WorkOrderKind,
  status: WorkOrderStatus,
  priority: Priority,
  title: z.string(),
  instrumentId: z.uuid().nullable(),
  instrumentTag: z.string().nullable(),
  /** The cycle model's equipment id, for an order on equipment (a balance that does not close). */
  equipmentRef: z.string().nullable(),
  assignee: UserRef.nullable(),
  dueDate: DateOnly.nullable(),
  scheduledFor: DateOnly.nullable(),
  cancelReason: z.string().nullable(),
  mergedInto: WorkOrderRef.nullable(),
  reopenCount: z.number().int(),
  findingCount: z.number().int(),
  lastFindingAt: z.iso.datetime().nullable(),
  openedAt: z.iso.datetime(),
  updatedAt: z.iso.datetime(),
  closedAt: z.iso.datetime().nullable(),
});
export type WorkOrderSummary = z.infer<typeof WorkOrderSummary>;

export const WORK_ORDER_SORTS = [
  '-openedAt',
  'openedAt',
  'priority',
  '-priority',
  'dueDate',
  '-dueDate',
  'number',
  '-number',
  '-updatedAt',
  'updatedAt',
] as const;
export type WorkOrderSort = (typeof WORK_ORDER_SORTS)[number];

const csv = <T extends z.ZodType<unknown, string>>(item: T, what: string) =>
  z
    .string({ error: `Must be ${what}` })
    .transform((v) =>
      v
        .split(',')
        .map((x) => x.trim())
        .filter(Boolean),
    )
    .pipe(z.array(item).min(1, `Must name at least one: ${what}`));

/** Work orders per page when a list request names no `limit`. */
export const WORK_ORDER_PAGE_SIZE = 50;

export const WorkOrderListQuery = z.object({
  /** comma-separated statuses; "active" stands for every status but done and cancelled */
  status: csv(
    z.enum([...WORK_ORDER_STATUSES, 'active']),
    `a comma-separated list of ${WORK_ORDER_STATUSES.join(', ')}, active`,
  ).optional(),
  priority: csv(z.enum(['1', '2', '3']).transform(Number), 'a comma-separated list of 1, 2, 3').optional(),
  kind: csv(WorkOrderKind, `a comma-separated list of ${WORK_ORDER_KINDS.join(', ')}`).optional(),
  unitId: z.uuid({ error: 'Must be a unit UUID' }).optional(),
  /** instrument tag, exact (case-insensitive) */
  tag: z.string().trim().min(1).max(40).optional(),
  assigneeId: z.uuid({ error: 'Must be a user UUID' }).optional(),
  /** text search on number, title and instrument tag */
  q: z.string().trim().min(1).max(200).optional(),
  sort: z.enum(WORK_ORDER_SORTS, { error: `Must be one of ${WORK_ORDER_SORTS.join(', ')}` }).default('-openedAt'),
  limit: z.coerce
    .number({ error: 'Must be a whole number' })
    .int('Must be a whole number')
    .min(1, 'Must be at least 1')
    .max(200, 'Must be at most 200')
    .default(WORK_ORDER_PAGE_SIZE),
  offset: z.coerce
    .number({ error: 'Must be a whole number' })
    .int('Must be a whole number')
    .min(0, 'Must be at least 0')
    .max(1_000_000)
    .default(0),
});
export type WorkOrderListQuery = z.input<typeof WorkOrderListQuery>;
/** The list filters as the server reads them (after parsing); a client sets any of them. */
export type WorkOrderListFilters = z.output<typeof WorkOrderListQuery>;

export const WorkOrderListResponse = z.object({
  items: z.array(WorkOrderSummary),
  /** all matches, not just this page */
  total: z.number().int(),
  limit: z.number().int(),
  offset: z.number().int(),
});
export type WorkOrderListResponse = z.infer<typeof WorkOrderListResponse>;

export const EvidencePhoto = z.object({
  id: z.uuid(),
  /** /api/photos/:id/thumb */
  thumbUrl: z.string(),
  /** /api/photos/:id */
  url: z.string(),
  stored: z.boolean(),
});

export const EvidenceReading = z.object({
  id: z.uuid(),
  instrumentTag: z.string(),
  valueTyped: z.number().nullable(),
  unit: z.string(),
  reference: z.enum(PRESSURE_REFERENCES).nullable(),
  /** SI absolute */
  valueSi: z.number().nullable(),
  deviceTime: z.iso.datetime(),
  note: z.string().nullable(),
  photos: z.array(EvidencePhoto),
});
export type EvidenceReading = z.infer<typeof EvidenceReading>;

/** The analysis' figures for one instrument the finding names (SI absolute). */
export const EvidenceInstrument = z.object({
  tag: z.string(),
  reading: z.number().nullable(),
  sigma: z.number().nullable(),
  reconciled: z.number().nullable(),
  reconciledSigma: z.number().nullable(),
  /** with the suspects removed: what the rest of the plant says */
  estimate: z.number().nullable(),
  estimateSigma: z.number().nullable(),
  /** normalised correction */
  z: z.number().nullable(),
  suspect: z.boolean(),
});

export const ReconciliationSummary = z.object({
  ok: z.boolean(),
  chiSquare: z.number().nullable(),
  dof: z.number().nullable(),
  critical: z.number().nullable(),
  passed: z.boolean().nullable(),
  zCritical: z.number().nullable(),
  suspects: z.array(z.string()),
  error: z.string().nullable(),
});
export type ReconciliationSummary = z.infer<typeof ReconciliationSummary>;

export const EvidenceItem = z.object({
  findingId: z.uuid(),
  analysisId: z.uuid(),
  roundId: z.uuid(),
  kind: z.string(),
  severity: z.number().int(),
  message: z.string(),
  instrumentTags: z.array(z.string()),
  evidence: z.record(z.string(), z.unknown()),
  findingAt: z.iso.datetime(),
  attachedAt: z.iso.datetime(),
  /** the analysis is still the round's current one (a re-take makes a newer one) */
  current: z.boolean(),
  reconciliation: ReconciliationSummary,
  instruments: z.array(EvidenceInstrument),
  readings: z.array(EvidenceReading),
});
export type EvidenceItem = z.infer<typeof EvidenceItem>;

export const WorkOrderEventView = z.object({
  id: z.uuid(),
  at: z.iso.datetime(),
  /** null: the server (an analysis) */
  actor: UserRef.nullable(),
  type: z.string(),
  fromStatus: WorkOrderStatus.nullable(),
  toStatus: WorkOrderStatus.nullable(),
  changes: z.record(z.string(), z.unknown()),
  comment: z.string().nullable(),
});
export type WorkOrderEventView = z.infer<typeof WorkOrderEventView>;

export const CalibrationRecordView = z.object({
  id: z.uuid(),
  workOrderId: z.uuid(),
  instrumentId: z.uuid(),
  asFound: z.number(),
  asLeft: z.number(),
  /** the instrument's own unit and reference */
  unit: z.string(),
  reference: z.enum(PRESSURE_REFERENCES).nullable(),
  calibratedOn: DateOnly,
  calibratedBy: UserRef,
  note: z.string().nullable(),
});
export type CalibrationRecordView = z.infer<typeof CalibrationRecordView>;

/** Rounds of evidence per page (the detail carries the newest page; …/evidence?offset= the rest). */
export const EVIDENCE_ROUNDS_PAGE = 5;

/** One point of the trend of the order's instrument: its correction (reconciled − reading, SI) on one round. */
export const CorrectionPoint = z.object({
  roundId: z.uuid(),
  at: z.iso.datetime(),
  correction: z.number(),
  /** 1σ of the correction (from the reading's and the reconciled value's σ), null when not known */
  sigma: z.number().nullable(),
  z: z.number().nullable(),
});
export type CorrectionPoint = z.infer<typeof CorrectionPoint>;

/** What an order's evidence comes to, read before any of it. */
export const EvidenceSummary = z.object({
  findingCount: z.number().int(),
  roundCount: z.number().int(),
  firstSeenAt: z.iso.datetime().nullable(),
  lastSeenAt: z.iso.datetime().nullable(),
  /** the order's instrument's correction per round of its evidence, oldest first; empty without an instrument */
  trend: z.array(CorrectionPoint),
  /** the SI unit of `trend` (K, Pa, kg/s, W, 1), null without an instrument */
  trendUnit: z.string().nullable(),
  /** the newest few findings, newest first */
  latest: z.array(
    z.object({
      findingId: z.uuid(),
      roundId: z.uuid(),
      at: z.iso.datetime(),
      severity: z.number().int(),
      message: z.string(),
    }),
  ),
});
export type EvidenceSummary = z.infer<typeof EvidenceSummary>;

export const EvidencePageQuery = z.object({
  offset: z.coerce
    .number({ error: 'Must be a whole number of rounds' })
    .int('Must be a whole number of rounds')
    .min(0, 'Must be at least 0')
    .max(1_000_000, 'Must be at most 1000000')
    .default(0),
  limit: z.coerce
    .number({ error: 'Must be a whole number of rounds' })
    .int('Must be a whole number of rounds')
    .min(1, 'Must be at least 1')
    .max(50, 'Must be at most 50')
    .default(EVIDENCE_ROUNDS_PAGE),
});

/** A page of evidence by round, newest round first: `offset`/`limit` count rounds, `rounds` is all of them. */
export const EvidencePage = z.object({
  items: z.array(EvidenceItem),
  rounds: z.number().int(),
  offset: z.number().int(),
  limit: z.number().int(),
});
export type EvidencePage = z.infer<typeof EvidencePage>;

export const WorkOrderDetail = WorkOrderSummary.extend({
  evidenceSummary: EvidenceSummary,
  /** the newest EVIDENCE_ROUNDS_PAGE rounds of evidence (newest round first); the rest by …/evidence?offset= */
  evidence: z.array(EvidenceItem),
  evidencePage: EvidencePage.omit({ items: true }),
  events: z.array(WorkOrderEventView),
  calibrations: z.array(CalibrationRecordView),
  /** what the status flow allows next from here */
  allowedActions: z.array(z.enum(WORK_ORDER_ACTIONS)),
});
export type WorkOrderDetail = z.infer<typeof WorkOrderDetail>;

// ------------------------------------------------------------------------------------ requests

export const TriageRequest = z.object({
  priority: Priority.optional(),
  dueDate: DateOnly.nullable().optional(),
  comment: comment.optional(),
});
export type TriageRequest = z.infer<typeof TriageRequest>;

export const AssignRequest = z.object({
  /** a member of the work order's site */
  userId: z.uuid({ error: 'Must be a user UUID' }),
  comment: comment.optional(),
});
export type AssignRequest = z.infer<typeof AssignRequest>;

export const ScheduleRequest = z.object({
  scheduledFor: DateOnly,
  dueDate: DateOnly.nullable().optional(),
  comment: comment.optional(),
});
export type ScheduleRequest = z.infer<typeof ScheduleRequest>;

export const StartRequest = z.object({ comment: comment.optional() });
export type StartRequest = z.infer<typeof StartRequest>;

const finiteNumber = z.number({ error: 'Must be a finite number' }).refine(Number.isFinite, 'Must be a finite number');

/** As found and as left in the instrument's own unit and reference (its gauge face). */
export const CalibrationInput = z.object({
  asFound: finiteNumber,
  asLeft: finiteNumber,
  /** must not lie in the future */
  calibratedOn: DateOnly,
  /** the unit the values are in; when given it must be the instrument's own */
  unit: z.string().trim().min(1).max(16).optional(),
  note: comment.optional(),
});
export type CalibrationInput = z.infer<typeof CalibrationInput>;

export const CloseRequest = z.object({
  /** required to close a calibrate order, refused on others */
  calibration: CalibrationInput.optional(),
  comment: comment.optional(),
});
export type CloseRequest = z.infer<typeof CloseRequest>;

export const CancelRequest = z.object({
  reason: z
    .string({
      error: (iss) => (iss.input === undefined ? 'Required: say why the work order is cancelled' : 'Must be a string'),
    })
    .trim()
    .min(1, 'Must not be empty')
    .max(2000),
});
export type CancelRequest = z.infer<typeof CancelRequest>;

export const MergeRequest = z.object({
  /** the duplicates: their findings and history move into this work order, they are cancelled */
  duplicateIds: z
    .array(z.uuid({ error: 'Must be a work-order UUID' }))
    .min(1, 'Name at least one duplicate')
    .max(50, 'At most 50 duplicates at once'),
  comment: comment.optional(),
});
export type MergeRequest = z.infer<typeof MergeRequest>;

export const CommentRequest = z.object({ comment });
export type CommentRequest = z.infer<typeof CommentRequest>;
