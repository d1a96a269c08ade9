/**
 * What the server does after a push has committed. `onRoundsPushed(roundIds)` gets the rounds
 * that received anything new (new round, finished round, new readings, answers or photos). The
 * analysis hangs here as a pg-boss job (server/analysis/queue.ts `hooks`, wired by server/main.ts):
 * the hook enqueues and returns, it does not compute. It runs after the commit; its
 * failure is logged and never turns a stored push into an error. The default does nothing.
 */
export interface SyncHooks {
  onRoundsPushed(roundIds: string[]): void | Promise<void>;
}

export const noopSyncHooks: SyncHooks = {
  onRoundsPushed: () => undefined,
};
