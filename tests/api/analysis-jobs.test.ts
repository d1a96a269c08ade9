/**
 * The analysis after a push, on a real PostgreSQL: runAnalysisJob by hand (round states, input
 * hash, re-takes, model versions, barometer) and the real pg-boss path — a job that throws once is
 * retried, a job that keeps failing stays visible, and a worker process killed with SIGKILL in the
 * middle of a job loses nothing: the job runs again elsewhere and the analysis is stored once,
 * with no duplicate work order.
 *
 * Rounds: the Fernhallow demo unit's design point (shared/cycle demoDesignReadings, IAPWS-IF97,
 * balances closing) with noise of 0.2σ, and one thermometer 10σ off (a gross error by the VDI 2048
 * part 1 measurement test). Queue semantics (retry, backoff, expiry of an active job) are pg-boss
 * v10's, as its README and types describe them.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { join } from 'node:path';
import { randomUUID } from 'node:crypto';
import type { RoundAnalysisResponse, AnalysisJobsResponse } from '../../shared/api/analysis';
import { runAnalysisJob, type AnalysisDeps } from '../../server/analysis/job';
import {
  ANALYSIS_QUEUE,
  roundsNeedingAnalysis,
  startAnalysisRuntime,
  type AnalysisRuntime,
} from '../../server/analysis/queue';
import { demoUnit } from '../../demo/unit';
import { memoryLogger, TEST_SECRET, testConfig } from './helpers/app';
import { api, designRound, makeWorld, push, pushRound, until, type World } from './analysis-helpers';

jest.setTimeout(60_000);

let w: World;
/** where the app's push hook forwards to (a runtime under test), or nowhere */
let forward: AnalysisRuntime | null = null;
const runtimes: AnalysisRuntime[] = [];
let child: ChildProcess | null = null;
const log = memoryLogger('warn');
const base = () => `/api/sites/${w.fernId}`;

const QUEUE_ENV = {
  ANALYSIS_POLL_MS: '500',
  ANALYSIS_RETRY_DELAY_S: '1',
  ANALYSIS_SWEEP_INTERVAL_S: '0',
  ANALYSIS_CONCURRENCY: '1',
  ANALYSIS_JOB_EXPIRE_S: '2',
};

beforeAll(async () => {
  w = await makeWorld({ hooks: async (ids) => void (await forward?.enqueue(ids)) });
});
afterAll(async () => {
  child?.kill('SIGKILL');
  for (const r of runtimes) await r.stop();
  await w?.db.drop();
});

async function runtime(o: {
  work: boolean;
  env?: Record<string, string>;
  beforeCommit?: (roundId: string) => void;
}): Promise<AnalysisRuntime> {
  const r = await startAnalysisRuntime({
    config: testConfig(w.db.url, { ...QUEUE_ENV, ...o.env }),
    dataSource: w.db.dataSource,
    logger: log.logger,
    notify: w.notifier,
    work: o.work,
    beforeCommit: o.beforeCommit,
    poolSize: 2,
  });
  runtimes.push(r);
  return r;
}

const count = async (sql: string, params: unknown[]) =>
  ((await w.db.dataSource.query(sql, params)) as { n: number }[])[0].n;
const analyses = (roundId: string) => count(`SELECT count(*)::int AS n FROM analyses WHERE round_id = $1`, [roundId]);
const openOrders = (tag: string) =>
  count(`SELECT count(*)::int AS n FROM work_orders WHERE instrument_id = $1 AND status NOT IN ('done', 'cancelled')`, [
    w.inst[tag],
  ]);
const jobOf = async (roundId: string) =>
  (
    (await w.db.dataSource.query(
      `SELECT id, state::text AS state, retry_count, started_on FROM pgboss.job WHERE name = $1 AND data->>'roundId' = $2 ORDER BY created_on DESC LIMIT 1`,
      [ANALYSIS_QUEUE, roundId],
    )) as { id: string; state: string; retry_count: number; started_on: Date | null }[]
  )[0];
const isAnalysed = async (roundId: string) =>
  (
    (await w.db.dataSource.query(`SELECT analysed_at FROM rounds WHERE id = $1`, [roundId])) as {
      analysed_at: Date | null;
    }[]
  )[0].analysed_at !== null;

describe('runAnalysisJob', () => {
  let deps: AnalysisDeps;
  beforeAll(() => {
    deps = { dataSource: w.db.dataSource, logger: log.logger, notify: w.notifier };
  });

  test('the schema of the new tables matches the entities (TypeORM schema builder finds nothing to change)', async () => {
    const diff = await w.db.dataSource.driver.createSchemaBuilder().log();
    expect(diff.upQueries.map((q) => q.query)).toEqual([]);
  });

  test('an in-progress round waits; the push that finishes it gets it analysed, with the round’s barometer', async () => {
    const r = designRound(w, { status: 'in-progress', barometerMbar: 1005 });
    await push(w, r.body);
    expect(await runAnalysisJob(deps, r.roundId)).toMatchObject({
      status: 'skipped',
      reason: 'the round is still in progress',
    });
    const waiting = await api(w, 'engineer').get(`${base()}/rounds/${r.roundId}/analysis`);
    expect(waiting.status).toBe(404);
    expect(waiting.body.error.message).toMatch(/no analysis yet \(it is still in progress\)/);
    expect(await isAnalysed(r.roundId)).toBe(false);

    const finish = {
      ...r.body,
      rounds: [{ ...r.body.rounds[0], status: 'finished' as const, finishedAt: new Date().toISOString() }],
      readings: [],
    };
    await push(w, finish);
    expect(w.pushed.at(-1)).toEqual([r.roundId]);
    const out = await runAnalysisJob(deps, r.roundId);
    expect(out.status).toBe('stored');
    expect(await isAnalysed(r.roundId)).toBe(true);
    const a = (await api(w, 'engineer').get(`${base()}/rounds/${r.roundId}/analysis`)).body as RoundAnalysisResponse;
    expect(a).toMatchObject({
      barometricSource: 'reading',
      barometricPa: 100500,
      modelVersion: demoUnit.version,
      modelVersionMismatch: false,
      deviceModelVersion: null,
    });
    expect(a.statePoints.length).toBe(demoUnit.points.length);
    expect(a.instruments.length).toBe(demoUnit.instruments.length);
    expect(a.performance.some((f) => f.kind === 'condenser-ttd')).toBe(true);
    expect(await runAnalysisJob(deps, 'c0ffee00-0000-4000-8000-000000000000')).toMatchObject({ status: 'skipped' });
  });

  test('a device that held another model version: the analysis says so', async () => {
    const r = await pushRound(w);
    await w.db.dataSource.query(`UPDATE rounds SET device_model_version = 'fnv1a64:0123456789abcdef' WHERE id = $1`, [
      r.roundId,
    ]);
    await runAnalysisJob(deps, r.roundId);
    const a = (await api(w, 'planner').get(`${base()}/rounds/${r.roundId}/analysis`)).body as RoundAnalysisResponse;
    expect(a).toMatchObject({
      deviceModelVersion: 'fnv1a64:0123456789abcdef',
      modelVersionMismatch: true,
      modelVersion: demoUnit.version,
    });
  });

  test('a re-take changes the input: a newer analysis becomes current, the older one stays stored; the same input again stores nothing', async () => {
    const r = await pushRound(w, { bias: { 'TI-403B': 10 } });
    const first = await runAnalysisJob(deps, r.roundId);
    expect(first.status).toBe('stored');
    const a1 = (await api(w, 'planner').get(`${base()}/rounds/${r.roundId}/analysis`)).body as RoundAnalysisResponse;
    expect(a1.findings.find((f) => f.kind === 'gross-error')?.instrumentTags).toEqual(['TI-403B']);
    expect(a1.reconciliation.suspects).toEqual(['TI-403B']);

    // the technician re-reads TI-403B: a new reading superseding the wrong one
    const fixed = designRound(w, { roundId: r.roundId });
    const reread = fixed.body.readings.find((x) => x.instrumentId === w.inst['TI-403B'])!;
    await push(w, { ...fixed.body, rounds: [], readings: [{ ...reread, supersedes: r.readingIds['TI-403B'] }] });
    const second = await runAnalysisJob(deps, r.roundId);
    expect(second.status).toBe('stored');
    const a2 = (await api(w, 'planner').get(`${base()}/rounds/${r.roundId}/analysis`)).body as RoundAnalysisResponse;
    expect(a2.id).not.toBe(a1.id);
    expect(a2.inputHash).not.toBe(a1.inputHash);
    expect(a2.findings.filter((f) => f.kind === 'gross-error')).toEqual([]);
    expect(a2.reconciliation.passed).toBe(true);
    expect(await analyses(r.roundId)).toBe(2);
    expect(await count(`SELECT count(*)::int AS n FROM analyses WHERE round_id = $1 AND is_current`, [r.roundId])).toBe(
      1,
    );
    expect(
      await count(
        `SELECT count(*)::int AS n FROM analysis_instruments WHERE round_id = $1 AND is_current AND analysis_id <> $2`,
        [r.roundId, a2.id],
      ),
    ).toBe(0);
    expect(await runAnalysisJob(deps, r.roundId)).toMatchObject({ status: 'unchanged', analysisId: a2.id });
    // the work order the first reading opened keeps its evidence (a planner cancels it)
    expect(await openOrders('TI-403B')).toBe(1);
  });

  test('a failing notifier never fails the analysis: it is logged after the commit', async () => {
    const lines = memoryLogger('error');
    const bad = {
      ...deps,
      logger: lines.logger,
      notify: { ...w.notifier, findingsStored: () => Promise.reject(new Error('smtp down')) },
    };
    const r = await pushRound(w);
    expect((await runAnalysisJob(bad, r.roundId)).status).toBe('stored');
    expect(lines.lines.join('')).toMatch(/notification failed.*|smtp down/);
  });

  test('the sweeper finds finished rounds without an analysis of their latest readings', async () => {
    const r = await pushRound(w);
    expect((await roundsNeedingAnalysis(w.db.dataSource, 0)).map((x) => x.roundId)).toContain(r.roundId);
    await runAnalysisJob(deps, r.roundId);
    expect((await roundsNeedingAnalysis(w.db.dataSource, 0)).map((x) => x.roundId)).not.toContain(r.roundId);
  });
});

describe('on pg-boss', () => {
  test('a push queues the round; the worker stores its analysis — a job that throws once is retried, nothing of the failed try stays', async () => {
    let throws = 1;
    const worker = await runtime({
      work: true,
      beforeCommit: () => {
        if (throws-- > 0) throw new Error('injected failure inside the analysis transaction');
      },
    });
    forward = worker;
    const r = await pushRound(w, { bias: { 'TI-203': 10 } });
    const job = await until('the first attempt to fail', async () => {
      const j = await jobOf(r.roundId);
      return j && (j.state === 'retry' || j.state === 'completed') ? j : null;
    });
    expect(job.state).toBe('retry');
    expect(await analyses(r.roundId)).toBe(0);
    expect(await openOrders('TI-203')).toBe(0);
    await until('the analysis', () => isAnalysed(r.roundId));
    const done = await until('the job to complete', async () =>
      (await jobOf(r.roundId))?.state === 'completed' ? jobOf(r.roundId) : null,
    );
    expect(done.retry_count).toBe(1);
    expect(await analyses(r.roundId)).toBe(1);
    expect(await openOrders('TI-203')).toBe(1);
    forward = null;
    await worker.stop();
  });

  test('a job that keeps failing stays failed and is listed for engineers and admins at /analysis-jobs', async () => {
    const worker = await runtime({
      work: true,
      env: { ANALYSIS_RETRY_LIMIT: '0' },
      beforeCommit: () => {
        throw new Error('the unit model is being edited');
      },
    });
    forward = worker;
    const r = await pushRound(w);
    await until('the job to fail', async () => (await jobOf(r.roundId))?.state === 'failed');
    forward = null;
    await worker.stop();
    const res = await api(w, 'engineer').get(`${base()}/analysis-jobs`);
    expect(res.status).toBe(200);
    const jobs = (res.body as AnalysisJobsResponse).jobs.filter((j) => j.roundId === r.roundId);
    expect(jobs).toMatchObject([
      { state: 'failed', retryCount: 0, retryLimit: 0, error: 'the unit model is being edited' },
    ]);
    expect((await api(w, 'admin').get(`${base()}/analysis-jobs?state=failed`)).status).toBe(200);
    expect((await api(w, 'planner').get(`${base()}/analysis-jobs`)).status).toBe(403);
    expect((await api(w, 'tech').get(`${base()}/analysis-jobs`)).status).toBe(403);
    expect((await api(w, 'brackPlanner').get(`${base()}/analysis-jobs`)).status).toBe(404);
    expect((await api(w, 'engineer').get(`${base()}/analysis-jobs?state=lost`)).status).toBe(400);
    // not analysed: the round counts as analysed only once its analysis is stored
    expect(await isAnalysed(r.roundId)).toBe(false);
    expect((await api(w, 'engineer').get(`${base()}/rounds/${r.roundId}/analysis`)).body.error.message).toMatch(
      /no analysis yet \(it is queued\)/,
    );
  });

  test('a worker process killed with SIGKILL mid-job: the job runs again and the analysis is stored once, with one work order', async () => {
    const sender = await runtime({ work: false });
    forward = sender;
    const out: string[] = [];
    // node itself with tsx as a loader (the tsx CLI would run the worker in a grandchild that a kill of the CLI misses)
    child = spawn(process.execPath, ['--import', 'tsx', join(__dirname, '../../server/worker.ts')], {
      cwd: join(__dirname, '../..'),
      env: {
        ...process.env,
        ...QUEUE_ENV,
        NODE_ENV: 'test',
        DATABASE_URL: w.db.url,
        JWT_SECRET: TEST_SECRET,
        LOG_LEVEL: 'warn',
        ANALYSIS_FAULT_DELAY_MS: '120000',
      },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    child.stdout!.on('data', (b: Buffer) => out.push(String(b)));
    child.stderr!.on('data', (b: Buffer) => out.push(String(b)));
    const exited = new Promise<NodeJS.Signals | null>((resolve) =>
      child!.once('exit', (_code, signal) => resolve(signal)),
    );
    await until('the worker process to start', async () => out.join('').includes('analysis worker running'), 30_000);

    const r = await pushRound(w, { bias: { 'TI-301': 10 } });
    await until(
      'the worker to be inside the analysis transaction',
      async () => out.join('').includes('analysis paused before commit'),
      20_000,
    );
    expect(out.join('')).toContain(r.roundId);
    child.kill('SIGKILL');
    expect(await exited).toBe('SIGKILL');
    child = null;

    // nothing of the killed attempt is stored; the job is still "active" until it expires
    expect(await analyses(r.roundId)).toBe(0);
    expect(await isAnalysed(r.roundId)).toBe(false);
    expect(await openOrders('TI-301')).toBe(0);
    expect((await jobOf(r.roundId)).state).toBe('active');
    // pg-boss' maintenance fails an active job past its expiry into retry (called here instead of waiting for it)
    await until('the job to expire into retry', async () => {
      await sender.boss.expire();
      return (await jobOf(r.roundId)).state === 'retry';
    });

    const worker = await runtime({ work: true });
    await until('the analysis', () => isAnalysed(r.roundId));
    await until('the job to complete', async () => (await jobOf(r.roundId)).state === 'completed');
    expect((await jobOf(r.roundId)).retry_count).toBe(1);
    expect(await analyses(r.roundId)).toBe(1);
    expect(await openOrders('TI-301')).toBe(1);
    const a = (await api(w, 'planner').get(`${base()}/rounds/${r.roundId}/analysis`)).body as RoundAnalysisResponse;
    expect(a.findings.find((f) => f.kind === 'gross-error')?.instrumentTags).toEqual(['TI-301']);
    forward = null;
    await worker.stop();
    await sender.stop();
  });

  test('one waiting job per round: pushes before the worker runs add none', async () => {
    forward = null;
    const sender = await runtime({ work: false });
    const roundId = randomUUID();
    const ids1 = await sender.enqueue([roundId]);
    const ids2 = await sender.enqueue([roundId]);
    // the round does not exist: nothing to queue for it
    expect([ids1, ids2]).toEqual([[], []]);
    const r = await pushRound(w);
    expect((await sender.enqueue([r.roundId])).length).toBe(1);
    expect((await sender.enqueue([r.roundId])).length).toBe(0);
    await sender.stop();
  });
});
