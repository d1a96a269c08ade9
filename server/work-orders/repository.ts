/**
 * The work-order tables behind one set of functions, so service code never writes SQL by hand:
 *   orders   — work_orders (summary rows for lists and the detail, row locks, updates, the open-order lookup)
 *   findings — work_order_findings and what a finding rests on (analysis instruments, readings, photos)
 *   events   — work_order_events (the history)
 * "Open" is every status outside CLOSED_STATUSES (./policy.ts); the SQL for it is built here once.
 * Each function takes a DataSource or, inside a transaction, its EntityManager.
 */
import type { DataSource, EntityManager } from 'typeorm';
import type { CalibrationRecordView, WorkOrderKind, WorkOrderStatus } from '../../shared/api/work-orders';
import type { Quantity } from '../../shared/units';
import { CLOSED_STATUSES } from './policy';

export type Db = DataSource | EntityManager;

/** `<alias>."status" NOT IN ('done', 'cancelled')` from CLOSED_STATUSES (literals, so index predicates match). */
export function openStatusSql(alias?: string): string {
  const col = alias ? `${alias}."status"` : `"status"`;
  return `${col} NOT IN (${CLOSED_STATUSES.map((s) => `'${s}'`).join(', ')})`;
}

// ------------------------------------------------------------------------------------ orders

export interface SummaryRow {
  id: string;
  code: string;
  site_id: string;
  unit_id: string;
  kind: WorkOrderKind;
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

/** The filters of a list, as SQL over alias `w` with its parameters ($1 is the site). */
export interface OrderFilter {
  statuses?: readonly WorkOrderStatus[];
  /** with `statuses`: OR every open status */
  orOpen?: boolean;
  priorities?: readonly number[];
  kinds?: readonly WorkOrderKind[];
  unitId?: string;
  tag?: string;
  assigneeId?: string;
  /** ILIKE over code, title and tag (already escaped), or the number */
  text?: { like: string; number: number | null };
}

function whereOf(siteId: string, f: OrderFilter): { where: string; params: unknown[] } {
  const params: unknown[] = [siteId];
  const where: string[] = ['w."site_id" = $1'];
  if (f.statuses || f.orOpen) {
    const parts: string[] = [];
    if (f.statuses?.length) parts.push(`w."status" = ANY($${params.push(f.statuses)}::work_order_status[])`);
    if (f.orOpen) parts.push(openStatusSql('w'));
    where.push(`(${parts.join(' OR ')})`);
  }
  if (f.priorities) where.push(`w."priority" = ANY($${params.push(f.priorities)}::smallint[])`);
  if (f.kinds) where.push(`w."kind" = ANY($${params.push(f.kinds)}::work_order_kind[])`);
  if (f.unitId) where.push(`w."unit_id" = $${params.push(f.unitId)}`);
  if (f.tag) where.push(`upper(w."instrument_tag") = upper($${params.push(f.tag)})`);
  if (f.assigneeId) where.push(`w."assignee_id" = $${params.push(f.assigneeId)}`);
  if (f.text) {
    const p = params.push(f.text.like);
    const n = f.text.number;
    where.push(
      `(w."code" ILIKE $${p} OR w."title" ILIKE $${p} OR w."instrument_tag" ILIKE $${p}${n !== null ? ` OR w."number" = $${params.push(n)}` : ''})`,
    );
  }
  return { where: where.join(' AND '), params };
}

export interface LockedRow {
  id: string;
  code: string;
  site_id: string;
  kind: WorkOrderKind;
  status: WorkOrderStatus;
  priority: number;
  instrument_id: string | null;
  assignee_id: string | null;
  due_date: string | null;
  scheduled_for: string | null;
}

const LOCK_COLUMNS = `"id", "code", "site_id", "kind", "status", "priority", "instrument_id", "assignee_id",
  to_char("due_date", 'YYYY-MM-DD') AS "due_date", to_char("scheduled_for", 'YYYY-MM-DD') AS "scheduled_for"`;

/** The columns of a work order that an action may set (column name → value). */
export type OrderSet = Partial<
  Record<
    | 'status'
    | 'priority'
    | 'due_date'
    | 'scheduled_for'
    | 'assignee_id'
    | 'cancel_reason'
    | 'merged_into_id'
    | 'closed_at'
    | 'reopen_count',
    unknown
  >
>;

export interface OpenOrderRow {
  id: string;
  code: string;
  status: WorkOrderStatus;
  priority: number;
}

export const orders = {
  /** A page of summaries in `orderBy` (SQL over alias `w`), with the total of the filter. */
  async page(
    db: Db,
    siteId: string,
    f: OrderFilter,
    orderBy: string,
    limit: number,
    offset: number,
  ): Promise<{ rows: SummaryRow[]; total: number }> {
    const { where, params } = whereOf(siteId, f);
    const rows = (await db.query(
      `SELECT ${SUMMARY_COLUMNS}, count(*) OVER ()::int AS "total"
         FROM ${SUMMARY_FROM}
        WHERE ${where}
        ORDER BY ${orderBy}
        LIMIT $${params.length + 1} OFFSET $${params.length + 2}`,
      [...params, limit, offset],
    )) as (SummaryRow & { total: number })[];
    let total = rows[0]?.total ?? 0;
    if (rows.length === 0 && offset > 0) {
      const [c] = (await db.query(`SELECT count(*)::int AS "n" FROM "work_orders" w WHERE ${where}`, params)) as {
        n: number;
      }[];
      total = c.n;
    }
    return { rows, total };
  },

  async summary(db: Db, siteId: string, id: string): Promise<SummaryRow | undefined> {
    const [row] = (await db.query(
      `SELECT ${SUMMARY_COLUMNS} FROM ${SUMMARY_FROM} WHERE w."id" = $1 AND w."site_id" = $2`,
      [id, siteId],
    )) as SummaryRow[];
    return row;
  },

  /** Every order of the site in number order, for the CSV export. */
  async allOfSite(db: Db, siteId: string): Promise<SummaryRow[]> {
    return (await db.query(
      `SELECT ${SUMMARY_COLUMNS} FROM ${SUMMARY_FROM} WHERE w."site_id" = $1 ORDER BY w."number"`,
      [siteId],
    )) as SummaryRow[];
  },

  /** The rows locked FOR UPDATE, in id order (so two lockers never deadlock). */
  async lock(em: EntityManager, siteId: string, ids: readonly string[]): Promise<LockedRow[]> {
    return (await em.query(
      `SELECT ${LOCK_COLUMNS} FROM "work_orders" WHERE "id" = ANY($1::uuid[]) AND "site_id" = $2 ORDER BY "id" FOR UPDATE`,
      [[...ids].sort(), siteId],
    )) as LockedRow[];
  },

  /** Sets the fields given and updated_at (`closed_at: 'now'` stamps the time). */
  async update(em: EntityManager, id: string, set: OrderSet): Promise<void> {
    const params: unknown[] = [id];
    const parts = Object.entries(set).map(([c, v]) =>
      v === 'now' && c === 'closed_at' ? `"${c}" = now()` : `"${c}" = $${params.push(v)}`,
    );
    await em.query(`UPDATE "work_orders" SET ${[...parts, `"updated_at" = now()`].join(', ')} WHERE "id" = $1`, params);
  },

  /** The open order of this kind on an instrument (site) or, without one, on an equipment (unit), locked. */
  async openFor(
    em: EntityManager,
    target: { siteId: string; instrumentId: string } | { unitId: string; equipmentRef: string },
    kind: WorkOrderKind,
  ): Promise<OpenOrderRow | undefined> {
    const [row] = (
      'instrumentId' in target
        ? await em.query(
            `SELECT "id", "code", "status", "priority" FROM "work_orders"
              WHERE "site_id" = $1 AND "instrument_id" = $2 AND "kind" = $3 AND ${openStatusSql()} FOR UPDATE`,
            [target.siteId, target.instrumentId, kind],
          )
        : await em.query(
            `SELECT "id", "code", "status", "priority" FROM "work_orders"
              WHERE "unit_id" = $1 AND "equipment_ref" = $2 AND "kind" = $3 AND "instrument_id" IS NULL AND ${openStatusSql()} FOR UPDATE`,
            [target.unitId, target.equipmentRef, kind],
          )
    ) as OpenOrderRow[];
    return row;
  },

  /** The instrument back to ok when it was suspect and no open calibrate order remains on it. */
  async clearSuspect(em: EntityManager, instrumentId: string): Promise<void> {
    await em.query(
      `UPDATE "instruments" SET "status" = 'ok', "row_version" = "row_version" + 1, "updated_at" = now()
        WHERE "id" = $1 AND "status" = 'suspect'
          AND NOT EXISTS (SELECT 1 FROM "work_orders" w WHERE w."instrument_id" = $1 AND w."kind" = 'calibrate' AND ${openStatusSql('w')})`,
      [instrumentId],
    );
  },

  async quantityOf(db: Db, instrumentId: string): Promise<Quantity | undefined> {
    const [row] = (await db.query(`SELECT "quantity" FROM "instruments" WHERE "id" = $1`, [instrumentId])) as {
      quantity: Quantity;
    }[];
    return row?.quantity;
  },

  async isMember(em: EntityManager, siteId: string, userId: string): Promise<boolean> {
    const rows = (await em.query(`SELECT 1 FROM "memberships" WHERE "user_id" = $1 AND "site_id" = $2`, [
      userId,
      siteId,
    ])) as unknown[];
    return rows.length > 0;
  },
};

// ------------------------------------------------------------------------------------ findings

export interface EvidenceFindingRow {
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
}

export interface AnalysisInstrumentRow {
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
}

export interface EvidenceReadingRow {
  id: string;
  tag: string;
  value_typed: string | null;
  unit: string;
  reference: string | null;
  value_si: number | null;
  device_time: Date;
  note: string | null;
}

export interface PhotoRow {
  id: string;
  reading_id: string;
  status: string;
}

export interface EvidenceCountRow {
  findings: number;
  rounds: number;
  first_at: Date | null;
  last_at: Date | null;
}

export interface LatestFindingRow {
  id: string;
  round_id: string;
  created_at: Date;
  severity: number;
  message: string;
}

export interface CorrectionRow {
  round_id: string;
  at: Date;
  reading_si: number;
  reconciled_si: number;
  sigma_si: number | null;
  reconciled_sigma_si: number | null;
  z: number | null;
}

export const findings = {
  /** The findings of the order's rounds `offset`…`offset + limit` (rounds by their newest finding, newest first). */
  async ofOrderRounds(db: Db, workOrderId: string, offset: number, limit: number): Promise<EvidenceFindingRow[]> {
    return (await db.query(
      `WITH "page" AS (
         SELECT f."round_id", max(f."created_at") AS "last"
           FROM "work_order_findings" wf JOIN "findings" f ON f."id" = wf."finding_id"
          WHERE wf."work_order_id" = $1
          GROUP BY f."round_id"
          ORDER BY "last" DESC, f."round_id" DESC
          LIMIT $2 OFFSET $3)
       SELECT f."id", f."analysis_id", f."round_id", f."kind", f."severity", f."message", f."instrument_tags", f."instrument_ids", f."evidence",
              f."created_at", wf."attached_at", a."is_current", a."reconciliation"
         FROM "work_order_findings" wf
         JOIN "findings" f ON f."id" = wf."finding_id"
         JOIN "page" p ON p."round_id" = f."round_id"
         JOIN "analyses" a ON a."id" = f."analysis_id"
        WHERE wf."work_order_id" = $1
        ORDER BY p."last" DESC, f."round_id" DESC, f."created_at", f."ordinal"`,
      [workOrderId, limit, offset],
    )) as EvidenceFindingRow[];
  },

  /** How many findings and rounds the order's evidence holds, and when it was first and last seen. */
  async counts(db: Db, workOrderId: string): Promise<EvidenceCountRow> {
    const [row] = (await db.query(
      `SELECT count(*)::int AS "findings", count(DISTINCT f."round_id")::int AS "rounds", min(f."created_at") AS "first_at", max(f."created_at") AS "last_at"
         FROM "work_order_findings" wf JOIN "findings" f ON f."id" = wf."finding_id"
        WHERE wf."work_order_id" = $1`,
      [workOrderId],
    )) as EvidenceCountRow[];
    return row;
  },

  /** The newest `n` findings of the order, newest first. */
  async latest(db: Db, workOrderId: string, n: number): Promise<LatestFindingRow[]> {
    return (await db.query(
      `SELECT f."id", f."round_id", f."created_at", f."severity", f."message"
         FROM "work_order_findings" wf JOIN "findings" f ON f."id" = wf."finding_id"
        WHERE wf."work_order_id" = $1
        ORDER BY f."created_at" DESC, f."ordinal" DESC LIMIT $2`,
      [workOrderId, n],
    )) as LatestFindingRow[];
  },

  /** The instrument's reading and reconciled value on each analysis the order's findings come from, oldest first. */
  async corrections(db: Db, workOrderId: string, instrumentId: string): Promise<CorrectionRow[]> {
    return (await db.query(
      `SELECT ai."round_id", COALESCE(ai."measured_at", a."analysed_at") AS "at", ai."reading_si", ai."reconciled_si", ai."sigma_si", ai."reconciled_sigma_si", ai."z"
         FROM "analysis_instruments" ai JOIN "analyses" a ON a."id" = ai."analysis_id"
        WHERE ai."instrument_id" = $2 AND ai."reading_si" IS NOT NULL AND ai."reconciled_si" IS NOT NULL
          AND ai."analysis_id" IN (SELECT f."analysis_id" FROM "work_order_findings" wf JOIN "findings" f ON f."id" = wf."finding_id" WHERE wf."work_order_id" = $1)
        ORDER BY "at", ai."round_id"`,
      [workOrderId, instrumentId],
    )) as CorrectionRow[];
  },

  /** The analysis' view of each (analysis, instrument) pair. */
  async analysisInstruments(
    db: Db,
    pairs: readonly (readonly [analysisId: string, instrumentId: string])[],
  ): Promise<AnalysisInstrumentRow[]> {
    if (pairs.length === 0) return [];
    return (await db.query(
      `SELECT ai."analysis_id", ai."instrument_id", i."tag", ai."reading_id", ai."reading_si", ai."sigma_si", ai."reconciled_si", ai."reconciled_sigma_si",
              ai."estimate_si", ai."estimate_sigma_si", ai."z", ai."suspect"
         FROM "analysis_instruments" ai JOIN "instruments" i ON i."id" = ai."instrument_id"
        WHERE (ai."analysis_id", ai."instrument_id") IN (SELECT * FROM unnest($1::uuid[], $2::uuid[]))`,
      [pairs.map((p) => p[0]), pairs.map((p) => p[1])],
    )) as AnalysisInstrumentRow[];
  },

  async readings(db: Db, readingIds: readonly string[]): Promise<EvidenceReadingRow[]> {
    if (readingIds.length === 0) return [];
    return (await db.query(
      `SELECT r."id", i."tag", r."value_typed", r."unit", r."reference", r."value_si", r."device_time", r."note"
         FROM "readings" r JOIN "instruments" i ON i."id" = r."instrument_id" WHERE r."id" = ANY($1::uuid[])`,
      [readingIds],
    )) as EvidenceReadingRow[];
  },

  async photos(db: Db, readingIds: readonly string[]): Promise<PhotoRow[]> {
    if (readingIds.length === 0) return [];
    return (await db.query(
      `SELECT "id", "reading_id", "status" FROM "photos" WHERE "reading_id" = ANY($1::uuid[]) ORDER BY "received_at", "id"`,
      [readingIds],
    )) as PhotoRow[];
  },

  async attach(em: EntityManager, workOrderId: string, findingIds: readonly string[]): Promise<void> {
    if (findingIds.length === 0) return;
    const params: unknown[] = [workOrderId];
    const values = findingIds.map((id) => `($1, $${params.push(id)})`);
    await em.query(
      `INSERT INTO "work_order_findings" ("work_order_id", "finding_id") VALUES ${values.join(', ')} ON CONFLICT DO NOTHING`,
      params,
    );
  },

  /** The findings of `fromIds` move to `toId` (kept once, with their attach time). */
  async move(em: EntityManager, fromIds: readonly string[], toId: string): Promise<void> {
    await em.query(
      `INSERT INTO "work_order_findings" ("work_order_id", "finding_id", "attached_at")
       SELECT $1, "finding_id", "attached_at" FROM "work_order_findings" WHERE "work_order_id" = ANY($2::uuid[])
       ON CONFLICT DO NOTHING`,
      [toId, fromIds],
    );
    await em.query(`DELETE FROM "work_order_findings" WHERE "work_order_id" = ANY($1::uuid[])`, [fromIds]);
  },
};

// ------------------------------------------------------------------------------------ events

export interface EventRow {
  id: string;
  at: Date;
  actor_id: string | null;
  actor_name: string | null;
  type: string;
  from_status: WorkOrderStatus | null;
  to_status: WorkOrderStatus | null;
  changes: Record<string, unknown>;
  comment: string | null;
}

export interface NewEvent {
  actorId?: string | null;
  from?: WorkOrderStatus | null;
  to?: WorkOrderStatus | null;
  changes?: Record<string, unknown>;
  comment?: string | null;
}

export const events = {
  async ofOrder(db: Db, siteId: string, workOrderId: string): Promise<EventRow[]> {
    return (await db.query(
      `SELECT e."id", e."at", e."actor_id", COALESCE(em."display_name", u."name") AS "actor_name", e."type", e."from_status", e."to_status", e."changes", e."comment"
         FROM "work_order_events" e LEFT JOIN "users" u ON u."id" = e."actor_id"
         LEFT JOIN "memberships" em ON em."user_id" = e."actor_id" AND em."site_id" = $2
        WHERE e."work_order_id" = $1 ORDER BY e."at", e."id"`,
      [workOrderId, siteId],
    )) as EventRow[];
  },

  async add(em: EntityManager, workOrderId: string, type: string, e: NewEvent = {}): Promise<void> {
    await em.query(
      `INSERT INTO "work_order_events" ("work_order_id", "actor_id", "type", "from_status", "to_status", "changes", "comment") VALUES ($1, $2, $3, $4, $5, $6, $7)`,
      [
        workOrderId,
        e.actorId ?? null,
        type,
        e.from ?? null,
        e.to ?? null,
        JSON.stringify(e.changes ?? {}),
        e.comment ?? null,
      ],
    );
  },

  /** The history of `fromIds` moves to `toId`, each event marked with the code it came from. */
  async move(em: EntityManager, fromIds: readonly string[], toId: string): Promise<void> {
    await em.query(
      `UPDATE "work_order_events" e SET "work_order_id" = $1, "changes" = e."changes" || jsonb_build_object('movedFrom', d."code")
         FROM "work_orders" d WHERE d."id" = e."work_order_id" AND d."id" = ANY($2::uuid[])`,
      [toId, fromIds],
    );
  },
};

// ------------------------------------------------------------------------------------ calibrations

export interface CalibrationRow {
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
}

export interface CalibratedInstrumentRow {
  id: string;
  tag: string;
  quantity: Quantity;
  gauge_unit: string;
  reference: 'absolute' | 'gauge' | 'vacuum' | null;
}

export const calibrations = {
  async ofOrder(db: Db, siteId: string, workOrderId: string): Promise<CalibrationRow[]> {
    return (await db.query(
      `SELECT c."id", c."work_order_id", c."instrument_id", c."as_found", c."as_left", c."unit", c."reference", to_char(c."calibrated_on", 'YYYY-MM-DD') AS "calibrated_on",
              c."calibrated_by", COALESCE(cm."display_name", u."name") AS "calibrated_by_name", c."note"
         FROM "calibration_records" c JOIN "users" u ON u."id" = c."calibrated_by"
         LEFT JOIN "memberships" cm ON cm."user_id" = c."calibrated_by" AND cm."site_id" = $2
        WHERE c."work_order_id" = $1 ORDER BY c."created_at"`,
      [workOrderId, siteId],
    )) as CalibrationRow[];
  },

  async lockInstrument(em: EntityManager, instrumentId: string): Promise<CalibratedInstrumentRow | undefined> {
    const [row] = (await em.query(
      `SELECT "id", "tag", "quantity", "gauge_unit", "reference" FROM "instruments" WHERE "id" = $1 FOR UPDATE`,
      [instrumentId],
    )) as CalibratedInstrumentRow[];
    return row;
  },

  /** Stores the record and marks the instrument ok, calibrated on that date; returns the record's id. */
  async record(
    em: EntityManager,
    r: {
      workOrderId: string;
      siteId: string;
      instrument: CalibratedInstrumentRow;
      asFound: number;
      asLeft: number;
      calibratedOn: string;
      calibratedBy: string;
      note: string | null;
    },
  ): Promise<string> {
    const [{ id }] = (await em.query(
      `INSERT INTO "calibration_records" ("work_order_id", "instrument_id", "site_id", "as_found", "as_left", "unit", "reference", "calibrated_on", "calibrated_by", "note")
       VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10) RETURNING "id"`,
      [
        r.workOrderId,
        r.instrument.id,
        r.siteId,
        r.asFound,
        r.asLeft,
        r.instrument.gauge_unit,
        r.instrument.reference,
        r.calibratedOn,
        r.calibratedBy,
        r.note,
      ],
    )) as { id: string }[];
    await em.query(
      `UPDATE "instruments" SET "status" = 'ok', "calibration_date" = $2, "row_version" = "row_version" + 1, "updated_at" = now() WHERE "id" = $1`,
      [r.instrument.id, r.calibratedOn],
    );
    return id;
  },
};
