/**
 * What the server does after a push has committed. `onRoundsPushed(roundIds)` gets the rounds
 * that received anything new (new round, finished round, new readings, answers or photos). The
 * analysis (state points, balances, reconciliation, findings) will hang here as a pg-boss job in a
 * later issue: the hook should enqueue and return, not compute. It runs after the commit; its
 * failure is logged and never turns a stored push into an error. The default does nothing.
 */
export interface SyncHooks {
  onRoundsPushed(roundIds: string[]): void | Promise<void>;
}

export const noopSyncHooks: SyncHooks = {
  onRoundsPushed: () => undefined,
};
