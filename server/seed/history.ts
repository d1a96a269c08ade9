/**
 * seedHistory(dataSource, options): loads the invented operating history of Fernhallow Works
 * (./history-generator.ts: 90 days × 3 shifts × the 3 routes, with a drifting thermometer, a
 * stuck vacuum gauge, a gauge read as absolute and a fouling condenser) into a database that
 * has the demo plant but no rounds yet. The payloads go through the push service
 * (server/sync/push.ts pushBatch, as the demo technician, each shift's batch received at the
 * time the phone would have sent it), and each round is then analysed in server order by the
 * analysis job (server/analysis/job.ts runAnalysisJob), which stores findings and opens work
 * orders as it would have at the time. No one is notified of the history (no notifier).
 *
 * Idempotent: ids are fixed by the seed (uuidFor), so a second run pushes duplicates only; and
 * it does nothing at all where any round exists, so it never mixes with real rounds.
 */
import type { DataSource } from 'typeorm';
import { PushRequest } from '../../shared/api/sync';
import { runAnalysisJob } from '../analysis/job';
import { makeLogger, type Logger } from '../logger';
import { localParts, zonedTime } from '../mail/shifts';
import { pushBatch } from '../sync/push';
import { demoSites, demoUser } from './demo-users';
import { generateHistory, type HistoryFaults } from './history-generator';

export interface SeedHistoryOptions {
  /** days of history ending with the last shift closed before `now`; default 90 */
  days?: number;
  /** PRNG seed, default 1 */
  seed?: number;
  /** default: the clock */
  now?: Date;
  /** run the analysis job on every seeded round (default true) */
  analyse?: boolean;
  faults?: HistoryFaults;
  logger?: Logger;
}

export interface SeedHistoryResult {
  seeded: boolean;
  /** why nothing was seeded */
  reason?: string;
  rounds: number;
  readings: number;
  analysed: number;
  /** first and last day of the history (site-local dates) */
  from?: string;
  to?: string;
  pushMs: number;
  analysisMs: number;
}

export async function seedHistory(ds: DataSource, options: SeedHistoryOptions = {}): Promise<SeedHistoryResult> {
  const none = (reason: string): SeedHistoryResult => ({
    seeded: false,
    reason,
    rounds: 0,
    readings: 0,
    analysed: 0,
    pushMs: 0,
    analysisMs: 0,
  });
  const days = options.days ?? 90;
  const now = options.now ?? new Date();

  const demo = demoSites.find((s) => s.slug === 'fernhallow')!;
  const [site] = (await ds.query(
    `SELECT "id", "timezone", "elevation_m" FROM "sites" WHERE "slug" = $1 AND "name" = $2`,
    [demo.slug, demo.name],
  )) as {
    id: string;
    timezone: string;
    elevation_m: number;
  }[];
  if (!site) return none('the Fernhallow demo site is not in the database');
  const [{ n }] = (await ds.query(`SELECT count(*)::int AS n FROM "rounds"`)) as { n: number }[];
  if (n > 0) return none(`the database has rounds already (${n})`);

  const [tech] = (await ds.query(
    `SELECT u."id" FROM "users" u JOIN "memberships" m ON m."user_id" = u."id" WHERE u."email" = $1 AND m."site_id" = $2`,
    [demoUser('technician').email.toLowerCase(), site.id],
  )) as { id: string }[];
  if (!tech) return none('the demo technician is not a member of the demo site');
  const instruments = (await ds.query(
    `SELECT i."id", i."tag" FROM "instruments" i JOIN "units" u ON u."id" = i."unit_id" WHERE u."site_id" = $1`,
    [site.id],
  )) as { id: string; tag: string }[];
  const routes = (await ds.query(`SELECT "key", "current_version_id" FROM "routes" WHERE "site_id" = $1`, [
    site.id,
  ])) as {
    key: string;
    current_version_id: string | null;
  }[];
  const instrumentIds = new Map(instruments.map((i) => [i.tag, i.id]));
  const versionIds = new Map(routes.filter((r) => r.current_version_id).map((r) => [r.key, r.current_version_id!]));
  const need = (map: Map<string, string>, key: string, what: string) => {
    const v = map.get(key);
    if (!v) throw new Error(`seedHistory: the demo site has no ${what} "${key}"`);
    return v;
  };

  // day 0: `days` local days before today; only shifts that have closed by now
  const today = localParts(now, site.timezone);
  const start = zonedTime(today.year, today.month, today.day - days, 0, 0, site.timezone);
  const history = generateHistory({
    start,
    days,
    seed: options.seed ?? 1,
    timezone: site.timezone,
    elevationM: site.elevation_m,
    faults: options.faults,
    ids: {
      instrumentId: (t) => need(instrumentIds, t, 'instrument'),
      routeVersionId: (k) => need(versionIds, k, 'route'),
    },
  });
  const shifts = history.shifts.filter((s) => Date.parse(s.payload.sentAt) <= now.getTime());
  if (shifts.length === 0) return none('no shift of the history has closed yet');

  const t0 = Date.now();
  let rounds = 0;
  let readings = 0;
  for (const s of shifts) {
    const batch = PushRequest.parse(s.payload);
    const out = await pushBatch(ds, tech.id, batch, new Date(s.payload.sentAt));
    rounds += out.response.applied.rounds;
    readings += out.response.applied.readings;
  }
  const pushMs = Date.now() - t0;

  let analysed = 0;
  const t1 = Date.now();
  if (options.analyse !== false) {
    // the analysis job logs every round at info: quiet unless the caller passes a logger
    const logger = options.logger ?? makeLogger({ LOG_LEVEL: 'silent' });
    for (const s of shifts) {
      for (const r of s.rounds) {
        const res = await runAnalysisJob({ dataSource: ds, logger }, r.id);
        if (res.status === 'stored' || res.status === 'unchanged') analysed++;
      }
    }
  }
  const analysisMs = Date.now() - t1;
  const result: SeedHistoryResult = {
    seeded: rounds > 0,
    rounds,
    readings,
    analysed,
    from: shifts[0].localDate,
    to: shifts[shifts.length - 1].localDate,
    pushMs,
    analysisMs,
  };
  options.logger?.info(result, 'demo history seeded');
  return result;
}
