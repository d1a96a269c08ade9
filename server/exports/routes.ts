/**
 * CSV exports of a site, for planners, engineers and admins (./csv.ts neutralises formulas).
 *   GET /api/sites/:siteId/exports/readings.csv?from=&to=   every reading recorded (device time) in
 *        [from, to) — default the last 30 days — with its current analysis' reconciled value and z
 *   GET /api/sites/:siteId/exports/work-orders.csv          every work order of the site
 * Rows go out in pages of EXPORT_PAGE (keyset on device time and id), so a long range streams.
 * Thin handlers: the SQL is in ./queries.ts and ../work-orders/repository.ts.
 */
import { Router, type Response } from 'express';
import { ExportRangeQuery } from '../../shared/api/analysis';
import { requireAuth, requireSiteRole, siteOf } from '../auth/middleware';
import { deps } from '../context';
import { AppError } from '../errors';
import { bound } from '../instruments/service';
import { READ_ROLES, parseQuery } from '../work-orders/routes';
import { orders } from '../work-orders/repository';
import { toCsv, type Cell } from './csv';
import { readingsPage, type ReadingKey } from './queries';

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
    let after: ReadingKey | null = null;
    for (;;) {
      const rows = await readingsPage(dataSource, siteId, from, to, after, EXPORT_PAGE);
      if (rows.length === 0) break;
      const out: Cell[][] = rows.map((x) => [
        x.id,
        x.round_id,
        x.route,
        x.technician,
        x.device_time,
        x.received_at,
        x.tag,
        x.quantity,
        x.value_typed === null ? null : Number(x.value_typed),
        x.unit,
        x.reference,
        x.value_si,
        SI[x.quantity] ?? null,
        x.skip_reason,
        x.note,
        x.supersedes,
        x.superseded,
        x.reconciled_si,
        x.reconciled_sigma_si,
        x.z,
        x.suspect ?? null,
      ]);
      res.write(toCsv(out));
      if (rows.length < EXPORT_PAGE) break;
      const last = rows[rows.length - 1];
      after = { t: last.time_key, id: last.id };
    }
    res.end();
  });

  r.get('/:siteId/exports/work-orders.csv', requireSiteRole(...READ_ROLES), async (req, res) => {
    const rows = await orders.allOfSite(deps(req).dataSource, siteOf(req).siteId);
    startCsv(res, 'work-orders.csv');
    res.end(
      toCsv(
        rows.map((x) => [
          x.code,
          x.kind,
          x.status,
          x.priority,
          x.title,
          x.instrument_tag,
          x.equipment_ref,
          x.assignee_name,
          x.due_date,
          x.scheduled_for,
          x.opened_at,
          x.closed_at,
          x.finding_count,
          x.reopen_count,
          x.cancel_reason,
          x.merged_into_code,
        ]),
        WORK_ORDER_HEADER,
      ),
    );
  });

  return r;
}
