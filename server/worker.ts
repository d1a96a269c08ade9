/**
 * An analysis worker process: start(config?) → { analysis, dataSource, stop() }. It takes jobs
 * from the pg-boss queue the API processes fill (server/analysis/queue.ts) and runs them, as many
 * processes as the load needs; set WORKERS_IN_PROCESS=false on the API processes then. Run
 * directly (`npx tsx server/worker.ts`) it reads the environment (server/config.ts) and stops
 * cleanly on SIGINT/SIGTERM (active jobs get 10 s to finish; a job cut off is retried elsewhere).
 */
import type { DataSource } from 'typeorm';
import { startAnalysisRuntime, type AnalysisRuntime } from './analysis/queue';
import { loadConfig, type Config } from './config';
import { makeDataSource } from './db';
import { makeLogger, type Logger } from './logger';
import type { Notifier } from './notify';
import { runUntilSignalled } from './run-main';

export interface RunningWorker {
  analysis: AnalysisRuntime;
  dataSource: DataSource;
  config: Config;
  logger: Logger;
  stop(): Promise<void>;
}

export interface WorkerOptions {
  /** who hears of opened work orders and stored findings; default: nobody (the lead wires e-mail here) */
  notifier?: Notifier;
  /** runs inside each analysis transaction just before commit (fault injection in tests) */
  beforeCommit?: (roundId: string) => void | Promise<void>;
}

const running = new Set<RunningWorker>();

export async function start(config: Config = loadConfig(), options: WorkerOptions = {}): Promise<RunningWorker> {
  const logger = makeLogger(config).child({ role: 'worker' });
  const dataSource = makeDataSource(config.DATABASE_URL, {
    applicationName: 'trueround-worker',
    poolSize: Math.max(2, config.ANALYSIS_CONCURRENCY + 1),
  });
  await dataSource.initialize();
  try {
    const analysis = await startAnalysisRuntime({
      config,
      dataSource,
      logger,
      notify: options.notifier,
      work: true,
      beforeCommit: options.beforeCommit,
    });
    let stopping: Promise<void> | undefined;
    const handle: RunningWorker = {
      analysis,
      dataSource,
      config,
      logger,
      stop: () =>
        (stopping ??= (async () => {
          running.delete(handle);
          await analysis.stop();
          if (dataSource.isInitialized) await dataSource.destroy();
        })()),
    };
    running.add(handle);
    logger.info({ pid: process.pid, concurrency: config.ANALYSIS_CONCURRENCY }, 'analysis worker started');
    return handle;
  } catch (err) {
    await dataSource.destroy();
    throw err;
  }
}

/** Stops every worker started by start() in this process. */
export async function stop(): Promise<void> {
  await Promise.all([...running].map((w) => w.stop()));
}

if (require.main === module)
  runUntilSignalled(
    () => start(),
    () => `Trueround analysis worker running (pid ${process.pid})`,
    'worker',
  );
