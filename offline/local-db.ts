/**
 * The small database interface the offline core is written against. The app backs it with
 * expo-sqlite's async API (offline/expo-db.ts), the node tests with sql.js. No React, Expo or
 * DOM import here: this file is checked and tested in node.
 *
 * `createSerialDb` turns a bare connection into a `LocalDb`: every statement runs one after
 * another through a queue, and `transaction(fn)` holds the queue from BEGIN to COMMIT, so no
 * statement from elsewhere in the app can slip into someone else's transaction while it awaits
 * (expo-sqlite's `withExclusiveTransactionAsync` is not available on the web, and
 * `withTransactionAsync` does not keep other callers out).
 */

export type SqlValue = string | number | null | Uint8Array;
export type SqlParams = readonly SqlValue[];
export type Row = Record<string, SqlValue>;

export interface RunResult {
  changes: number;
  lastInsertRowId: number;
}

/** Statements, inside or outside a transaction. */
export interface LocalDbOps {
  exec(sql: string): Promise<void>;
  run(sql: string, params?: SqlParams): Promise<RunResult>;
  all<T = Row>(sql: string, params?: SqlParams): Promise<T[]>;
  first<T = Row>(sql: string, params?: SqlParams): Promise<T | null>;
}

export interface LocalDb extends LocalDbOps {
  /**
   * Runs `fn` in one transaction: committed when it resolves, rolled back when it throws (the
   * error is re-thrown). Statements inside must go through `tx`; calling the outer db from
   * inside waits for the transaction to end, so do not.
   */
  transaction<T>(fn: (tx: LocalDbOps) => Promise<T>): Promise<T>;
  close(): Promise<void>;
}

/** A bare connection: what each adapter provides. */
export interface RawConnection extends LocalDbOps {
  close(): Promise<void>;
}

/** A first-in first-out lock: `run(task)` starts `task` once every earlier task has settled. */
export class SerialQueue {
  private tail: Promise<unknown> = Promise.resolve();

  run<T>(task: () => Promise<T>): Promise<T> {
    const result = this.tail.then(task, task);
    this.tail = result.catch(() => undefined);
    return result;
  }
}

export function createSerialDb(conn: RawConnection): LocalDb {
  const queue = new SerialQueue();
  let closed = false;
  const guard = () => {
    if (closed) throw new Error('The local database is closed.');
  };
  return {
    exec: (sql) => queue.run(async () => (guard(), conn.exec(sql))),
    run: (sql, params) => queue.run(async () => (guard(), conn.run(sql, params))),
    all: <T>(sql: string, params?: SqlParams) => queue.run(async () => (guard(), conn.all<T>(sql, params))),
    first: <T>(sql: string, params?: SqlParams) => queue.run(async () => (guard(), conn.first<T>(sql, params))),
    transaction: <T>(fn: (tx: LocalDbOps) => Promise<T>) =>
      queue.run(async () => {
        guard();
        let open = true;
        const check = () => {
          if (!open) throw new Error('A statement ran on a transaction that has already ended.');
        };
        const tx: LocalDbOps = {
          exec: async (sql) => (check(), conn.exec(sql)),
          run: async (sql, params) => (check(), conn.run(sql, params)),
          all: async <R>(sql: string, params?: SqlParams) => (check(), conn.all<R>(sql, params)),
          first: async <R>(sql: string, params?: SqlParams) => (check(), conn.first<R>(sql, params)),
        };
        await conn.exec('BEGIN IMMEDIATE');
        try {
          const out = await fn(tx);
          open = false;
          await conn.exec('COMMIT');
          return out;
        } catch (e) {
          open = false;
          try {
            await conn.exec('ROLLBACK');
          } catch {
            // SQLite may already have rolled back (e.g. after SQLITE_FULL); the first error counts.
          }
          throw e;
        }
      }),
    close: () =>
      queue.run(async () => {
        if (closed) return;
        closed = true;
        await conn.close();
      }),
  };
}
