/**
 * CSV exports of a site, for planners, engineers and admins (./csv.ts neutralises formulas).
 *   GET /api/sites/:siteId/exports/readings.csv?from=&to=   every reading recorded (device time) in
 *        [from, to) — default the last 30 days — with its current analysis' reconciled value and z
 *   GET /api/sites/:siteId/exports/work-orders.csv          every work order of the site
 * Rows go out in pages of EXPORT_PAGE (keyset on device time and id), so a long range streams.
 */
import { Router, type Response } from 'express';
import { ExportRangeQuery } from '../../shared/api/analysis';
import { requireAuth, requireSiteRole, siteOf } from '../auth/middleware';
import { deps } from '../context';
import { AppError } from '../errors';
import { bound } from '../instruments/service';
import { READ_ROLES, parseQuery } from '../work-orders/routes';
import { toCsv, type Cell } from './csv';

export const EXPORT_PAGE = 5000;

const READING_HEADER = [
  'reading_id',
  'round_id',
  'route',
  'technician',
  'device_time',
  'received_at',
  'instrument_tag',
  'quantity',
  'value_typed',
  'unit',
  'reference',
  'value_si',
  'si_unit',
  'skip_reason',
  'note',
  'supersedes',
  'superseded',
  'reconciled_si',
  'reconciled_sigma_si',
  'z',
  'suspect',
];
const SI: Record<string, string> = { pressure: 'Pa', temperature: 'K', massFlow: 'kg/s', power: 'W', level: '1' };

const WORK_ORDER_HEADER = [
  'number',
  'kind',
  'status',
  'priority',
  'title',
  'instrument_tag',
  'equipment',
  'assignee',
  'due_date',
  'scheduled_for',
  'opened_at',
  'closed_at',
  'findings',
  'reopen_count',
  'cancel_reason',
  'merged_into',
];

function startCsv(res: Response, filename: string): void {
  res.status(200);
  res.setHeader('Content-Type', 'text/csv; charset=utf-8');
  res.setHeader('Content-Disposition', `attachment; filename="${filename}"`);
  res.setHeader('Cache-Control', 'no-store');
}

export function exportsRouter(): Router {
  const r = Router();
  r.use(requireAuth);

  r.get('/:siteId/exports/readings.csv', requireSiteRole(...READ_ROLES), async (req, res) => {
    const q = parseQuery(ExportRangeQuery, req);
    const to = bound(q.to, true) ?? new Date();
    const from = bound(q.from, false) ?? new Date(to.getTime() - 30 * 86_400_000);
    if (!(from.getTime() < to.getTime())) {
      throw new AppError(
        400,
        'validation',
        `Invalid query: from (${from.toISOString()}) must lie before to (${to.toISOString()})`,
        [{ path: 'from', message: 'Must lie before to' }],
      );
    }
    const { dataSource } = deps(req);
    const siteId = siteOf(req).siteId;
    startCsv(res, `readings-${from.toISOString().slice(0, 10)}-${to.toISOString().slice(0, 10)}.csv`);
    res.write(toCsv([], READING_HEADER));
    // keyset on the full-precision text of the time (a JS Date keeps only milliseconds)
    let after: { t: string; id: string } | null = null;
    for (;;) {
      const params: unknown[] = [siteId, from, to, EXPORT_PAGE];
      const keyset = after
        ? `AND (r."device_time", r."id") > ($${params.push(after.t)}::timestamptz, $${params.push(after.id)}::uuid)`
        : '';
      const rows = (await dataSource.query(
        `SELECT r."id", r."device_time"::text AS "time_key", r."round_id", rt."key" AS "route", COALESCE(tm."display_name", u."name") AS "technician", r."device_time", r."received_at", i."tag", i."quantity",
                r."value_typed", r."unit", r."reference", r."value_si", r."skip_reason", r."note", r."supersedes",
                EXISTS (SELECT 1 FROM "readings" s WHERE s."supersedes" = r."id") AS "superseded",
                ai."reconciled_si", ai."reconciled_sigma_si", ai."z", ai."suspect"
           FROM "readings" r
           JOIN "rounds" ro ON ro."id" = r."round_id"
           JOIN "route_versions" v ON v."id" = ro."route_version_id"
           JOIN "routes" rt ON rt."id" = v."route_id"
           JOIN "users" u ON u."id" = ro."technician_id"
           LEFT JOIN "memberships" tm ON tm."user_id" = ro."technician_id" AND tm."site_id" = ro."site_id"
           JOIN "instruments" i ON i."id" = r."instrument_id"
           LEFT JOIN "analysis_instruments" ai ON ai."reading_id" = r."id" AND ai."is_current"
          WHERE ro."site_id" = $1 AND r."device_time" >= $2 AND r."device_time" < $3 ${keyset}
          ORDER BY r."device_time", r."id"
          LIMIT $4`,
        params,
      )) as Record<string, unknown>[];
      if (rows.length === 0) break;
      const out: Cell[][] = rows.map((x) => [
        x.id as string,
        x.round_id as string,
        x.route as string,
        x.technician as string,
        x.device_time as Date,
        x.received_at as Date,
        x.tag as string,
        x.quantity as string,
        x.value_typed === null ? null : Number(x.value_typed),
        x.unit as string,
        x.reference as string | null,
        x.value_si as number | null,
        SI[x.quantity as string] ?? null,
        x.skip_reason as string | null,
        x.note as string | null,
        x.supersedes as string | null,
        x.superseded as boolean,
        x.reconciled_si as number | null,
        x.reconciled_sigma_si as number | null,
        x.z as number | null,
        x.suspect === null || x.suspect === undefined ? null : (x.suspect as boolean),
      ]);
      res.write(toCsv(out));
      if (rows.length < EXPORT_PAGE) break;
      const last = rows[rows.length - 1];
      after = { t: last.time_key as string, id: last.id as string };
    }
    res.end();
  });

  r.get('/:siteId/exports/work-orders.csv', requireSiteRole(...READ_ROLES), async (req, res) => {
    const rows = (await deps(req).dataSource.query(
      `SELECT w."code", w."kind", w."status", w."priority", w."title", w."instrument_tag", w."equipment_ref", COALESCE(am."display_name", u."name") AS "assignee",
              to_char(w."due_date", 'YYYY-MM-DD') AS "due_date", to_char(w."scheduled_for", 'YYYY-MM-DD') AS "scheduled_for", w."opened_at", w."closed_at",
              (SELECT count(*)::int FROM "work_order_findings" wf WHERE wf."work_order_id" = w."id") AS "findings", w."reopen_count", w."cancel_reason",
              m."code" AS "merged_into"
         FROM "work_orders" w LEFT JOIN "users" u ON u."id" = w."assignee_id"
         LEFT JOIN "memberships" am ON am."user_id" = w."assignee_id" AND am."site_id" = w."site_id"
         LEFT JOIN "work_orders" m ON m."id" = w."merged_into_id"
        WHERE w."site_id" = $1 ORDER BY w."number"`,
      [siteOf(req).siteId],
    )) as Record<string, unknown>[];
    startCsv(res, 'work-orders.csv');
    res.end(
      toCsv(
        rows.map((x) => [
          x.code as string,
          x.kind as string,
          x.status as string,
          x.priority as number,
          x.title as string,
          x.instrument_tag as string | null,
          x.equipment_ref as string | null,
          x.assignee as string | null,
          x.due_date as string | null,
          x.scheduled_for as string | null,
          x.opened_at as Date,
          x.closed_at as Date | null,
          x.findings as number,
          x.reopen_count as number,
          x.cancel_reason as string | null,
          x.merged_into as string | null,
        ]),
        WORK_ORDER_HEADER,
      ),
    );
  });

  return r;
}
