/**
 * Runs a process entry point (the API server, an analysis worker) until SIGINT/SIGTERM: prints
 * its banner once started, stops cleanly on a signal, and exits 1 with a one-line message (no
 * stack) when it cannot start.
 */
import type { Logger } from './logger';

export function runUntilSignalled<T extends { logger: Logger; stop(): Promise<void> }>(
  start: () => Promise<T>,
  banner: (r: T) => string,
  label: string,
): void {
  start()
    .then((r) => {
      console.log(banner(r));
      const shutdown = (signal: NodeJS.Signals) => {
        r.logger.info({ signal }, `${label} shutting down`);
        r.stop().then(
          () => process.exit(0),
          (e: unknown) => {
            console.error(e);
            process.exit(1);
          },
        );
      };
      process.once('SIGINT', shutdown);
      process.once('SIGTERM', shutdown);
    })
    .catch((e: unknown) => {
      console.error(`[${label}] ${e instanceof Error ? e.message : String(e)}`);
      process.exit(1);
    });
}
