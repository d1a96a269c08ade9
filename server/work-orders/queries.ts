/**
 * Work orders as the planner reads them: the list and the detail with its evidence and history.
 * Reads only; the actions are in ./actions.ts, the SQL in ./repository.ts.
 */
import type { DataSource } from 'typeorm';
import {
  EVIDENCE_ROUNDS_PAGE,
  type EvidenceItem,
  type EvidencePage,
  type EvidenceSummary,
  type ReconciliationSummary,
  type WorkOrderDetail,
  type WorkOrderEventView,
  type WorkOrderListFilters,
  type WorkOrderListResponse,
  type WorkOrderSummary,
} from '../../shared/api/work-orders';
import { SI_UNIT } from '../../shared/units';
import { AppError } from '../errors';
import { allowedActions } from './policy';
import { calibrations, events, findings, orders, type Db, type SummaryRow } from './repository';

type ListQuery = WorkOrderListFilters;

export const UUID_RE = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
// No id in the message: an unknown id and another site's answer byte for byte alike (tests/api/security-route-guards).
export const notFound = () => new AppError(404, 'not_found', 'Work order not found on this site');
export const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);

export function summaryOf(r: SummaryRow): WorkOrderSummary {
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
  const named = q.status?.filter((s) => s !== 'active');
  const { rows, total } = await orders.page(
    ds,
    siteId,
    {
      statuses: q.status ? (named as WorkOrderSummary['status'][]) : undefined,
      orOpen: q.status?.includes('active'),
      priorities: q.priority,
      kinds: q.kind,
      unitId: q.unitId,
      tag: q.tag,
      assigneeId: q.assigneeId,
      text: q.q ? { like: `%${likeEscape(q.q)}%`, number: numberOf(q.q) } : undefined,
    },
    SORTS[q.sort],
    q.limit,
    q.offset,
  );
  return { items: rows.map(summaryOf), total, limit: q.limit, offset: q.offset };
}

export function reconciliationSummaryOf(r: unknown): ReconciliationSummary {
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

/** The evidence of rounds offset…offset+limit of the order (newest round first). */
async function evidenceOf(ds: Db, workOrderId: string, offset: number, limit: number): Promise<EvidenceItem[]> {
  const found = await findings.ofOrderRounds(ds, workOrderId, offset, limit);
  if (found.length === 0) return [];
  const ai = await findings.analysisInstruments(
    ds,
    found.flatMap((f) => f.instrument_ids.map((i) => [f.analysis_id, i] as const)),
  );
  const readingIds = [...new Set(ai.map((r) => r.reading_id).filter((x): x is string => !!x))];
  const readings = await findings.readings(ds, readingIds);
  const photos = await findings.photos(ds, readingIds);
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
  return found.map((f) => {
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

/** How many of the newest findings the summary names. */
export const LATEST_FINDINGS = 3;

async function summaryOfEvidence(ds: Db, row: SummaryRow): Promise<EvidenceSummary> {
  const counts = await findings.counts(ds, row.id);
  const latest = await findings.latest(ds, row.id, LATEST_FINDINGS);
  const quantity = row.instrument_id ? await orders.quantityOf(ds, row.instrument_id) : undefined;
  const trend = row.instrument_id && quantity ? await findings.corrections(ds, row.id, row.instrument_id) : [];
  return {
    findingCount: counts.findings,
    roundCount: counts.rounds,
    firstSeenAt: iso(counts.first_at),
    lastSeenAt: iso(counts.last_at),
    trend: trend.map((t) => {
      // VDI 2048: the correction's variance is the reading's less the reconciled value's
      const v =
        t.sigma_si !== null && t.reconciled_sigma_si !== null ? t.sigma_si ** 2 - t.reconciled_sigma_si ** 2 : null;
      return {
        roundId: t.round_id,
        at: iso(t.at)!,
        correction: t.reconciled_si - t.reading_si,
        sigma: v !== null && v > 0 ? Math.sqrt(v) : null,
        z: t.z,
      };
    }),
    trendUnit: quantity ? (quantity === 'level' ? '1' : SI_UNIT[quantity]) : null,
    latest: latest.map((f) => ({
      findingId: f.id,
      roundId: f.round_id,
      at: iso(f.created_at)!,
      severity: f.severity,
      message: f.message,
    })),
  };
}

/** A page of an order's evidence by round (GET …/work-orders/:id/evidence). */
export async function evidencePage(
  ds: DataSource,
  siteId: string,
  id: string,
  q: { offset: number; limit: number },
): Promise<EvidencePage> {
  if (!UUID_RE.test(id)) throw notFound();
  const row = await orders.summary(ds, siteId, id);
  if (!row) throw notFound();
  const counts = await findings.counts(ds, id);
  return {
    items: await evidenceOf(ds, id, q.offset, q.limit),
    rounds: counts.rounds,
    offset: q.offset,
    limit: q.limit,
  };
}

export async function getWorkOrder(ds: DataSource, siteId: string, id: string): Promise<WorkOrderDetail> {
  if (!UUID_RE.test(id)) throw notFound();
  const row = await orders.summary(ds, siteId, id);
  if (!row) throw notFound();
  const history = await events.ofOrder(ds, siteId, id);
  const records = await calibrations.ofOrder(ds, siteId, id);
  const evidenceSummary = await summaryOfEvidence(ds, row);
  return {
    ...summaryOf(row),
    evidenceSummary,
    evidence: await evidenceOf(ds, id, 0, EVIDENCE_ROUNDS_PAGE),
    evidencePage: { rounds: evidenceSummary.roundCount, offset: 0, limit: EVIDENCE_ROUNDS_PAGE },
    events: history.map((e): WorkOrderEventView => ({
      id: e.id,
      at: iso(e.at)!,
      actor: e.actor_id ? { id: e.actor_id, name: e.actor_name ?? '' } : null,
      type: e.type,
      fromStatus: e.from_status,
      toStatus: e.to_status,
      changes: e.changes,
      comment: e.comment,
    })),
    calibrations: records.map((c) => ({
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
