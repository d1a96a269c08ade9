/**
 * The analysis queue on pg-boss (PostgreSQL-backed, schema "pgboss" in the app's database), so
 * any number of API and worker processes share it.
 *
 *  - `hooks.onRoundsPushed(roundIds)` (called by the push route after its commit) queues one job
 *    per round: data { roundId, siteId }, singletonKey = roundId on a "short" queue, i.e. at most
 *    one *waiting* job per round (a waiting job reads the round's latest readings when it runs, so
 *    a second push before it runs needs no second job; a push while one runs queues the next).
 *  - workers (`work: true`) run runAnalysisJob (./job.ts) for each job, ANALYSIS_CONCURRENCY at a
 *    time. A job that throws is retried ANALYSIS_RETRY_LIMIT times with exponential backoff from
 *    ANALYSIS_RETRY_DELAY_S; a job still active after ANALYSIS_JOB_EXPIRE_S (its worker died) is
 *    retried the same way by pg-boss' maintenance. Failed jobs stay in pg-boss' tables and are
 *    listed at GET /api/sites/:siteId/analysis-jobs.
 *  - workers also run the hourly pruning of refresh tokens (server/auth/prune.ts, a pg-boss schedule).
 *  - the sweeper (workers only, every ANALYSIS_SWEEP_INTERVAL_S and once at start) queues finished
 *    rounds of the last 7 days with no analysis of their latest readings — a push whose queueing
 *    failed is not lost.
 */
import PgBoss from 'pg-boss';
import type { DataSource } from 'typeorm';
import type { Config } from '../config';
import type { Logger } from '../logger';
import type { Notifier } from '../notify';
import type { SyncHooks } from '../sync/hooks';
import { runAnalysisJob, type AnalysisDeps } from './job';
import { schedulePruning } from '../auth/prune';

export const ANALYSIS_QUEUE = 'analyse-round';
export const PGBOSS_SCHEMA = 'pgboss';

export interface AnalysisJobData {
  roundId: string;
  siteId: string;
}

export interface AnalysisRuntimeOptions {
  config: Config;
  dataSource: DataSource;
  logger: Logger;
  notify?: Notifier;
  /** run workers in this process */
  work: boolean;
  /** fault injection inside the analysis transaction (tests); ANALYSIS_FAULT_DELAY_MS adds a pause */
  beforeCommit?: (roundId: string) => void | Promise<void>;
  /** pg-boss pool size (default 4) */
  poolSize?: number;
}

export interface AnalysisRuntime {
  boss: PgBoss;
  hooks: SyncHooks;
  /** queues the rounds' analyses; returns the ids of jobs created (a round with a waiting job gets none) */
  enqueue(roundIds: string[]): Promise<string[]>;
  /** queues finished rounds that lack an analysis of their latest readings; returns how many */
  sweep(): Promise<number>;
  stop(): Promise<void>;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

export function sendOptions(config: Config, roundId: string): PgBoss.SendOptions {
  return {
    singletonKey: roundId,
    retryLimit: config.ANALYSIS_RETRY_LIMIT,
    retryDelay: config.ANALYSIS_RETRY_DELAY_S,
    retryBackoff: true,
    expireInSeconds: config.ANALYSIS_JOB_EXPIRE_S,
  };
}

/** Finished rounds of the last 7 days whose latest readings have no analysis yet. */
export async function roundsNeedingAnalysis(ds: DataSource, olderThanS = 60): Promise<AnalysisJobData[]> {
  return (await ds.query(
    `SELECT r."id" AS "roundId", r."site_id" AS "siteId" FROM "rounds" r
      WHERE r."status" = 'finished' AND r."received_at" > now() - interval '7 days' AND r."received_at" < now() - $1 * interval '1 second'
        AND (r."analysed_at" IS NULL
             OR EXISTS (SELECT 1 FROM "readings" x WHERE x."round_id" = r."id" AND x."received_at" > r."analysed_at"))
      ORDER BY r."server_seq"`,
    [olderThanS],
  )) as AnalysisJobData[];
}

export async function startAnalysisRuntime(o: AnalysisRuntimeOptions): Promise<AnalysisRuntime> {
  const { config, dataSource, logger } = o;
  const boss = new PgBoss({
    connectionString: config.DATABASE_URL,
    schema: PGBOSS_SCHEMA,
    max: o.poolSize ?? 4,
    application_name: o.work ? 'trueround-worker' : 'trueround-queue',
    // pg-boss' cron clock runs where the workers do (the refresh-token pruning, server/auth/prune.ts)
    schedule: o.work,
    supervise: true,
    migrate: true,
  });
  boss.on('error', (err) => logger.error({ err }, 'pg-boss error'));
  await boss.start();
  await boss.createQueue(ANALYSIS_QUEUE, {
    name: ANALYSIS_QUEUE,
    policy: 'short',
    retryLimit: config.ANALYSIS_RETRY_LIMIT,
    retryDelay: config.ANALYSIS_RETRY_DELAY_S,
    retryBackoff: true,
    expireInSeconds: config.ANALYSIS_JOB_EXPIRE_S,
  });

  const workerIds: string[] = [];
  const enqueueData = async (items: AnalysisJobData[]): Promise<string[]> => {
    const ids: string[] = [];
    for (const d of items) {
      const id = await boss.send(ANALYSIS_QUEUE, d, sendOptions(config, d.roundId));
      if (id) ids.push(id);
    }
    if (ids.length) for (const w of workerIds) boss.notifyWorker(w);
    return ids;
  };
  const enqueue = async (roundIds: string[]): Promise<string[]> => {
    if (roundIds.length === 0) return [];
    const rows = (await dataSource.query(
      `SELECT "id" AS "roundId", "site_id" AS "siteId" FROM "rounds" WHERE "id" = ANY($1::uuid[]) ORDER BY "server_seq"`,
      [roundIds],
    )) as AnalysisJobData[];
    return enqueueData(rows);
  };
  const sweep = async (): Promise<number> => {
    const due = await roundsNeedingAnalysis(dataSource);
    return (await enqueueData(due)).length;
  };

  let sweeper: NodeJS.Timeout | undefined;
  if (o.work) {
    await schedulePruning(boss, dataSource, logger);
    const faultMs = config.ANALYSIS_FAULT_DELAY_MS;
    const deps: AnalysisDeps = {
      dataSource,
      logger,
      notify: o.notify,
      beforeCommit:
        faultMs > 0 || o.beforeCommit
          ? async (roundId) => {
              await o.beforeCommit?.(roundId);
              if (faultMs > 0) {
                logger.warn(
                  { roundId, pid: process.pid, ms: faultMs },
                  'analysis paused before commit (fault injection)',
                );
                await sleep(faultMs);
              }
            }
          : undefined,
    };
    for (let i = 0; i < config.ANALYSIS_CONCURRENCY; i++) {
      const me: { id?: string } = {};
      const handle = async ([job]: PgBoss.Job<AnalysisJobData>[]) => {
        // pg-boss waits a polling interval after every job; there may be more queued: look again at once
        if (me.id) boss.notifyWorker(me.id);
        const out = await runAnalysisJob(deps, job.data.roundId);
        if (out.status === 'stored') return { status: out.status, analysisId: out.analysisId, findings: out.findings };
        if (out.status === 'unchanged') return { status: out.status, analysisId: out.analysisId };
        return { status: out.status, reason: out.reason };
      };
      me.id = await boss.work<AnalysisJobData>(
        ANALYSIS_QUEUE,
        { batchSize: 1, pollingIntervalSeconds: config.ANALYSIS_POLL_MS / 1000 },
        handle,
      );
      workerIds.push(me.id);
    }
    if (config.ANALYSIS_SWEEP_INTERVAL_S > 0) {
      const run = () =>
        sweep().then(
          (n) => n && logger.info({ queued: n }, 'queued rounds that had no analysis of their latest readings'),
          (err: unknown) => logger.error({ err }, 'analysis sweep failed'),
        );
      void run();
      sweeper = setInterval(run, config.ANALYSIS_SWEEP_INTERVAL_S * 1000);
      sweeper.unref();
    }
  }

  let stopping: Promise<void> | undefined;
  return {
    boss,
    enqueue,
    sweep,
    hooks: { onRoundsPushed: async (roundIds) => void (await enqueue(roundIds)) },
    stop: () =>
      (stopping ??= (async () => {
        if (sweeper) clearInterval(sweeper);
        await boss.stop({ graceful: true, wait: true, close: true, timeout: 10_000 });
      })()),
  };
}
