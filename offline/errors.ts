/** Typed errors of the offline store, with messages meant for the person holding the device. */

/** Another tab (or window) of the app holds the database file. */
export class StoreLockedError extends Error {
  readonly code = 'store_locked';
  constructor(public readonly cause?: unknown) {
    super(
      'Trueround is open in another tab or window, which holds the device store. ' +
        'Close the other tab, then reload this one.',
    );
    this.name = 'StoreLockedError';
  }
}

/** The stored database was written by a newer app version than this one. */
export class StoreVersionError extends Error {
  readonly code = 'store_too_new';
  constructor(
    public readonly found: number,
    public readonly supported: number,
  ) {
    super(
      `The device store is at schema version ${found}, newer than this app understands (${supported}). ` +
        'Reload to get the current app; nothing has been changed.',
    );
    this.name = 'StoreVersionError';
  }
}

/** A stored row whose JSON does not match its schema. Reported, never thrown at a screen. */
export interface BadRow {
  table: string;
  id: string;
  column: string;
  problem: string;
}

/**
 * Does this error say that another context holds the OPFS file? In Chromium the sqlite worker
 * passes on `NoModificationAllowedError: Failed to execute 'createSyncAccessHandle' …`, Firefox
 * says `NoModificationAllowedError` too; after such a failure the worker's VFS stays unset and
 * later calls say `Invalid VFS state`. SQLite's own `database is locked` (SQLITE_BUSY) counts too.
 */
export function isLockError(e: unknown): boolean {
  const name = (e as { name?: unknown } | null)?.name;
  if (name === 'NoModificationAllowedError' || name === 'StoreLockedError') return true;
  const text = e instanceof Error ? `${e.name}: ${e.message}` : String(e);
  return /NoModificationAllowedError|createSyncAccessHandle|Access Handles? cannot be created|Invalid VFS state|database is locked|SQLITE_BUSY/i.test(
    text,
  );
}
