/**
 * Puts the app on a port: start(config?) → { url, port, server, dataSource, stop() }.
 * Run directly (`npx tsx server/main.ts`) it reads the environment (server/config.ts), prints
 * the URL and closes cleanly on SIGINT/SIGTERM. Migrations are not run here: server/cli/migrate.ts.
 * E-mail (server/mail): with SMTP_FAKE_PORT the local SMTP fake runs in this process; the mail
 * sender loop runs when there is somewhere to send (SMTP_URL or the fake).
 */
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import type { DataSource } from 'typeorm';
import { createApp } from './app';
import { loadConfig, type Config } from './config';
import { makeDataSource } from './db';
import { makeLogger, type Logger } from './logger';
import { startMail, type MailRuntime } from './mail';
import { startAnalysisRuntime, type AnalysisRuntime } from './analysis/queue';
import type { Notifier } from './notify';
import { runUntilSignalled } from './run-main';

export interface Running {
  url: string;
  port: number;
  server: Server;
  dataSource: DataSource;
  config: Config;
  logger: Logger;
  /** the SMTP fake (when SMTP_FAKE_PORT is set), the sender loop and the e-mail notifier */
  mail: MailRuntime;
  /** the analysis queue (pg-boss); its workers run here when WORKERS_IN_PROCESS (else `server/worker.ts`) */
  analysis: AnalysisRuntime;
  stop(): Promise<void>;
}

export interface StartOptions {
  /** who hears of opened and assigned work orders and stored findings; default: the e-mail notifier */
  notifier?: Notifier;
}

const running = new Set<Running>();

export async function start(config: Config = loadConfig(), options: StartOptions = {}): Promise<Running> {
  const logger = makeLogger(config);
  const dataSource = makeDataSource(config.DATABASE_URL);
  await dataSource.initialize();
  let mail: MailRuntime | undefined;
  let analysis: AnalysisRuntime | undefined;
  try {
    if (await dataSource.showMigrations()) {
      logger.warn('database migrations are pending: run `npx tsx server/cli/migrate.ts`');
    }
    mail = await startMail({ config, dataSource, logger });
    const notifier = options.notifier ?? mail.notifier;
    analysis = await startAnalysisRuntime({
      config,
      dataSource,
      logger,
      notify: notifier,
      work: config.WORKERS_IN_PROCESS,
    });
    const app = createApp({ config, dataSource, logger, syncHooks: analysis.hooks, notifier });
    const server = await new Promise<Server>((resolve, reject) => {
      const s = app.listen(config.PORT, config.HOST, (err?: Error) => (err ? reject(err) : resolve(s)));
      s.once('error', reject);
    });
    server.keepAliveTimeout = 65_000; // longer than common proxies' idle timeout
    const port = (server.address() as AddressInfo).port;
    const host = config.HOST.includes(':') ? `[${config.HOST}]` : config.HOST;
    const url = `http://${host === '0.0.0.0' ? '127.0.0.1' : host}:${port}`;

    let stopping: Promise<void> | undefined;
    const handle: Running = {
      url,
      port,
      server,
      dataSource,
      config,
      logger,
      mail,
      analysis,
      stop: () =>
        (stopping ??= (async () => {
          running.delete(handle);
          await new Promise<void>((resolve) => {
            server.close(() => resolve());
            server.closeIdleConnections();
            // In-flight requests get a moment; then their sockets are closed too.
            setTimeout(() => server.closeAllConnections(), 5000).unref();
          });
          await analysis?.stop();
          await mail?.stop();
          if (dataSource.isInitialized) await dataSource.destroy();
        })()),
    };
    running.add(handle);
    logger.info({ url }, 'listening');
    return handle;
  } catch (err) {
    await analysis?.stop();
    await mail?.stop();
    await dataSource.destroy();
    throw err;
  }
}

/** Stops every server started by start() in this process. */
export async function stop(): Promise<void> {
  await Promise.all([...running].map((r) => r.stop()));
}

if (require.main === module)
  runUntilSignalled(
    () => start(),
    (r) => `Trueround listening on ${r.url}`,
    'server',
  );
