/**
 * sql.js (SQLite compiled to WebAssembly) behind the offline core's LocalDb interface, for node
 * tests. The same SQLite engine family as expo-sqlite's web build (wa-sqlite), so the SQL the
 * store writes is exercised for real.
 */
import initSqlJs from 'sql.js';
import type { Database, SqlJsStatic } from 'sql.js';
import {
  createSerialDb,
  type LocalDb,
  type RawConnection,
  type Row,
  type SqlParams,
  type SqlValue,
} from '@/offline/local-db';

let engine: Promise<SqlJsStatic> | null = null;
function sqlJs(): Promise<SqlJsStatic> {
  engine ??= initSqlJs();
  return engine;
}

export interface SqlJsDb extends LocalDb {
  /** The sql.js database underneath (for export/reopen in migration tests). */
  readonly raw: Database;
  /** Makes the next statement whose SQL matches `pattern` throw (simulates a failure mid-action). */
  failNext(pattern: RegExp, message?: string): void;
  /** Every statement run, in order (for "one transaction per action" checks). */
  readonly log: string[];
}

function toRow(columns: string[], values: unknown[]): Row {
  const r: Row = {};
  columns.forEach((c, i) => (r[c] = values[i] as SqlValue));
  return r;
}

export async function openSqlJsDb(bytes?: Uint8Array): Promise<SqlJsDb> {
  const SQL = await sqlJs();
  const db = new SQL.Database(bytes);
  db.exec('PRAGMA foreign_keys = ON');
  const faults: { pattern: RegExp; message: string }[] = [];
  const log: string[] = [];
  const maybeFail = (sql: string) => {
    log.push(sql.trim().split(/\s+/).slice(0, 3).join(' '));
    const i = faults.findIndex((f) => f.pattern.test(sql));
    if (i >= 0) {
      const [f] = faults.splice(i, 1);
      throw new Error(f.message);
    }
  };
  const query = (sql: string, params?: SqlParams): Row[] => {
    maybeFail(sql);
    const stmt = db.prepare(sql);
    try {
      if (params && params.length) stmt.bind(params as SqlValue[]);
      const rows: Row[] = [];
      const cols = stmt.getColumnNames();
      while (stmt.step()) rows.push(toRow(cols, stmt.get()));
      return rows;
    } finally {
      stmt.free();
    }
  };
  const conn: RawConnection = {
    async exec(sql) {
      maybeFail(sql);
      db.exec(sql);
    },
    async run(sql, params) {
      query(sql, params);
      const changes = db.getRowsModified();
      const id = db.exec('SELECT last_insert_rowid() AS id')[0]?.values[0]?.[0];
      return { changes, lastInsertRowId: Number(id ?? 0) };
    },
    async all<T>(sql: string, params?: SqlParams) {
      return query(sql, params) as T[];
    },
    async first<T>(sql: string, params?: SqlParams) {
      return (query(sql, params)[0] as T | undefined) ?? null;
    },
    async close() {
      db.close();
    },
  };
  const local = createSerialDb(conn);
  return Object.assign(local, {
    raw: db,
    log,
    failNext(pattern: RegExp, message = 'simulated failure') {
      faults.push({ pattern, message });
    },
  });
}
