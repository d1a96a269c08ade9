/**
 * Reading stored analyses and the analysis job queue.
 *  - roundAnalysis: a round's current analysis with its findings, the work orders they feed and
 *    where each reading came from (this round or another round of the unit: reading-origins.ts);
 *  - analysisJobs: pg-boss jobs of the site's rounds (queued, active, retrying, failed), read from
 *    pg-boss' own tables (job, and archive for older ones); none before pg-boss first started.
 */
import type { DataSource } from 'typeorm';
import type { AnalysisJob, AnalysisJobsResponse, FindingView, RoundAnalysisResponse } from '../../shared/api/analysis';
import { AppError } from '../errors';
import { reconciliationSummaryOf } from '../work-orders/queries';
import { ANALYSIS_QUEUE, PGBOSS_SCHEMA } from './queue';
import { readingOrigins } from './reading-origins';

const UUID_RE = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** The round's stored skew (server receive − device send, ms) as device clock − server clock, s (ms resolution). */
const clockSkewS = (serverMinusDeviceMs: string | number): number => -Number(serverMinusDeviceMs) / 1000 || 0;

export async function roundAnalysis(ds: DataSource, siteId: string, roundId: string): Promise<RoundAnalysisResponse> {
  if (!UUID_RE.test(roundId)) throw new AppError(404, 'not_found', 'Round not found on this site');
  const [round] = (await ds.query(
    `SELECT "id", "status", "client_clock_skew_ms" FROM "rounds" WHERE "id" = $1 AND "site_id" = $2`,
    [roundId, siteId],
  )) as {
    id: string;
    status: string;
    client_clock_skew_ms: string;
  }[];
  if (!round) throw new AppError(404, 'not_found', 'Round not found on this site');
  const [a] = (await ds.query(
    `SELECT "id", "round_id", "unit_id", "analysed_at", "input_hash", "model_version", "device_model_version", "model_version_mismatch", "barometric_pa",
            "barometric_source", "reconciliation", "state_points", "balances", "performance", "instruments"
       FROM "analyses" WHERE "round_id" = $1 AND "is_current"`,
    [roundId],
  )) as {
    id: string;
    round_id: string;
    unit_id: string;
    analysed_at: Date;
    input_hash: string;
    model_version: string;
    device_model_version: string | null;
    model_version_mismatch: boolean;
    barometric_pa: number;
    barometric_source: 'reading' | 'elevation';
    reconciliation: unknown;
    state_points: RoundAnalysisResponse['statePoints'];
    balances: RoundAnalysisResponse['balances'];
    performance: RoundAnalysisResponse['performance'];
    instruments: RoundAnalysisResponse['instruments'];
  }[];
  if (!a) {
    throw new AppError(
      404,
      'not_found',
      `Round ${roundId} has no analysis yet${round.status === 'finished' ? ' (it is queued)' : ' (it is still in progress)'}`,
      {
        analysed: false,
        roundStatus: round.status,
      },
    );
  }
  const findings = (await ds.query(
    `SELECT f."id", f."kind", f."severity", f."instrument_tags", f."instrument_ids", f."equipment_ref", f."point_ref", f."message", f."evidence",
            coalesce(json_agg(json_build_object('id', w."id", 'number', w."code") ORDER BY w."number") FILTER (WHERE w."id" IS NOT NULL), '[]') AS "work_orders"
       FROM "findings" f
       LEFT JOIN "work_order_findings" wf ON wf."finding_id" = f."id"
       LEFT JOIN "work_orders" w ON w."id" = wf."work_order_id"
      WHERE f."analysis_id" = $1
      GROUP BY f."id"
      ORDER BY f."ordinal"`,
    [a.id],
  )) as {
    id: string;
    kind: string;
    severity: number;
    instrument_tags: string[];
    instrument_ids: string[];
    equipment_ref: string | null;
    point_ref: string | null;
    message: string;
    evidence: Record<string, unknown>;
    work_orders: { id: string; number: string }[];
  }[];
  const origins = await readingOrigins(ds, {
    id: a.id,
    roundId: a.round_id,
    unitId: a.unit_id,
    instruments: a.instruments,
  });
  return {
    id: a.id,
    roundId: a.round_id,
    unitId: a.unit_id,
    analysedAt: new Date(a.analysed_at).toISOString(),
    inputHash: a.input_hash,
    modelVersion: a.model_version,
    deviceModelVersion: a.device_model_version,
    modelVersionMismatch: a.model_version_mismatch,
    clockSkewS: clockSkewS(round.client_clock_skew_ms),
    barometricPa: a.barometric_pa,
    barometricSource: a.barometric_source,
    reconciliation: reconciliationSummaryOf(a.reconciliation),
    statePoints: a.state_points,
    balances: a.balances,
    performance: a.performance,
    instruments: a.instruments,
    findings: findings.map((f): FindingView => ({
      id: f.id,
      kind: f.kind,
      severity: f.severity,
      instrumentTags: f.instrument_tags,
      instrumentIds: f.instrument_ids,
      equipmentRef: f.equipment_ref,
      pointRef: f.point_ref,
      message: f.message,
      evidence: f.evidence,
      workOrders: f.work_orders,
    })),
    readingOrigins: origins,
  };
}

interface JobRow {
  id: string;
  round_id: string;
  state: AnalysisJob['state'];
  retry_count: number;
  retry_limit: number;
  created_on: Date;
  started_on: Date | null;
  completed_on: Date | null;
  start_after: Date;
  output: { message?: unknown; value?: { message?: unknown } } | null;
}

export async function analysisJobs(
  ds: DataSource,
  siteId: string,
  states: string[],
  limit: number,
): Promise<AnalysisJobsResponse> {
  const [{ job, archive }] = (await ds.query(`SELECT to_regclass($1) AS "job", to_regclass($2) AS "archive"`, [
    `${PGBOSS_SCHEMA}.job`,
    `${PGBOSS_SCHEMA}.archive`,
  ])) as { job: string | null; archive: string | null }[];
  if (!job) return { jobs: [] };
  const cols = `"id", "data"->>'roundId' AS "round_id", "state"::text AS "state", "retry_count", "retry_limit", "created_on", "started_on", "completed_on", "start_after", "output"`;
  const where = `"name" = $1 AND "data"->>'siteId' = $2 AND "state"::text = ANY($3::text[])`;
  const sql = `SELECT * FROM (
      SELECT ${cols} FROM ${PGBOSS_SCHEMA}.job WHERE ${where}
      ${archive ? `UNION ALL SELECT ${cols} FROM ${PGBOSS_SCHEMA}.archive WHERE ${where}` : ''}
    ) j ORDER BY "created_on" DESC LIMIT $4`;
  const rows = (await ds.query(sql, [ANALYSIS_QUEUE, siteId, states, limit])) as JobRow[];
  const message = (o: JobRow['output']): string | null => {
    if (!o) return null;
    if (typeof o.message === 'string') return o.message;
    if (o.value && typeof o.value.message === 'string') return o.value.message;
    return null;
  };
  const isoOf = (d: Date | null) => (d ? new Date(d).toISOString() : null);
  return {
    jobs: rows.map((r) => ({
      id: r.id,
      roundId: r.round_id,
      state: r.state,
      retryCount: r.retry_count,
      retryLimit: r.retry_limit,
      createdOn: isoOf(r.created_on)!,
      startedOn: isoOf(r.started_on),
      completedOn: isoOf(r.completed_on),
      startAfter: isoOf(r.start_after)!,
      error: r.state === 'failed' || r.state === 'retry' ? message(r.output) : null,
    })),
  };
}
