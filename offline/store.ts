/**
 * The device store: reference data pulled from the server, the rounds recorded on the device,
 * and the outbox that carries them to the server. Opened with `openStore(db)`, which runs the
 * migrations first. Every JSON column is parsed with its zod schema on read; a row that does not
 * parse is reported through `badRows()` and left out (an outbox row that does not parse is set
 * aside as refused, with the reason), never thrown at a screen.
 *
 * Writes of user actions live in ./actions.ts (record + outbox row in one transaction); the sync
 * client (./sync.ts) uses the outbox and photo-queue methods here.
 */
import type { z } from 'zod';
import type { Dismissal, PullResponse, PushCounts, ReadingFlag, RoundStatus } from '@/shared/api/sync';
import type { BadRow } from './errors';
import { isoTime, systemClock, type Clock, type IdSource } from './ids';
import type { LocalDb, LocalDbOps } from './local-db';
import { migrate, type MigrationReport } from './migrations';
import {
  describeIssues,
  OutboxPayload,
  StoredAnswer,
  StoredFlags,
  StoredInstrument,
  StoredRoute,
  StoredRouteVersion,
  StoredUnit,
  type OutboxKind,
  type OutboxPayloadOf,
} from './schemas';

export type { BadRow } from './errors';

export type LocalUnit = z.infer<typeof StoredUnit>;
export type LocalInstrument = z.infer<typeof StoredInstrument>;
export type LocalRoute = z.infer<typeof StoredRoute>;
export type LocalRouteVersion = z.infer<typeof StoredRouteVersion>;

export interface LocalDismissal extends Dismissal {
  id: string;
}

export interface LocalRound {
  id: string;
  routeVersionId: string;
  status: RoundStatus;
  startedAt: string;
  finishedAt: string | null;
  dismissals: LocalDismissal[];
}

export interface LocalReading {
  /** Local insertion order (the order the technician recorded things on this device). */
  seq: number;
  id: string;
  roundId: string;
  instrumentId: string;
  tag: string;
  valueTyped: number | null;
  unit: string;
  reference: 'absolute' | 'gauge' | 'vacuum' | null;
  deviceTime: string;
  note: string | null;
  skipReason: string | null;
  supersedes: string | null;
  flags: ReadingFlag[];
  confirmedAfterFlag: boolean;
  /** The id of the reading that replaced this one, if any. */
  supersededBy: string | null;
}

export interface LocalCheckAnswer {
  seq: number;
  id: string;
  roundId: string;
  checkId: string;
  answer: z.infer<typeof StoredAnswer>;
  note: string | null;
  deviceTime: string;
}

export type PhotoUploadState = 'local' | 'announced' | 'stored' | 'refused';

export interface LocalPhoto {
  id: string;
  roundId: string;
  readingId: string | null;
  checkId: string | null;
  mime: string;
  sha256: string;
  byteSize: number;
  deviceTime: string;
  uploadState: PhotoUploadState;
  attempts: number;
  nextAttemptAt: number;
  lastError: string | null;
}

export type OutboxState = 'waiting' | 'isolating' | 'sent' | 'refused';

export interface OutboxItem<K extends OutboxKind = OutboxKind> {
  seq: number;
  kind: K;
  recordId: string;
  payload: OutboxPayloadOf<K>;
}

export interface RefusedItem {
  seq: number;
  kind: OutboxKind;
  recordId: string;
  message: string;
  details: unknown;
  refusedAt: string;
}

/**
 * Whose outbox rows a sync run takes: the signed-in user's id (their rows and rows that carry no
 * author), or undefined for every row (a store without authors).
 */
export type AuthorScope = string | undefined;

/** `AND (<col> IS NULL OR <col> = ?)` for a scope, with its parameter. */
function byAuthor(scope: AuthorScope, column = 'author_id'): { sql: string; params: string[] } {
  return scope === undefined
    ? { sql: '', params: [] }
    : { sql: ` AND (${column} IS NULL OR ${column} = ?)`, params: [scope] };
}

/** Records another person made on this device, waiting until they sign in here again. */
export interface OthersWaiting {
  authorId: string;
  authorName: string;
  records: number;
}

export interface OutboxCounts {
  /** Not yet on the server (waiting, or being pushed alone after its batch was refused); the signed-in person's own. */
  waiting: number;
  /** Other people's records on this device, by author: they wait for their author (never pushed as someone else). */
  othersWaiting: OthersWaiting[];
  sent: number;
  refused: number;
  photosWaiting: number;
  photosStored: number;
  photosRefused: number;
}

export interface SyncMeta {
  /** Device time of the last push or pull that succeeded. */
  lastSyncAt: string | null;
  /** The server's clock at that sync. */
  lastServerTime: string | null;
  /** What the last successful push applied and found already there. */
  lastPush: { applied: PushCounts; duplicates: PushCounts } | null;
}

export interface StoreOptions {
  clock?: Clock;
}

type Listener = () => void;

/** meta keys */
const DEVICE_ID = 'device_id';
const LAST_SYNC_AT = 'last_sync_at';
const LAST_SERVER_TIME = 'last_server_time';
const LAST_PUSH = 'last_push';
const PERSIST_ASKED = 'persist_asked';
export const META_KEYS = { DEVICE_ID, LAST_SYNC_AT, LAST_SERVER_TIME, LAST_PUSH, PERSIST_ASKED } as const;

const placeholders = (n: number) => Array.from({ length: n }, () => '?').join(', ');

export class Store {
  private readonly bad = new Map<string, BadRow>();
  private readonly listeners = new Set<Listener>();

  constructor(
    readonly db: LocalDb,
    readonly migration: MigrationReport,
    readonly clock: Clock,
  ) {}

  // ── change notification and bad rows ────────────────────────────────────────────────────

  /** Calls `fn` after any write through the actions or the sync client. Returns unsubscribe. */
  onChange(fn: Listener): () => void {
    this.listeners.add(fn);
    return () => this.listeners.delete(fn);
  }

  notifyChange(): void {
    for (const fn of [...this.listeners]) {
      try {
        fn();
      } catch {
        // a listener's failure is its own; the store goes on
      }
    }
  }

  /** Stored rows whose JSON did not parse, since the store was opened. */
  badRows(): BadRow[] {
    return [...this.bad.values()];
  }

  /** Parses a stored JSON column; on failure records a BadRow and returns null. */
  parseJson<S extends z.ZodType>(schema: S, raw: unknown, where: Omit<BadRow, 'problem'>): z.output<S> | null {
    let value: unknown;
    try {
      value = typeof raw === 'string' ? JSON.parse(raw) : raw;
    } catch (e) {
      this.reportBad({ ...where, problem: `not JSON (${(e as Error).message})` });
      return null;
    }
    const r = schema.safeParse(value);
    if (!r.success) {
      this.reportBad({ ...where, problem: describeIssues(r.error) });
      return null;
    }
    return r.data;
  }

  private reportBad(row: BadRow) {
    const key = `${row.table}:${row.id}:${row.column}`;
    if (this.bad.get(key)?.problem === row.problem) return;
    this.bad.set(key, row);
  }

  // ── meta ────────────────────────────────────────────────────────────────────────────────

  async getMeta(key: string, db: LocalDbOps = this.db): Promise<string | null> {
    const r = await db.first<{ value: string }>('SELECT value FROM meta WHERE key = ?', [key]);
    return r?.value ?? null;
  }

  async setMeta(key: string, value: string, db: LocalDbOps = this.db): Promise<void> {
    await db.run('INSERT INTO meta (key, value) VALUES (?, ?) ON CONFLICT(key) DO UPDATE SET value = excluded.value', [
      key,
      value,
    ]);
  }

  /** The device's own id, made once and kept. */
  async deviceId(ids: IdSource): Promise<string> {
    return this.db.transaction(async (tx) => {
      const have = await this.getMeta(DEVICE_ID, tx);
      if (have) return have;
      const id = ids.uuid();
      await this.setMeta(DEVICE_ID, id, tx);
      return id;
    });
  }

  async syncMeta(): Promise<SyncMeta> {
    const [lastSyncAt, lastServerTime, lastPushRaw] = await Promise.all([
      this.getMeta(LAST_SYNC_AT),
      this.getMeta(LAST_SERVER_TIME),
      this.getMeta(LAST_PUSH),
    ]);
    let lastPush: SyncMeta['lastPush'] = null;
    if (lastPushRaw) {
      try {
        lastPush = JSON.parse(lastPushRaw) as SyncMeta['lastPush'];
      } catch {
        this.reportBad({ table: 'meta', id: LAST_PUSH, column: 'value', problem: 'not JSON' });
      }
    }
    return { lastSyncAt, lastServerTime, lastPush };
  }

  async noteSync(serverTime: string, push?: SyncMeta['lastPush']): Promise<void> {
    await this.db.transaction(async (tx) => {
      await this.setMeta(LAST_SYNC_AT, isoTime(this.clock.now()), tx);
      await this.setMeta(LAST_SERVER_TIME, serverTime, tx);
      if (push) await this.setMeta(LAST_PUSH, JSON.stringify(push), tx);
    });
  }

  // ── reference data ─────────────────────────────────────────────────────────────────────

  async pullCursor(siteId: string): Promise<number> {
    const r = await this.db.first<{ cursor: number }>('SELECT cursor FROM pull_cursors WHERE site_id = ?', [siteId]);
    return r ? Number(r.cursor) : 0;
  }

  /**
   * Applies a pull (already parsed with PullResponse) in one transaction. Each row is replaced
   * whole, keyed by id, unless the device already holds a newer sync version of it; the cursor
   * only moves forward. Applying the same pull twice gives the same state.
   */
  async applyPull(siteId: string, pull: PullResponse): Promise<{ units: number; instruments: number; routes: number }> {
    const counts = { units: 0, instruments: 0, routes: 0 };
    await this.db.transaction(async (tx) => {
      for (const u of pull.units) {
        const r = await tx.run(
          `INSERT INTO units (id, site_id, sync_version, json) VALUES (?, ?, ?, ?)
           ON CONFLICT(id) DO UPDATE SET site_id = excluded.site_id, sync_version = excluded.sync_version, json = excluded.json
           WHERE excluded.sync_version >= units.sync_version`,
          [u.id, u.siteId, u.syncVersion, JSON.stringify(u)],
        );
        counts.units += r.changes;
      }
      for (const i of pull.instruments) {
        const r = await tx.run(
          `INSERT INTO instruments (id, unit_id, tag, sync_version, json) VALUES (?, ?, ?, ?, ?)
           ON CONFLICT(id) DO UPDATE SET unit_id = excluded.unit_id, tag = excluded.tag, sync_version = excluded.sync_version, json = excluded.json
           WHERE excluded.sync_version >= instruments.sync_version`,
          [i.id, i.unitId, i.tag, i.syncVersion, JSON.stringify(i)],
        );
        counts.instruments += r.changes;
      }
      for (const rt of pull.routes) {
        const r = await tx.run(
          `INSERT INTO routes (id, site_id, unit_id, current_version_id, sync_version, json) VALUES (?, ?, ?, ?, ?, ?)
           ON CONFLICT(id) DO UPDATE SET site_id = excluded.site_id, unit_id = excluded.unit_id,
             current_version_id = excluded.current_version_id, sync_version = excluded.sync_version, json = excluded.json
           WHERE excluded.sync_version >= routes.sync_version`,
          [rt.id, rt.siteId, rt.unitId, rt.version.id, rt.syncVersion, JSON.stringify(rt)],
        );
        counts.routes += r.changes;
        // A published version does not change; keep every version seen (rounds refer to them).
        await tx.run(
          `INSERT INTO route_versions (id, route_id, number, json) VALUES (?, ?, ?, ?)
           ON CONFLICT(id) DO UPDATE SET route_id = excluded.route_id, number = excluded.number, json = excluded.json`,
          [rt.version.id, rt.id, rt.version.number, JSON.stringify({ ...rt.version, routeId: rt.id })],
        );
      }
      await tx.run(
        `INSERT INTO pull_cursors (site_id, cursor, pulled_at, server_time) VALUES (?, ?, ?, ?)
         ON CONFLICT(site_id) DO UPDATE SET cursor = MAX(pull_cursors.cursor, excluded.cursor),
           pulled_at = excluded.pulled_at, server_time = excluded.server_time`,
        [siteId, pull.cursor, isoTime(this.clock.now()), pull.serverTime],
      );
    });
    return counts;
  }

  private parseRows<S extends z.ZodType>(
    table: string,
    schema: S,
    rows: { id: string; json: string }[],
  ): z.output<S>[] {
    const out: z.output<S>[] = [];
    for (const r of rows) {
      const v = this.parseJson(schema, r.json, { table, id: r.id, column: 'json' });
      if (v !== null) out.push(v);
    }
    return out;
  }

  async listUnits(siteId: string): Promise<LocalUnit[]> {
    const rows = await this.db.all<{ id: string; json: string }>(
      'SELECT id, json FROM units WHERE site_id = ? ORDER BY id',
      [siteId],
    );
    return this.parseRows('units', StoredUnit, rows);
  }

  async getUnit(id: string, db: LocalDbOps = this.db): Promise<LocalUnit | null> {
    const rows = await db.all<{ id: string; json: string }>('SELECT id, json FROM units WHERE id = ?', [id]);
    return this.parseRows('units', StoredUnit, rows)[0] ?? null;
  }

  async listInstruments(unitId: string, db: LocalDbOps = this.db): Promise<LocalInstrument[]> {
    const rows = await db.all<{ id: string; json: string }>(
      'SELECT id, json FROM instruments WHERE unit_id = ? ORDER BY tag',
      [unitId],
    );
    return this.parseRows('instruments', StoredInstrument, rows);
  }

  async instrumentByTag(unitId: string, tag: string, db: LocalDbOps = this.db): Promise<LocalInstrument | null> {
    const rows = await db.all<{ id: string; json: string }>(
      'SELECT id, json FROM instruments WHERE unit_id = ? AND tag = ?',
      [unitId, tag],
    );
    return this.parseRows('instruments', StoredInstrument, rows)[0] ?? null;
  }

  async listRoutes(siteId: string): Promise<LocalRoute[]> {
    const rows = await this.db.all<{ id: string; json: string }>(
      'SELECT id, json FROM routes WHERE site_id = ? ORDER BY id',
      [siteId],
    );
    return this.parseRows('routes', StoredRoute, rows).sort((a, b) => a.name.localeCompare(b.name));
  }

  async getRoute(id: string, db: LocalDbOps = this.db): Promise<LocalRoute | null> {
    const rows = await db.all<{ id: string; json: string }>('SELECT id, json FROM routes WHERE id = ?', [id]);
    return this.parseRows('routes', StoredRoute, rows)[0] ?? null;
  }

  async getRouteVersion(id: string, db: LocalDbOps = this.db): Promise<LocalRouteVersion | null> {
    const rows = await db.all<{ id: string; json: string }>('SELECT id, json FROM route_versions WHERE id = ?', [id]);
    return this.parseRows('route_versions', StoredRouteVersion, rows)[0] ?? null;
  }

  // ── rounds and what was recorded on them ───────────────────────────────────────────────

  async getRound(id: string, db: LocalDbOps = this.db): Promise<LocalRound | null> {
    const r = await db.first<{
      id: string;
      route_version_id: string;
      status: string;
      started_at: string;
      finished_at: string | null;
    }>('SELECT id, route_version_id, status, started_at, finished_at FROM rounds WHERE id = ?', [id]);
    if (!r) return null;
    const ds = await db.all<{
      id: string;
      reading_id: string | null;
      tag: string | null;
      flag: string;
      note: string | null;
      device_time: string;
    }>('SELECT id, reading_id, tag, flag, note, device_time FROM dismissals WHERE round_id = ? ORDER BY seq', [id]);
    return {
      id: r.id,
      routeVersionId: r.route_version_id,
      status: r.status as RoundStatus,
      startedAt: r.started_at,
      finishedAt: r.finished_at,
      dismissals: ds.map((d) => ({
        id: d.id,
        ...(d.reading_id ? { readingId: d.reading_id } : {}),
        ...(d.tag ? { tag: d.tag } : {}),
        flag: d.flag,
        note: d.note,
        deviceTime: d.device_time,
      })),
    };
  }

  /** Rounds on the device, newest first; `siteId` limits to that site's routes. */
  /** Who started the round on this device (null: not kept, a round from before authors were). */
  async roundAuthor(roundId: string): Promise<{ id: string; name: string | null } | null> {
    const r = await this.db.first<{ author_id: string | null; author_name: string | null }>(
      'SELECT author_id, author_name FROM rounds WHERE id = ?',
      [roundId],
    );
    return r?.author_id ? { id: r.author_id, name: r.author_name } : null;
  }

  async listRounds(filter: { siteId?: string; status?: RoundStatus } = {}): Promise<LocalRound[]> {
    const where: string[] = [];
    const params: string[] = [];
    if (filter.status) {
      where.push('r.status = ?');
      params.push(filter.status);
    }
    if (filter.siteId) {
      where.push('rt.site_id = ?');
      params.push(filter.siteId);
    }
    const ids = await this.db.all<{ id: string }>(
      `SELECT r.id FROM rounds r
       LEFT JOIN route_versions rv ON rv.id = r.route_version_id
       LEFT JOIN routes rt ON rt.id = rv.route_id
       ${where.length ? 'WHERE ' + where.join(' AND ') : ''}
       ORDER BY r.rowid DESC`,
      params,
    );
    const out: LocalRound[] = [];
    for (const { id } of ids) {
      const r = await this.getRound(id);
      if (r) out.push(r);
    }
    return out;
  }

  private toReading(r: ReadingRow, supersededBy: string | null): LocalReading | null {
    const flags = this.parseJson(StoredFlags, r.flags_json, { table: 'readings', id: r.id, column: 'flags_json' });
    return {
      seq: Number(r.seq),
      id: r.id,
      roundId: r.round_id,
      instrumentId: r.instrument_id,
      tag: r.tag,
      valueTyped: r.value_typed === null ? null : Number(r.value_typed),
      unit: r.unit,
      reference: (r.reference as LocalReading['reference']) ?? null,
      deviceTime: r.device_time,
      note: r.note,
      skipReason: r.skip_reason,
      supersedes: r.supersedes,
      // A damaged flags column is reported; the reading itself still counts.
      flags: flags ?? [],
      confirmedAfterFlag: Number(r.confirmed_after_flag) === 1,
      supersededBy,
    };
  }

  async getReading(id: string, db: LocalDbOps = this.db): Promise<LocalReading | null> {
    const r = await db.first<ReadingRow>(`${READING_SELECT} WHERE r.id = ?`, [id]);
    return r ? this.toReading(r, r.superseded_by) : null;
  }

  /**
   * The readings of a round in recording order. By default only the current ones (not
   * superseded); `all: true` gives the whole append-only history.
   */
  async roundReadings(roundId: string, opts: { all?: boolean } = {}): Promise<LocalReading[]> {
    const rows = await this.db.all<ReadingRow>(
      `${READING_SELECT} WHERE r.round_id = ? ${opts.all ? '' : 'AND ' + CURRENT} ORDER BY r.seq`,
      [roundId],
    );
    return rows.map((r) => this.toReading(r, r.superseded_by)).filter((r): r is LocalReading => r !== null);
  }

  /** The instrument's current reading on the latest other round (for the "change since last round" check). */
  async previousReading(instrumentId: string, excludeRoundId?: string): Promise<LocalReading | null> {
    const r = await this.db.first<ReadingRow>(
      `${READING_SELECT} WHERE r.instrument_id = ? AND r.round_id <> ? AND ${CURRENT} AND r.value_typed IS NOT NULL
       ORDER BY r.seq DESC LIMIT 1`,
      [instrumentId, excludeRoundId ?? ''],
    );
    return r ? this.toReading(r, null) : null;
  }

  /** The latest answer to each check of the round (an answer given again replaces the earlier one). */
  async roundCheckAnswers(roundId: string): Promise<LocalCheckAnswer[]> {
    const rows = await this.db.all<{
      seq: number;
      id: string;
      round_id: string;
      check_id: string;
      answer_json: string;
      note: string | null;
      device_time: string;
    }>(
      `SELECT a.* FROM check_answers a
       WHERE a.round_id = ? AND a.seq = (SELECT MAX(b.seq) FROM check_answers b WHERE b.round_id = a.round_id AND b.check_id = a.check_id)
       ORDER BY a.seq`,
      [roundId],
    );
    const out: LocalCheckAnswer[] = [];
    for (const r of rows) {
      const answer = this.parseJson(StoredAnswer, r.answer_json, {
        table: 'check_answers',
        id: r.id,
        column: 'answer_json',
      });
      if (!answer) continue;
      out.push({
        seq: Number(r.seq),
        id: r.id,
        roundId: r.round_id,
        checkId: r.check_id,
        answer,
        note: r.note,
        deviceTime: r.device_time,
      });
    }
    return out;
  }

  async roundPhotos(roundId: string): Promise<LocalPhoto[]> {
    const rows = await this.db.all<PhotoRow>(`SELECT ${PHOTO_COLUMNS} FROM photos WHERE round_id = ? ORDER BY rowid`, [
      roundId,
    ]);
    return rows.map(toPhoto);
  }

  async getPhoto(id: string, db: LocalDbOps = this.db): Promise<LocalPhoto | null> {
    const r = await db.first<PhotoRow>(`SELECT ${PHOTO_COLUMNS} FROM photos WHERE id = ?`, [id]);
    return r ? toPhoto(r) : null;
  }

  /** The photo's bytes as recorded. */
  async photoData(id: string): Promise<Uint8Array | null> {
    const r = await this.db.first<{ data: Uint8Array }>('SELECT data FROM photos WHERE id = ?', [id]);
    return r ? toBytes(r.data) : null;
  }

  // ── outbox (used by the sync client) ───────────────────────────────────────────────────

  async outboxCounts(scope?: AuthorScope): Promise<OutboxCounts> {
    const a = byAuthor(scope);
    const rows = await this.db.all<{ state: string; n: number }>(
      `SELECT state, COUNT(*) AS n FROM outbox WHERE 1 = 1${a.sql} GROUP BY state`,
      a.params,
    );
    const by = Object.fromEntries(rows.map((r) => [r.state, Number(r.n)]));
    const others =
      scope === undefined
        ? []
        : await this.db.all<{ author_id: string; author_name: string | null; n: number }>(
            `SELECT author_id, MAX(author_name) AS author_name, COUNT(*) AS n FROM outbox
              WHERE state IN ('waiting', 'isolating') AND author_id IS NOT NULL AND author_id <> ? GROUP BY author_id ORDER BY MIN(seq)`,
            [scope],
          );
    const photos = await this.db.all<{ upload_state: string; n: number }>(
      'SELECT upload_state, COUNT(*) AS n FROM photos GROUP BY upload_state',
    );
    const ph = Object.fromEntries(photos.map((r) => [r.upload_state, Number(r.n)]));
    return {
      waiting: (by.waiting ?? 0) + (by.isolating ?? 0),
      othersWaiting: others.map((o) => ({
        authorId: o.author_id,
        authorName: o.author_name ?? 'another person',
        records: Number(o.n),
      })),
      sent: by.sent ?? 0,
      refused: by.refused ?? 0,
      photosWaiting: (ph.local ?? 0) + (ph.announced ?? 0),
      photosStored: ph.stored ?? 0,
      photosRefused: ph.refused ?? 0,
    };
  }

  private async parseOutbox(
    rows: { seq: number; kind: string; record_id: string; payload: string }[],
  ): Promise<OutboxItem[]> {
    const out: OutboxItem[] = [];
    for (const r of rows) {
      const schema = OutboxPayload[r.kind as OutboxKind];
      const payload = schema
        ? this.parseJson(schema, r.payload, { table: 'outbox', id: String(r.seq), column: 'payload' })
        : (this.reportBad({
            table: 'outbox',
            id: String(r.seq),
            column: 'kind',
            problem: `unknown kind ${JSON.stringify(r.kind)}`,
          }),
          null);
      if (payload === null) {
        const bad = this.bad.get(`outbox:${r.seq}:payload`) ?? this.bad.get(`outbox:${r.seq}:kind`);
        await this.markRefused(
          [Number(r.seq)],
          `This record is damaged on the device and cannot be sent (${bad?.problem ?? 'unreadable'}).`,
          null,
        );
        continue;
      }
      out.push({ seq: Number(r.seq), kind: r.kind as OutboxKind, recordId: r.record_id, payload } as OutboxItem);
    }
    return out;
  }

  /** The oldest waiting rows, at most `limit` (damaged rows are set aside as refused on the way). */
  async waitingBatch(limit: number, scope?: AuthorScope): Promise<OutboxItem[]> {
    const a = byAuthor(scope);
    for (;;) {
      const rows = await this.db.all<{ seq: number; kind: string; record_id: string; payload: string }>(
        `SELECT seq, kind, record_id, payload FROM outbox WHERE state = 'waiting'${a.sql} ORDER BY seq LIMIT ?`,
        [...a.params, limit],
      );
      const items = await this.parseOutbox(rows);
      if (items.length > 0 || rows.length === 0) return items;
    }
  }

  /** The oldest row being pushed alone after its batch was refused. */
  async nextIsolated(scope?: AuthorScope): Promise<OutboxItem | null> {
    const a = byAuthor(scope);
    for (;;) {
      const rows = await this.db.all<{ seq: number; kind: string; record_id: string; payload: string }>(
        `SELECT seq, kind, record_id, payload FROM outbox WHERE state = 'isolating'${a.sql} ORDER BY seq LIMIT 1`,
        a.params,
      );
      if (rows.length === 0) return null;
      const items = await this.parseOutbox(rows);
      if (items.length) return items[0];
    }
  }

  /**
   * Marks pushed rows sent. Photos announced by them become due for upload, except those the
   * server already has (not in `photosWanted`), which are stored.
   */
  async markSent(items: OutboxItem[], photosWanted: readonly string[]): Promise<void> {
    if (items.length === 0) return;
    const now = isoTime(this.clock.now());
    const wanted = new Set(photosWanted);
    await this.db.transaction(async (tx) => {
      const seqs = items.map((i) => i.seq);
      for (let i = 0; i < seqs.length; i += 500) {
        const part = seqs.slice(i, i + 500);
        await tx.run(
          `UPDATE outbox SET state = 'sent', sent_at = ?, attempts = attempts + 1,
             refused_at = NULL, refused_message = NULL, refused_details = NULL
           WHERE seq IN (${placeholders(part.length)})`,
          [now, ...part],
        );
      }
      for (const it of items) {
        if (it.kind !== 'photo') continue;
        const state = wanted.has(it.recordId) ? 'announced' : 'stored';
        await tx.run(
          `UPDATE photos SET upload_state = ?, next_attempt_at = 0 WHERE id = ? AND upload_state IN ('local', 'announced')`,
          [state, it.recordId],
        );
      }
    });
  }

  /** A refused batch: its rows will be pushed one by one to find the bad record. */
  async markIsolating(seqs: number[]): Promise<void> {
    if (seqs.length === 0) return;
    await this.db.transaction(async (tx) => {
      for (let i = 0; i < seqs.length; i += 500) {
        const part = seqs.slice(i, i + 500);
        await tx.run(
          `UPDATE outbox SET state = 'isolating', attempts = attempts + 1 WHERE seq IN (${placeholders(part.length)})`,
          part,
        );
      }
    });
  }

  async markRefused(seqs: number[], message: string, details: unknown): Promise<void> {
    if (seqs.length === 0) return;
    const now = isoTime(this.clock.now());
    let detailsJson: string | null = null;
    try {
      detailsJson = details === undefined || details === null ? null : JSON.stringify(details);
    } catch {
      detailsJson = null;
    }
    await this.db.transaction(async (tx) => {
      for (let i = 0; i < seqs.length; i += 500) {
        const part = seqs.slice(i, i + 500);
        await tx.run(
          `UPDATE outbox SET state = 'refused', attempts = attempts + 1, refused_at = ?, refused_message = ?, refused_details = ?
           WHERE seq IN (${placeholders(part.length)})`,
          [now, message, detailsJson, ...part],
        );
      }
    });
  }

  /** Refused rows (of the scope's author, and those without one). */
  async refusedItems(scope?: AuthorScope): Promise<RefusedItem[]> {
    const a = byAuthor(scope);
    const rows = await this.db.all<{
      seq: number;
      kind: string;
      record_id: string;
      refused_message: string | null;
      refused_details: string | null;
      refused_at: string | null;
    }>(
      `SELECT seq, kind, record_id, refused_message, refused_details, refused_at FROM outbox WHERE state = 'refused'${a.sql} ORDER BY seq`,
      a.params,
    );
    return rows.map((r) => {
      let details: unknown = null;
      if (r.refused_details) {
        try {
          details = JSON.parse(r.refused_details);
        } catch {
          details = r.refused_details;
        }
      }
      return {
        seq: Number(r.seq),
        kind: r.kind as OutboxKind,
        recordId: r.record_id,
        message: r.refused_message ?? 'Refused',
        details,
        refusedAt: r.refused_at ?? '',
      };
    });
  }

  /** Puts refused rows (all, or the given ones) back in the queue, and refused photos too. */
  async retryRefused(seqs?: number[]): Promise<number> {
    const n = await this.db.transaction(async (tx) => {
      const r = seqs
        ? await tx.run(
            `UPDATE outbox SET state = 'waiting' WHERE state = 'refused' AND seq IN (${placeholders(seqs.length)})`,
            seqs,
          )
        : await tx.run(`UPDATE outbox SET state = 'waiting' WHERE state = 'refused'`);
      if (!seqs)
        await tx.run(
          `UPDATE photos SET upload_state = 'announced', next_attempt_at = 0, attempts = 0 WHERE upload_state = 'refused'`,
        );
      return r.changes;
    });
    this.notifyChange();
    return n;
  }

  // ── photo upload queue ─────────────────────────────────────────────────────────────────

  /** Announced photos whose next attempt is due, oldest first. */
  async photosDue(now: number, limit = 20, scope?: AuthorScope): Promise<LocalPhoto[]> {
    const a = byAuthor(scope);
    const rows = await this.db.all<PhotoRow>(
      `SELECT ${PHOTO_COLUMNS} FROM photos WHERE upload_state = 'announced' AND next_attempt_at <= ?${a.sql} ORDER BY next_attempt_at, rowid LIMIT ?`,
      [now, ...a.params, limit],
    );
    return rows.map(toPhoto);
  }

  /** The earliest time (ms) an announced photo is due, or null when none waits. */
  async nextPhotoDue(scope?: AuthorScope): Promise<number | null> {
    const a = byAuthor(scope);
    const r = await this.db.first<{ t: number | null }>(
      `SELECT MIN(next_attempt_at) AS t FROM photos WHERE upload_state = 'announced'${a.sql}`,
      a.params,
    );
    return r?.t === null || r?.t === undefined ? null : Number(r.t);
  }

  async markPhotoStored(id: string): Promise<void> {
    await this.db.run(
      `UPDATE photos SET upload_state = 'stored', last_error = NULL, attempts = attempts + 1 WHERE id = ?`,
      [id],
    );
  }

  async markPhotoFailed(id: string, error: string, nextAttemptAt: number): Promise<void> {
    await this.db.run(`UPDATE photos SET attempts = attempts + 1, last_error = ?, next_attempt_at = ? WHERE id = ?`, [
      error,
      nextAttemptAt,
      id,
    ]);
  }

  async markPhotoRefused(id: string, error: string): Promise<void> {
    await this.db.run(
      `UPDATE photos SET upload_state = 'refused', attempts = attempts + 1, last_error = ? WHERE id = ?`,
      [error, id],
    );
  }
}

interface ReadingRow {
  seq: number;
  id: string;
  round_id: string;
  instrument_id: string;
  tag: string;
  value_typed: number | null;
  unit: string;
  reference: string | null;
  device_time: string;
  note: string | null;
  skip_reason: string | null;
  supersedes: string | null;
  flags_json: string;
  confirmed_after_flag: number;
  superseded_by: string | null;
}

const READING_SELECT = `SELECT r.seq, r.id, r.round_id, r.instrument_id, r.tag, r.value_typed, r.unit, r.reference, r.device_time,
  r.note, r.skip_reason, r.supersedes, r.flags_json, r.confirmed_after_flag,
  (SELECT s2.id FROM readings s2 WHERE s2.supersedes = r.id ORDER BY s2.seq DESC LIMIT 1) AS superseded_by
  FROM readings r`;
const CURRENT = 'NOT EXISTS (SELECT 1 FROM readings s WHERE s.supersedes = r.id)';

interface PhotoRow {
  id: string;
  round_id: string;
  reading_id: string | null;
  check_id: string | null;
  mime: string;
  sha256: string;
  byte_size: number;
  device_time: string;
  upload_state: string;
  attempts: number;
  next_attempt_at: number;
  last_error: string | null;
}

const PHOTO_COLUMNS =
  'id, round_id, reading_id, check_id, mime, sha256, byte_size, device_time, upload_state, attempts, next_attempt_at, last_error';

function toPhoto(r: PhotoRow): LocalPhoto {
  return {
    id: r.id,
    roundId: r.round_id,
    readingId: r.reading_id,
    checkId: r.check_id,
    mime: r.mime,
    sha256: r.sha256,
    byteSize: Number(r.byte_size),
    deviceTime: r.device_time,
    uploadState: r.upload_state as PhotoUploadState,
    attempts: Number(r.attempts),
    nextAttemptAt: Number(r.next_attempt_at),
    lastError: r.last_error,
  };
}

function toBytes(v: unknown): Uint8Array {
  if (v instanceof Uint8Array) return v;
  if (v instanceof ArrayBuffer) return new Uint8Array(v);
  if (Array.isArray(v)) return Uint8Array.from(v as number[]);
  throw new Error('photo data is not a BLOB');
}

/** Opens the store over a database: runs the migrations, then hands back the store. */
export async function openStore(db: LocalDb, opts: StoreOptions = {}): Promise<Store> {
  const report = await migrate(db);
  return new Store(db, report, opts.clock ?? systemClock);
}
