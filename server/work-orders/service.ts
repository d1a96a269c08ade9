/**
 * Work orders as the planner sees and moves them: list, detail with evidence, and the actions of
 * the status flow (./policy.ts). Every action runs in one transaction holding the order's row
 * lock, writes a history event, and returns the order as it is after the commit. Notifications
 * (assigned) go out after the commit and never fail the action.
 */
import type { DataSource, EntityManager } from 'typeorm';
import type {
  AssignRequest,
  CalibrationRecordView,
  CancelRequest,
  CloseRequest,
  CommentRequest,
  EvidenceItem,
  MergeRequest,
  ReconciliationSummary,
  ScheduleRequest,
  StartRequest,
  TriageRequest,
  WorkOrderAction,
  WorkOrderDetail,
  WorkOrderEventView,
  WorkOrderListResponse,
  WorkOrderStatus,
  WorkOrderSummary,
} from '../../shared/api/work-orders';
import { WorkOrderListQuery as ListQuerySchema } from '../../shared/api/work-orders';
import { resolveUnit, UnitError, type Quantity } from '../../shared/units';
import type { z } from 'zod';
import { AppError } from '../errors';
import type { Logger } from '../logger';
import { notifySafely, type Notifier } from '../notify';
import { lockSiteCounter } from './from-findings';
import { TRANSITIONS, allowedActions, isClosed, refusal } from './policy';

type ListQuery = z.output<typeof ListQuerySchema>;

export interface ActionDeps {
  dataSource: DataSource;
  logger: Logger;
  notify?: Notifier;
}

const UUID_RE = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
// No id in the message: an unknown id and another site's answer byte for byte alike (tests/api/security-route-guards).
const notFound = () => new AppError(404, 'not_found', 'Work order not found on this site');
const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);

// ------------------------------------------------------------------------------------ reading

const SUMMARY_COLUMNS = `
  w."id", w."code", w."site_id", w."unit_id", w."kind", w."status", w."priority", w."title", w."instrument_id", w."instrument_tag",
  w."equipment_ref", w."assignee_id", COALESCE(am."display_name", u."name") AS "assignee_name", to_char(w."due_date", 'YYYY-MM-DD') AS "due_date",
  to_char(w."scheduled_for", 'YYYY-MM-DD') AS "scheduled_for", w."cancel_reason", w."merged_into_id", m."code" AS "merged_into_code",
  w."reopen_count", w."opened_at", w."updated_at", w."closed_at",
  (SELECT count(*)::int FROM "work_order_findings" wf WHERE wf."work_order_id" = w."id") AS "finding_count",
  (SELECT max(f."created_at") FROM "work_order_findings" wf JOIN "findings" f ON f."id" = wf."finding_id" WHERE wf."work_order_id" = w."id") AS "last_finding_at"`;
// People by the name this site knows them by (memberships.display_name, set at an invitation), else their account's.
const SUMMARY_FROM = `"work_orders" w LEFT JOIN "users" u ON u."id" = w."assignee_id"
  LEFT JOIN "memberships" am ON am."user_id" = w."assignee_id" AND am."site_id" = w."site_id"
  LEFT JOIN "work_orders" m ON m."id" = w."merged_into_id"`;

interface SummaryRow {
  id: string;
  code: string;
  site_id: string;
  unit_id: string;
  kind: WorkOrderSummary['kind'];
  status: WorkOrderStatus;
  priority: number;
  title: string;
  instrument_id: string | null;
  instrument_tag: string | null;
  equipment_ref: string | null;
  assignee_id: string | null;
  assignee_name: string | null;
  due_date: string | null;
  scheduled_for: string | null;
  cancel_reason: string | null;
  merged_into_id: string | null;
  merged_into_code: string | null;
  reopen_count: number;
  opened_at: Date;
  updated_at: Date;
  closed_at: Date | null;
  finding_count: number;
  last_finding_at: Date | null;
}

function summaryOf(r: SummaryRow): WorkOrderSummary {
  return {
    id: r.id,
    number: r.code,
    siteId: r.site_id,
    unitId: r.unit_id,
    kind: r.kind,
    status: r.status,
    priority: r.priority,
    title: r.title,
    instrumentId: r.instrument_id,
    instrumentTag: r.instrument_tag,
    equipmentRef: r.equipment_ref,
    assignee: r.assignee_id ? { id: r.assignee_id, name: r.assignee_name ?? '' } : null,
    dueDate: r.due_date,
    scheduledFor: r.scheduled_for,
    cancelReason: r.cancel_reason,
    mergedInto: r.merged_into_id ? { id: r.merged_into_id, number: r.merged_into_code ?? '' } : null,
    reopenCount: r.reopen_count,
    findingCount: r.finding_count,
    lastFindingAt: iso(r.last_finding_at),
    openedAt: iso(r.opened_at)!,
    updatedAt: iso(r.updated_at)!,
    closedAt: iso(r.closed_at),
  };
}

const SORTS: Record<ListQuery['sort'], string> = {
  '-openedAt': 'w."opened_at" DESC, w."number" DESC',
  openedAt: 'w."opened_at" ASC, w."number" ASC',
  priority: 'w."priority" ASC, w."opened_at" DESC, w."number" DESC',
  '-priority': 'w."priority" DESC, w."opened_at" DESC, w."number" DESC',
  dueDate: 'w."due_date" ASC NULLS LAST, w."priority" ASC, w."number" ASC',
  '-dueDate': 'w."due_date" DESC NULLS LAST, w."priority" ASC, w."number" DESC',
  number: 'w."number" ASC',
  '-number': 'w."number" DESC',
  '-updatedAt': 'w."updated_at" DESC, w."number" DESC',
  updatedAt: 'w."updated_at" ASC, w."number" ASC',
};

/** "WO-12", "wo-0012", "12" → 12 */
function numberOf(q: string): number | null {
  const m = /^(?:wo-?)?0*(\d{1,9})$/i.exec(q.trim());
  return m ? Number(m[1]) : null;
}

/** `%`, `_` and `\` taken literally in ILIKE */
const likeEscape = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);

export async function listWorkOrders(ds: DataSource, siteId: string, q: ListQuery): Promise<WorkOrderListResponse> {
  const params: unknown[] = [siteId];
  const where: string[] = ['w."site_id" = $1'];
  if (q.status) {
    const active = q.status.includes('active');
    const named = q.status.filter((s) => s !== 'active');
    const parts: string[] = [];
    if (named.length) parts.push(`w."status" = ANY($${params.push(named)}::work_order_status[])`);
    if (active) parts.push(`w."status" NOT IN ('done', 'cancelled')`);
    where.push(`(${parts.join(' OR ')})`);
  }
  if (q.priority) where.push(`w."priority" = ANY($${params.push(q.priority)}::smallint[])`);
  if (q.kind) where.push(`w."kind" = ANY($${params.push(q.kind)}::work_order_kind[])`);
  if (q.unitId) where.push(`w."unit_id" = $${params.push(q.unitId)}`);
  if (q.tag) where.push(`upper(w."instrument_tag") = upper($${params.push(q.tag)})`);
  if (q.assigneeId) where.push(`w."assignee_id" = $${params.push(q.assigneeId)}`);
  if (q.q) {
    const like = `%${likeEscape(q.q)}%`;
    const n = numberOf(q.q);
    const p = params.push(like);
    where.push(
      `(w."code" ILIKE $${p} OR w."title" ILIKE $${p} OR w."instrument_tag" ILIKE $${p}${n !== null ? ` OR w."number" = $${params.push(n)}` : ''})`,
    );
  }
  const limit = params.push(q.limit);
  const offset = params.push(q.offset);
  const rows = (await ds.query(
    `SELECT ${SUMMARY_COLUMNS}, count(*) OVER ()::int AS "total"
       FROM ${SUMMARY_FROM}
      WHERE ${where.join(' AND ')}
      ORDER BY ${SORTS[q.sort]}
      LIMIT $${limit} OFFSET $${offset}`,
    params,
  )) as (SummaryRow & { total: number })[];
  let total = rows[0]?.total ?? 0;
  if (rows.length === 0 && q.offset > 0) {
    const [c] = (await ds.query(
      `SELECT count(*)::int AS "n" FROM "work_orders" w WHERE ${where.join(' AND ')}`,
      params.slice(0, limit - 1),
    )) as { n: number }[];
    total = c.n;
  }
  return { items: rows.map(summaryOf), total, limit: q.limit, offset: q.offset };
}

function reconciliationSummaryOf(r: unknown): ReconciliationSummary {
  const x = (r ?? {}) as Record<string, unknown>;
  const num = (v: unknown) => (typeof v === 'number' && Number.isFinite(v) ? v : null);
  if (x.ok !== true) {
    const e = x.error as { message?: string } | undefined;
    return {
      ok: false,
      chiSquare: null,
      dof: null,
      critical: null,
      passed: null,
      zCritical: null,
      suspects: [],
      error: e?.message ?? 'not reconciled',
    };
  }
  return {
    ok: true,
    chiSquare: num(x.chiSquare),
    dof: num(x.dof),
    critical: num(x.critical),
    passed: typeof x.passed === 'boolean' ? x.passed : null,
    zCritical: num(x.zCritical),
    suspects: Array.isArray(x.suspects) ? (x.suspects as string[]) : [],
    error: null,
  };
}
export { reconciliationSummaryOf };

async function evidenceOf(ds: DataSource | EntityManager, workOrderId: string): Promise<EvidenceItem[]> {
  const findings = (await ds.query(
    `SELECT f."id", f."analysis_id", f."round_id", f."kind", f."severity", f."message", f."instrument_tags", f."instrument_ids", f."evidence",
            f."created_at", wf."attached_at", a."is_current", a."reconciliation"
       FROM "work_order_findings" wf
       JOIN "findings" f ON f."id" = wf."finding_id"
       JOIN "analyses" a ON a."id" = f."analysis_id"
      WHERE wf."work_order_id" = $1
      ORDER BY f."created_at", f."ordinal"`,
    [workOrderId],
  )) as {
    id: string;
    analysis_id: string;
    round_id: string;
    kind: string;
    severity: number;
    message: string;
    instrument_tags: string[];
    instrument_ids: string[];
    evidence: Record<string, unknown>;
    created_at: Date;
    attached_at: Date;
    is_current: boolean;
    reconciliation: unknown;
  }[];
  if (findings.length === 0) return [];
  const pairs = findings.flatMap((f) => f.instrument_ids.map((i) => [f.analysis_id, i] as const));
  const ai = pairs.length
    ? ((await ds.query(
        `SELECT ai."analysis_id", ai."instrument_id", i."tag", ai."reading_id", ai."reading_si", ai."sigma_si", ai."reconciled_si", ai."reconciled_sigma_si",
                ai."estimate_si", ai."estimate_sigma_si", ai."z", ai."suspect"
           FROM "analysis_instruments" ai JOIN "instruments" i ON i."id" = ai."instrument_id"
          WHERE (ai."analysis_id", ai."instrument_id") IN (SELECT * FROM unnest($1::uuid[], $2::uuid[]))`,
        [pairs.map((p) => p[0]), pairs.map((p) => p[1])],
      )) as {
        analysis_id: string;
        instrument_id: string;
        tag: string;
        reading_id: string | null;
        reading_si: number | null;
        sigma_si: number | null;
        reconciled_si: number | null;
        reconciled_sigma_si: number | null;
        estimate_si: number | null;
        estimate_sigma_si: number | null;
        z: number | null;
        suspect: boolean;
      }[])
    : [];
  const readingIds = [...new Set(ai.map((r) => r.reading_id).filter((x): x is string => !!x))];
  const readings = readingIds.length
    ? ((await ds.query(
        `SELECT r."id", i."tag", r."value_typed", r."unit", r."reference", r."value_si", r."device_time", r."note"
           FROM "readings" r JOIN "instruments" i ON i."id" = r."instrument_id" WHERE r."id" = ANY($1::uuid[])`,
        [readingIds],
      )) as {
        id: string;
        tag: string;
        value_typed: string | null;
        unit: string;
        reference: string | null;
        value_si: number | null;
        device_time: Date;
        note: string | null;
      }[])
    : [];
  const photos = readingIds.length
    ? ((await ds.query(
        `SELECT "id", "reading_id", "status" FROM "photos" WHERE "reading_id" = ANY($1::uuid[]) ORDER BY "received_at", "id"`,
        [readingIds],
      )) as {
        id: string;
        reading_id: string;
        status: string;
      }[])
    : [];
  const readingById = new Map(
    readings.map((r) => [
      r.id,
      {
        id: r.id,
        instrumentTag: r.tag,
        valueTyped: r.value_typed === null ? null : Number(r.value_typed),
        unit: r.unit,
        reference: r.reference as EvidenceItem['readings'][number]['reference'],
        valueSi: r.value_si,
        deviceTime: iso(r.device_time)!,
        note: r.note,
        photos: photos
          .filter((p) => p.reading_id === r.id)
          .map((p) => ({
            id: p.id,
            thumbUrl: `/api/photos/${p.id}/thumb`,
            url: `/api/photos/${p.id}`,
            stored: p.status === 'stored',
          })),
      },
    ]),
  );
  return findings.map((f) => {
    const mine = ai.filter((r) => r.analysis_id === f.analysis_id && f.instrument_ids.includes(r.instrument_id));
    return {
      findingId: f.id,
      analysisId: f.analysis_id,
      roundId: f.round_id,
      kind: f.kind,
      severity: f.severity,
      message: f.message,
      instrumentTags: f.instrument_tags,
      evidence: f.evidence,
      findingAt: iso(f.created_at)!,
      attachedAt: iso(f.attached_at)!,
      current: f.is_current,
      reconciliation: reconciliationSummaryOf(f.reconciliation),
      instruments: mine.map((r) => ({
        tag: r.tag,
        reading: r.reading_si,
        sigma: r.sigma_si,
        reconciled: r.reconciled_si,
        reconciledSigma: r.reconciled_sigma_si,
        estimate: r.estimate_si,
        estimateSigma: r.estimate_sigma_si,
        z: r.z,
        suspect: r.suspect,
      })),
      readings: mine
        .map((r) => (r.reading_id ? readingById.get(r.reading_id) : undefined))
        .filter((x): x is NonNullable<typeof x> => !!x),
    };
  });
}

export async function getWorkOrder(ds: DataSource, siteId: string, id: string): Promise<WorkOrderDetail> {
  if (!UUID_RE.test(id)) throw notFound();
  const [row] = (await ds.query(
    `SELECT ${SUMMARY_COLUMNS} FROM ${SUMMARY_FROM} WHERE w."id" = $1 AND w."site_id" = $2`,
    [id, siteId],
  )) as SummaryRow[];
  if (!row) throw notFound();
  const events = (await ds.query(
    `SELECT e."id", e."at", e."actor_id", COALESCE(em."display_name", u."name") AS "actor_name", e."type", e."from_status", e."to_status", e."changes", e."comment"
       FROM "work_order_events" e LEFT JOIN "users" u ON u."id" = e."actor_id"
       LEFT JOIN "memberships" em ON em."user_id" = e."actor_id" AND em."site_id" = $2
      WHERE e."work_order_id" = $1 ORDER BY e."at", e."id"`,
    [id, siteId],
  )) as {
    id: string;
    at: Date;
    actor_id: string | null;
    actor_name: string | null;
    type: string;
    from_status: WorkOrderStatus | null;
    to_status: WorkOrderStatus | null;
    changes: Record<string, unknown>;
    comment: string | null;
  }[];
  const calibrations = (await ds.query(
    `SELECT c."id", c."work_order_id", c."instrument_id", c."as_found", c."as_left", c."unit", c."reference", to_char(c."calibrated_on", 'YYYY-MM-DD') AS "calibrated_on",
            c."calibrated_by", COALESCE(cm."display_name", u."name") AS "calibrated_by_name", c."note"
       FROM "calibration_records" c JOIN "users" u ON u."id" = c."calibrated_by"
       LEFT JOIN "memberships" cm ON cm."user_id" = c."calibrated_by" AND cm."site_id" = $2
      WHERE c."work_order_id" = $1 ORDER BY c."created_at"`,
    [id, siteId],
  )) as {
    id: string;
    work_order_id: string;
    instrument_id: string;
    as_found: number;
    as_left: number;
    unit: string;
    reference: CalibrationRecordView['reference'];
    calibrated_on: string;
    calibrated_by: string;
    calibrated_by_name: string;
    note: string | null;
  }[];
  return {
    ...summaryOf(row),
    evidence: await evidenceOf(ds, id),
    events: events.map((e): WorkOrderEventView => ({
      id: e.id,
      at: iso(e.at)!,
      actor: e.actor_id ? { id: e.actor_id, name: e.actor_name ?? '' } : null,
      type: e.type,
      fromStatus: e.from_status,
      toStatus: e.to_status,
      changes: e.changes,
      comment: e.comment,
    })),
    calibrations: calibrations.map((c) => ({
      id: c.id,
      workOrderId: c.work_order_id,
      instrumentId: c.instrument_id,
      asFound: c.as_found,
      asLeft: c.as_left,
      unit: c.unit,
      reference: c.reference,
      calibratedOn: c.calibrated_on,
      calibratedBy: { id: c.calibrated_by, name: c.calibrated_by_name },
      note: c.note,
    })),
    allowedActions: allowedActions(row.status),
  };
}

// ------------------------------------------------------------------------------------ actions

interface LockedRow {
  id: string;
  code: string;
  site_id: string;
  kind: string;
  status: WorkOrderStatus;
  priority: number;
  instrument_id: string | null;
  assignee_id: string | null;
  due_date: string | null;
  scheduled_for: string | null;
}

const LOCK_COLUMNS = `"id", "code", "site_id", "kind", "status", "priority", "instrument_id", "assignee_id",
  to_char("due_date", 'YYYY-MM-DD') AS "due_date", to_char("scheduled_for", 'YYYY-MM-DD') AS "scheduled_for"`;

async function lockOrder(em: EntityManager, siteId: string, id: string): Promise<LockedRow> {
  if (!UUID_RE.test(id)) throw notFound();
  const [row] = (await em.query(
    `SELECT ${LOCK_COLUMNS} FROM "work_orders" WHERE "id" = $1 AND "site_id" = $2 FOR UPDATE`,
    [id, siteId],
  )) as LockedRow[];
  if (!row) throw notFound();
  return row;
}

function assertMay(action: WorkOrderAction, wo: LockedRow): void {
  const why = refusal(action, wo.status);
  if (why) {
    throw new AppError(409, 'conflict', `${wo.code} cannot ${action}: ${why}`, {
      workOrder: wo.code,
      action,
      status: wo.status,
      allowedFrom: TRANSITIONS[action]?.from ?? [],
    });
  }
}

async function addEvent(
  em: EntityManager,
  workOrderId: string,
  actorId: string | null,
  type: string,
  e: {
    from?: WorkOrderStatus | null;
    to?: WorkOrderStatus | null;
    changes?: Record<string, unknown>;
    comment?: string | null;
  } = {},
): Promise<void> {
  await em.query(
    `INSERT INTO "work_order_events" ("work_order_id", "actor_id", "type", "from_status", "to_status", "changes", "comment") VALUES ($1, $2, $3, $4, $5, $6, $7)`,
    [workOrderId, actorId, type, e.from ?? null, e.to ?? null, JSON.stringify(e.changes ?? {}), e.comment ?? null],
  );
}

/** Sets the fields given (column → value) and updated_at. */
async function update(em: EntityManager, id: string, set: Record<string, unknown>): Promise<void> {
  const params: unknown[] = [id];
  const parts = Object.entries(set).map(([c, v]) => `"${c}" = $${params.push(v)}`);
  await em.query(`UPDATE "work_orders" SET ${[...parts, `"updated_at" = now()`].join(', ')} WHERE "id" = $1`, params);
}

/** The instrument back to ok when it was suspect only for this (calibrate) order. */
async function clearSuspect(em: EntityManager, instrumentId: string): Promise<void> {
  await em.query(
    `UPDATE "instruments" SET "status" = 'ok', "row_version" = "row_version" + 1, "updated_at" = now()
      WHERE "id" = $1 AND "status" = 'suspect'
        AND NOT EXISTS (SELECT 1 FROM "work_orders" w WHERE w."instrument_id" = $1 AND w."kind" = 'calibrate' AND w."status" NOT IN ('done', 'cancelled'))`,
    [instrumentId],
  );
}

const todayUtc = () => new Date().toISOString().slice(0, 10);
const addDays = (date: string, n: number) =>
  new Date(Date.parse(`${date}T00:00:00Z`) + n * 86_400_000).toISOString().slice(0, 10);

export type ActionBody =
  | { action: 'triage'; body: TriageRequest }
  | { action: 'assign'; body: AssignRequest }
  | { action: 'schedule'; body: ScheduleRequest }
  | { action: 'start'; body: StartRequest }
  | { action: 'close'; body: CloseRequest }
  | { action: 'cancel'; body: CancelRequest }
  | { action: 'merge'; body: MergeRequest }
  | { action: 'comment'; body: CommentRequest };

export async function actOnWorkOrder(
  deps: ActionDeps,
  siteId: string,
  id: string,
  actorId: string,
  a: ActionBody,
): Promise<WorkOrderDetail> {
  const { dataSource, logger, notify } = deps;
  const after: (() => Promise<void>)[] = [];
  await dataSource.transaction(async (em) => {
    if (a.action === 'merge') {
      await merge(em, siteId, id, actorId, a.body);
      return;
    }
    const wo = await lockOrder(em, siteId, id);
    switch (a.action) {
      case 'triage': {
        assertMay('triage', wo);
        const changes: Record<string, unknown> = {};
        const set: Record<string, unknown> = { status: 'triaged' };
        if (a.body.priority !== undefined && a.body.priority !== wo.priority) {
          set.priority = a.body.priority;
          changes.priority = { from: wo.priority, to: a.body.priority };
        }
        if (a.body.dueDate !== undefined && a.body.dueDate !== wo.due_date) {
          set.due_date = a.body.dueDate;
          changes.dueDate = { from: wo.due_date, to: a.body.dueDate };
        }
        await update(em, wo.id, set);
        await addEvent(em, wo.id, actorId, 'triaged', {
          from: wo.status,
          to: 'triaged',
          changes,
          comment: a.body.comment,
        });
        break;
      }
      case 'assign': {
        assertMay('assign', wo);
        const [member] = (await em.query(
          `SELECT "user_id" FROM "memberships" WHERE "user_id" = $1 AND "site_id" = $2`,
          [a.body.userId, siteId],
        )) as unknown[];
        if (!member) {
          throw new AppError(400, 'validation', 'Invalid request body: userId: is not a member of this site', [
            { path: 'userId', message: 'Must be a member of the work order’s site' },
          ]);
        }
        await update(em, wo.id, { assignee_id: a.body.userId });
        await addEvent(em, wo.id, actorId, 'assigned', {
          changes: { assignee: { from: wo.assignee_id, to: a.body.userId } },
          comment: a.body.comment,
        });
        const userId = a.body.userId;
        if (notify) after.push(() => notifySafely(logger, 'assigned', () => notify.assigned(wo.id, userId)));
        break;
      }
      case 'schedule': {
        assertMay('schedule', wo);
        const set: Record<string, unknown> = { status: 'scheduled', scheduled_for: a.body.scheduledFor };
        const changes: Record<string, unknown> = { scheduledFor: { from: wo.scheduled_for, to: a.body.scheduledFor } };
        if (a.body.dueDate !== undefined && a.body.dueDate !== wo.due_date) {
          set.due_date = a.body.dueDate;
          changes.dueDate = { from: wo.due_date, to: a.body.dueDate };
        }
        await update(em, wo.id, set);
        await addEvent(em, wo.id, actorId, 'scheduled', {
          from: wo.status,
          to: 'scheduled',
          changes,
          comment: a.body.comment,
        });
        break;
      }
      case 'start': {
        assertMay('start', wo);
        await update(em, wo.id, { status: 'in-progress' });
        await addEvent(em, wo.id, actorId, 'started', { from: wo.status, to: 'in-progress', comment: a.body.comment });
        break;
      }
      case 'close': {
        assertMay('close', wo);
        const changes: Record<string, unknown> = {};
        if (wo.kind === 'calibrate') {
          const c = a.body.calibration;
          if (!c) {
            throw new AppError(
              400,
              'validation',
              'Invalid request body: calibration: Required to close a calibrate work order (as found, as left, date)',
              [{ path: 'calibration', message: 'Required to close a calibrate work order' }],
            );
          }
          if (c.calibratedOn > addDays(todayUtc(), 1)) {
            throw new AppError(
              400,
              'validation',
              `Invalid request body: calibration.calibratedOn: ${c.calibratedOn} lies in the future`,
              [{ path: 'calibration.calibratedOn', message: 'Must not lie in the future' }],
            );
          }
          const [inst] = (await em.query(
            `SELECT "id", "tag", "quantity", "gauge_unit", "reference" FROM "instruments" WHERE "id" = $1 FOR UPDATE`,
            [wo.instrument_id],
          )) as {
            id: string;
            tag: string;
            quantity: Quantity;
            gauge_unit: string;
            reference: 'absolute' | 'gauge' | 'vacuum' | null;
          }[];
          if (c.unit !== undefined) {
            let same = false;
            try {
              same = resolveUnit(inst.quantity, c.unit).unit === resolveUnit(inst.quantity, inst.gauge_unit).unit;
            } catch (e) {
              if (!(e instanceof UnitError)) throw e;
            }
            if (!same) {
              throw new AppError(
                400,
                'validation',
                `Invalid request body: calibration.unit: ${inst.tag} reads in ${inst.gauge_unit}, got "${c.unit}"`,
                [{ path: 'calibration.unit', message: `Must be the instrument's own unit, ${inst.gauge_unit}` }],
              );
            }
          }
          const [{ id: recordId }] = (await em.query(
            `INSERT INTO "calibration_records" ("work_order_id", "instrument_id", "site_id", "as_found", "as_left", "unit", "reference", "calibrated_on", "calibrated_by", "note")
             VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10) RETURNING "id"`,
            [
              wo.id,
              inst.id,
              siteId,
              c.asFound,
              c.asLeft,
              inst.gauge_unit,
              inst.reference,
              c.calibratedOn,
              actorId,
              c.note ?? null,
            ],
          )) as { id: string }[];
          await em.query(
            `UPDATE "instruments" SET "status" = 'ok', "calibration_date" = $2, "row_version" = "row_version" + 1, "updated_at" = now() WHERE "id" = $1`,
            [inst.id, c.calibratedOn],
          );
          changes.calibrationRecordId = recordId;
          changes.calibration = {
            asFound: c.asFound,
            asLeft: c.asLeft,
            unit: inst.gauge_unit,
            calibratedOn: c.calibratedOn,
          };
        } else if (a.body.calibration) {
          throw new AppError(
            400,
            'validation',
            `Invalid request body: calibration: only a calibrate work order takes a calibration record; ${wo.code} is ${wo.kind}`,
            [{ path: 'calibration', message: 'Only for calibrate work orders' }],
          );
        }
        await em.query(
          `UPDATE "work_orders" SET "status" = 'done', "closed_at" = now(), "updated_at" = now() WHERE "id" = $1`,
          [wo.id],
        );
        await addEvent(em, wo.id, actorId, 'closed', { from: wo.status, to: 'done', changes, comment: a.body.comment });
        break;
      }
      case 'cancel': {
        assertMay('cancel', wo);
        await em.query(
          `UPDATE "work_orders" SET "status" = 'cancelled', "cancel_reason" = $2, "closed_at" = now(), "updated_at" = now() WHERE "id" = $1`,
          [wo.id, a.body.reason],
        );
        await addEvent(em, wo.id, actorId, 'cancelled', { from: wo.status, to: 'cancelled', comment: a.body.reason });
        if (wo.kind === 'calibrate' && wo.instrument_id) await clearSuspect(em, wo.instrument_id);
        break;
      }
      case 'comment': {
        await em.query(`UPDATE "work_orders" SET "updated_at" = now() WHERE "id" = $1`, [wo.id]);
        await addEvent(em, wo.id, actorId, 'comment', { comment: a.body.comment });
        break;
      }
    }
  });
  for (const f of after) await f();
  return getWorkOrder(dataSource, siteId, id);
}

/**
 * Merge: the duplicates' findings and history move into the target; each duplicate is cancelled
 * "merged into WO-xxxx". All must be open (not done/cancelled) and on this site. The site's counter
 * row is locked first, as the analysis does, so a merge and an analysis never deadlock.
 */
async function merge(
  em: EntityManager,
  siteId: string,
  targetId: string,
  actorId: string,
  body: MergeRequest,
): Promise<void> {
  const dupIds = [...new Set(body.duplicateIds)];
  if (dupIds.includes(targetId)) {
    throw new AppError(
      400,
      'validation',
      'Invalid request body: duplicateIds: a work order cannot be merged into itself',
      [{ path: 'duplicateIds', message: 'Must not contain the target work order' }],
    );
  }
  if (!UUID_RE.test(targetId)) throw notFound();
  await lockSiteCounter(em, siteId);
  const ids = [targetId, ...dupIds].sort();
  const rows = (await em.query(
    `SELECT ${LOCK_COLUMNS} FROM "work_orders" WHERE "id" = ANY($1::uuid[]) AND "site_id" = $2 ORDER BY "id" FOR UPDATE`,
    [ids, siteId],
  )) as LockedRow[];
  const byId = new Map(rows.map((r) => [r.id, r]));
  for (const id of ids) if (!byId.has(id)) throw notFound();
  const target = byId.get(targetId)!;
  assertMay('merge', target);
  const dups = dupIds.map((d) => byId.get(d)!);
  for (const d of dups) {
    if (isClosed(d.status)) {
      throw new AppError(
        409,
        'conflict',
        `${d.code} cannot be merged: it is ${d.status}; only open work orders merge (flow: ${'open → triaged → scheduled → in-progress'})`,
        {
          workOrder: d.code,
          action: 'merge',
          status: d.status,
        },
      );
    }
  }
  const codes = dups.map((d) => d.code);
  await em.query(
    `INSERT INTO "work_order_findings" ("work_order_id", "finding_id", "attached_at")
     SELECT $1, "finding_id", "attached_at" FROM "work_order_findings" WHERE "work_order_id" = ANY($2::uuid[])
     ON CONFLICT DO NOTHING`,
    [target.id, dupIds],
  );
  await em.query(`DELETE FROM "work_order_findings" WHERE "work_order_id" = ANY($1::uuid[])`, [dupIds]);
  await em.query(
    `UPDATE "work_order_events" e SET "work_order_id" = $1, "changes" = e."changes" || jsonb_build_object('movedFrom', d."code")
       FROM "work_orders" d WHERE d."id" = e."work_order_id" AND d."id" = ANY($2::uuid[])`,
    [target.id, dupIds],
  );
  for (const d of dups) {
    const reason = `merged into ${target.code}`;
    await em.query(
      `UPDATE "work_orders" SET "status" = 'cancelled', "cancel_reason" = $2, "merged_into_id" = $3, "closed_at" = now(), "updated_at" = now() WHERE "id" = $1`,
      [d.id, reason, target.id],
    );
    await addEvent(em, d.id, actorId, 'cancelled', {
      from: d.status,
      to: 'cancelled',
      changes: { mergedInto: target.code },
      comment: reason,
    });
  }
  const priority = Math.min(target.priority, ...dups.map((d) => d.priority));
  await update(em, target.id, priority !== target.priority ? { priority } : {});
  await addEvent(em, target.id, actorId, 'merged', {
    changes: {
      duplicates: codes,
      ...(priority !== target.priority ? { priority: { from: target.priority, to: priority } } : {}),
    },
    comment: body.comment ?? `Merged ${codes.join(', ')} into ${target.code}`,
  });
  for (const d of dups) {
    if (
      d.kind === 'calibrate' &&
      d.instrument_id &&
      !(target.kind === 'calibrate' && target.instrument_id === d.instrument_id)
    ) {
      await clearSuspect(em, d.instrument_id);
    }
  }
}
