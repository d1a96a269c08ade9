/**
 * expo-sqlite (async API only) behind the offline core's LocalDb interface. Used by the app;
 * call `openExpoDb` after mount (from OfflineProvider's effect), never at module load.
 *
 * On the web the file lives in the origin-private file system and one tab at a time can hold it:
 * a second tab gets a `StoreLockedError` with a message for the user.
 */
import * as SQLite from 'expo-sqlite';
import { isLockError, StoreLockedError } from './errors';
import { createSerialDb, type LocalDb, type RawConnection, type SqlParams } from './local-db';

export const DATABASE_NAME = 'trueround.db';

function wrap<T>(p: Promise<T>): Promise<T> {
  return p.catch((e: unknown) => {
    throw isLockError(e) ? new StoreLockedError(e) : e;
  });
}

export async function openExpoDb(name: string = DATABASE_NAME): Promise<LocalDb> {
  const db = await wrap(SQLite.openDatabaseAsync(name));
  // The first statement is where the web worker opens the OPFS file; a lock shows up here.
  await wrap(db.execAsync('PRAGMA foreign_keys = ON'));
  const params = (p?: SqlParams) => (p ? [...p] : []);
  const conn: RawConnection = {
    exec: (sql) => wrap(db.execAsync(sql)),
    run: async (sql, p) => {
      const r = await wrap(db.runAsync(sql, params(p)));
      return { changes: r.changes, lastInsertRowId: r.lastInsertRowId };
    },
    all: <T>(sql: string, p?: SqlParams) => wrap(db.getAllAsync<T>(sql, params(p))),
    first: <T>(sql: string, p?: SqlParams) => wrap(db.getFirstAsync<T>(sql, params(p))),
    close: () => db.closeAsync(),
  };
  return createSerialDb(conn);
}
