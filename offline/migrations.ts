/**
 * The device store's schema, as numbered migrations run at start. The version lives in
 * `meta.schema_version`; each migration is a function run in its own transaction together with
 * the version bump, so a failed migration leaves the store at the version before it.
 *
 * Never edit a released migration: add the next one.
 *
 *  1. initial: reference data (units, instruments, routes and their versions, pull cursors),
 *     rounds, append-only readings, check answers, photos (bytes as BLOB) and the outbox, in
 *     the shape of sync payload version 1.
 *  2. flags-and-dismissals: what the phone flagged at the gauge (reading flags, confirmed after a
 *     flag) and what the technician dismissed, for sync payload version 2; waiting outbox rows
 *     are rewritten to payload version 2.
 *  3. authors: who made each outbox row, round and photo (the signed-in user's id and name). The
 *     sync client pushes only the signed-in person's rows; another person's wait on the device
 *     until they sign in here again (./sync.ts). Rows from before have no author and go with
 *     whoever signs in next, as they did.
 */
import { StoreVersionError } from './errors';
import type { LocalDb, LocalDbOps } from './local-db';

export interface Migration {
  version: number;
  name: string;
  up(tx: LocalDbOps): Promise<void>;
}

const v1: Migration = {
  version: 1,
  name: 'initial',
  async up(tx) {
    await tx.exec(`
      CREATE TABLE units (
        id TEXT PRIMARY KEY,
        site_id TEXT NOT NULL,
        sync_version INTEGER NOT NULL,
        json TEXT NOT NULL
      );
      CREATE INDEX ix_units_site ON units(site_id);

      CREATE TABLE instruments (
        id TEXT PRIMARY KEY,
        unit_id TEXT NOT NULL,
        tag TEXT NOT NULL,
        sync_version INTEGER NOT NULL,
        json TEXT NOT NULL
      );
      CREATE INDEX ix_instruments_unit_tag ON instruments(unit_id, tag);

      CREATE TABLE routes (
        id TEXT PRIMARY KEY,
        site_id TEXT NOT NULL,
        unit_id TEXT NOT NULL,
        current_version_id TEXT NOT NULL,
        sync_version INTEGER NOT NULL,
        json TEXT NOT NULL
      );
      CREATE INDEX ix_routes_site ON routes(site_id);

      -- Every version the device has seen: a round keeps the version it was started on.
      CREATE TABLE route_versions (
        id TEXT PRIMARY KEY,
        route_id TEXT NOT NULL,
        number INTEGER NOT NULL,
        json TEXT NOT NULL
      );
      CREATE INDEX ix_route_versions_route ON route_versions(route_id);

      CREATE TABLE pull_cursors (
        site_id TEXT PRIMARY KEY,
        cursor INTEGER NOT NULL,
        pulled_at TEXT NOT NULL,
        server_time TEXT NOT NULL
      );

      CREATE TABLE rounds (
        id TEXT PRIMARY KEY,
        route_version_id TEXT NOT NULL REFERENCES route_versions(id),
        status TEXT NOT NULL CHECK (status IN ('in-progress', 'finished')),
        started_at TEXT NOT NULL,
        finished_at TEXT
      );

      -- Append-only: a correction or a re-take is a new row naming the one it supersedes.
      CREATE TABLE readings (
        seq INTEGER PRIMARY KEY AUTOINCREMENT,
        id TEXT NOT NULL UNIQUE,
        round_id TEXT NOT NULL REFERENCES rounds(id),
        instrument_id TEXT NOT NULL,
        tag TEXT NOT NULL,
        value_typed REAL,
        unit TEXT NOT NULL,
        reference TEXT,
        device_time TEXT NOT NULL,
        note TEXT,
        skip_reason TEXT,
        supersedes TEXT REFERENCES readings(id)
      );
      CREATE INDEX ix_readings_round ON readings(round_id);
      CREATE INDEX ix_readings_instrument ON readings(instrument_id, seq);
      CREATE TRIGGER readings_no_update BEFORE UPDATE ON readings
        BEGIN SELECT RAISE(ABORT, 'readings are append-only: record a new reading that supersedes this one'); END;
      CREATE TRIGGER readings_no_delete BEFORE DELETE ON readings
        BEGIN SELECT RAISE(ABORT, 'readings are append-only'); END;

      CREATE TABLE check_answers (
        seq INTEGER PRIMARY KEY AUTOINCREMENT,
        id TEXT NOT NULL UNIQUE,
        round_id TEXT NOT NULL REFERENCES rounds(id),
        check_id TEXT NOT NULL,
        answer_json TEXT NOT NULL,
        note TEXT,
        device_time TEXT NOT NULL
      );
      CREATE INDEX ix_check_answers_round ON check_answers(round_id, check_id);

      CREATE TABLE photos (
        id TEXT PRIMARY KEY,
        round_id TEXT NOT NULL REFERENCES rounds(id),
        reading_id TEXT REFERENCES readings(id),
        check_id TEXT,
        mime TEXT NOT NULL,
        sha256 TEXT NOT NULL,
        byte_size INTEGER NOT NULL,
        data BLOB NOT NULL,
        device_time TEXT NOT NULL,
        -- local: not yet announced by a push; announced: the server knows the metadata and wants
        -- the bytes; stored: the server has the bytes; refused: the server turned the bytes down.
        upload_state TEXT NOT NULL DEFAULT 'local' CHECK (upload_state IN ('local', 'announced', 'stored', 'refused')),
        attempts INTEGER NOT NULL DEFAULT 0,
        next_attempt_at INTEGER NOT NULL DEFAULT 0,
        last_error TEXT
      );
      CREATE INDEX ix_photos_state ON photos(upload_state, next_attempt_at);

      -- One row per action, in the order the actions happened. payload is the wire item.
      CREATE TABLE outbox (
        seq INTEGER PRIMARY KEY AUTOINCREMENT,
        kind TEXT NOT NULL CHECK (kind IN ('round', 'reading', 'checkAnswer', 'photo')),
        record_id TEXT NOT NULL,
        payload TEXT NOT NULL,
        -- waiting: to push; isolating: its batch was refused, push it alone; sent; refused.
        state TEXT NOT NULL DEFAULT 'waiting' CHECK (state IN ('waiting', 'isolating', 'sent', 'refused')),
        created_at TEXT NOT NULL,
        sent_at TEXT,
        attempts INTEGER NOT NULL DEFAULT 0,
        refused_at TEXT,
        refused_message TEXT,
        refused_details TEXT
      );
      CREATE INDEX ix_outbox_state ON outbox(state, seq);
    `);
  },
};

const v2: Migration = {
  version: 2,
  name: 'flags-and-dismissals',
  async up(tx) {
    await tx.exec(`
      ALTER TABLE readings ADD COLUMN flags_json TEXT NOT NULL DEFAULT '[]';
      ALTER TABLE readings ADD COLUMN confirmed_after_flag INTEGER NOT NULL DEFAULT 0;
      CREATE TABLE dismissals (
        seq INTEGER PRIMARY KEY AUTOINCREMENT,
        id TEXT NOT NULL UNIQUE,
        round_id TEXT NOT NULL REFERENCES rounds(id),
        reading_id TEXT REFERENCES readings(id),
        tag TEXT,
        flag TEXT NOT NULL,
        note TEXT,
        device_time TEXT NOT NULL
      );
      CREATE INDEX ix_dismissals_round ON dismissals(round_id);
    `);
    // Outbox rows not yet sent carry version-1 items; the next push sends version 2.
    const rows = await tx.all<{ seq: number; kind: string; payload: string }>(
      `SELECT seq, kind, payload FROM outbox WHERE state <> 'sent' AND kind IN ('round', 'reading')`,
    );
    for (const r of rows) {
      let item: Record<string, unknown>;
      try {
        item = JSON.parse(r.payload) as Record<string, unknown>;
      } catch {
        continue; // reported as a bad row when read; a migration does not guess at damaged data
      }
      if (r.kind === 'round') item = { ...item, dismissals: Array.isArray(item.dismissals) ? item.dismissals : [] };
      else
        item = {
          ...item,
          confirmedAfterFlag: item.confirmedAfterFlag === true,
          flags: Array.isArray(item.flags) ? item.flags : [],
        };
      await tx.run('UPDATE outbox SET payload = ? WHERE seq = ?', [JSON.stringify(item), r.seq]);
    }
  },
};

const v3: Migration = {
  version: 3,
  name: 'authors',
  async up(tx) {
    await tx.exec(`
      ALTER TABLE outbox ADD COLUMN author_id TEXT;
      ALTER TABLE outbox ADD COLUMN author_name TEXT;
      ALTER TABLE rounds ADD COLUMN author_id TEXT;
      ALTER TABLE rounds ADD COLUMN author_name TEXT;
      ALTER TABLE photos ADD COLUMN author_id TEXT;
      CREATE INDEX ix_outbox_author ON outbox(state, author_id, seq);
    `);
  },
};

export const MIGRATIONS: readonly Migration[] = [v1, v2, v3];
export const LATEST_SCHEMA_VERSION = MIGRATIONS[MIGRATIONS.length - 1].version;

export async function schemaVersion(db: LocalDbOps): Promise<number> {
  await db.exec('CREATE TABLE IF NOT EXISTS meta (key TEXT PRIMARY KEY, value TEXT NOT NULL)');
  const row = await db.first<{ value: string }>(`SELECT value FROM meta WHERE key = 'schema_version'`);
  if (!row) return 0;
  const v = Number(row.value);
  if (!Number.isInteger(v) || v < 0)
    throw new Error(`meta.schema_version is ${JSON.stringify(row.value)}, not a whole number`);
  return v;
}

export interface MigrationReport {
  from: number;
  to: number;
  applied: string[];
}

/**
 * Brings the store to the newest version (or to `target`). Each step runs in one transaction
 * with its version bump. A store newer than this app is left alone (StoreVersionError).
 */
export async function migrate(
  db: LocalDb,
  migrations: readonly Migration[] = MIGRATIONS,
  target: number = migrations[migrations.length - 1]?.version ?? 0,
): Promise<MigrationReport> {
  migrations.forEach((m, i) => {
    if (m.version !== i + 1) throw new Error(`migration "${m.name}" is number ${m.version}, expected ${i + 1}`);
  });
  const latest = migrations[migrations.length - 1]?.version ?? 0;
  if (target > latest) throw new Error(`no migration to schema version ${target} (latest is ${latest})`);
  const from = await schemaVersion(db);
  if (from > latest) throw new StoreVersionError(from, latest);
  const applied: string[] = [];
  for (const m of migrations) {
    if (m.version <= from || m.version > target) continue;
    await db.transaction(async (tx) => {
      await m.up(tx);
      await tx.run(
        `INSERT INTO meta (key, value) VALUES ('schema_version', ?) ON CONFLICT(key) DO UPDATE SET value = excluded.value`,
        [String(m.version)],
      );
    });
    applied.push(`${m.version} ${m.name}`);
  }
  return { from, to: Math.max(from, Math.min(target, latest)), applied };
}
