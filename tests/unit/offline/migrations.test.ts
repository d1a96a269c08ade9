/**
 * The device store's migrations: one test per migration, an upgrade of a version-1 store holding
 * data to the latest, and the refusals (a store newer than the app; a failed step).
 */
import { PushRequestV1, PushRequestV2 } from '@/shared/api/sync';
import { StoreVersionError } from '@/offline/errors';
import { LATEST_SCHEMA_VERSION, migrate, MIGRATIONS, schemaVersion, type Migration } from '@/offline/migrations';
import { openStore } from '@/offline/store';
import { client, counterIds, FakeServer, INSTRUMENTS, manualClock, pull, RV1, SITE } from './fixtures';
import { openSqlJsDb } from './sqljs-db';

const tables = async (db: { all<T>(sql: string): Promise<T[]> }) =>
  (
    await db.all<{ name: string }>(
      `SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name`,
    )
  ).map((t) => t.name);
const columns = async (db: { all<T>(sql: string): Promise<T[]> }, table: string) =>
  (await db.all<{ name: string }>(`PRAGMA table_info(${table})`)).map((c) => c.name);

test('the migrations are numbered 1…n and the latest is 3', () => {
  expect(MIGRATIONS.map((m) => m.version)).toEqual([1, 2, 3]);
  expect(LATEST_SCHEMA_VERSION).toBe(3);
});

describe('migration 1 (initial)', () => {
  test('creates the reference, round, photo and outbox tables and records schema_version 1', async () => {
    const db = await openSqlJsDb();
    const r = await migrate(db, MIGRATIONS, 1);
    expect(r).toEqual({ from: 0, to: 1, applied: ['1 initial'] });
    expect(await schemaVersion(db)).toBe(1);
    expect(await tables(db)).toEqual([
      'check_answers',
      'instruments',
      'meta',
      'outbox',
      'photos',
      'pull_cursors',
      'readings',
      'rounds',
      'route_versions',
      'routes',
      'units',
    ]);
    expect(await columns(db, 'readings')).not.toContain('flags_json');
    // The outbox refuses an unknown kind and state (CHECK constraints).
    await expect(
      db.run(`INSERT INTO outbox (kind, record_id, payload, created_at) VALUES ('note', 'x', '{}', 'now')`),
    ).rejects.toThrow(/CHECK constraint failed/);
  });
});

describe('migration 2 (flags-and-dismissals)', () => {
  test('adds reading flags, confirmed-after-flag and the dismissals table', async () => {
    const db = await openSqlJsDb();
    await migrate(db, MIGRATIONS, 1);
    const r = await migrate(db, MIGRATIONS, 2);
    expect(r).toEqual({ from: 1, to: 2, applied: ['2 flags-and-dismissals'] });
    expect(await columns(db, 'readings')).toEqual(expect.arrayContaining(['flags_json', 'confirmed_after_flag']));
    expect(await tables(db)).toContain('dismissals');
  });
});

describe('migration 3 (authors)', () => {
  test('adds the author to outbox rows, rounds and photos; rows from before have none', async () => {
    const db = await openSqlJsDb();
    await migrate(db, MIGRATIONS, 2);
    await db.run(
      `INSERT INTO outbox (kind, record_id, payload, created_at) VALUES ('round', 'r1', '{}', '2026-12-01T06:00:00Z')`,
    );
    expect(await migrate(db)).toEqual({ from: 2, to: 3, applied: ['3 authors'] });
    expect(await columns(db, 'outbox')).toEqual(expect.arrayContaining(['author_id', 'author_name']));
    expect(await columns(db, 'rounds')).toEqual(expect.arrayContaining(['author_id', 'author_name']));
    expect(await columns(db, 'photos')).toEqual(expect.arrayContaining(['author_id']));
    expect(await db.all('SELECT author_id, author_name FROM outbox')).toEqual([{ author_id: null, author_name: null }]);
  });
});

/** What the version-1 app wrote: a round, two readings (one a correction), their outbox rows (payload version 1). */
async function v1StoreWithData() {
  const db = await openSqlJsDb();
  await migrate(db, MIGRATIONS, 1);
  const p = pull();
  const rt = p.routes[0];
  const round = {
    id: '0b0f7c1e-1111-4a11-8a11-000000000001',
    routeVersionId: RV1,
    startedAt: '2025-11-29T07:00:00.000Z',
    finishedAt: null,
    status: 'in-progress' as const,
  };
  const r1 = {
    id: '0b0f7c1e-1111-4a11-8a11-000000000002',
    roundId: round.id,
    instrumentId: INSTRUMENTS['PI-101'],
    valueTyped: 1.02,
    unit: 'bar',
    reference: 'gauge' as const,
    deviceTime: '2025-11-29T07:05:00.000Z',
    note: null,
    skipReason: null,
    supersedes: null,
  };
  const r2 = {
    ...r1,
    id: '0b0f7c1e-1111-4a11-8a11-000000000003',
    valueTyped: 10.2,
    deviceTime: '2025-11-29T07:06:00.000Z',
    supersedes: r1.id,
  };
  await db.transaction(async (tx) => {
    await tx.run(
      `INSERT INTO routes (id, site_id, unit_id, current_version_id, sync_version, json) VALUES (?, ?, ?, ?, ?, ?)`,
      [rt.id, rt.siteId, rt.unitId, rt.version.id, 1, JSON.stringify(rt)],
    );
    await tx.run(`INSERT INTO route_versions (id, route_id, number, json) VALUES (?, ?, 1, ?)`, [
      rt.version.id,
      rt.id,
      JSON.stringify({ ...rt.version, routeId: rt.id }),
    ]);
    for (const i of p.instruments)
      await tx.run(`INSERT INTO instruments (id, unit_id, tag, sync_version, json) VALUES (?, ?, ?, 1, ?)`, [
        i.id,
        i.unitId,
        i.tag,
        JSON.stringify(i),
      ]);
    for (const u of p.units)
      await tx.run(`INSERT INTO units (id, site_id, sync_version, json) VALUES (?, ?, 1, ?)`, [
        u.id,
        u.siteId,
        JSON.stringify(u),
      ]);
    await tx.run(`INSERT INTO pull_cursors (site_id, cursor, pulled_at, server_time) VALUES (?, 3, ?, ?)`, [
      SITE,
      '2025-11-29T06:00:00.000Z',
      p.serverTime,
    ]);
    await tx.run(`INSERT INTO rounds (id, route_version_id, status, started_at) VALUES (?, ?, 'in-progress', ?)`, [
      round.id,
      RV1,
      round.startedAt,
    ]);
    for (const r of [r1, r2]) {
      await tx.run(
        `INSERT INTO readings (id, round_id, instrument_id, tag, value_typed, unit, reference, device_time, supersedes) VALUES (?, ?, ?, 'PI-101', ?, 'bar', 'gauge', ?, ?)`,
        [r.id, r.roundId, r.instrumentId, r.valueTyped, r.deviceTime, r.supersedes],
      );
    }
    await tx.run(`INSERT INTO outbox (kind, record_id, payload, created_at) VALUES ('round', ?, ?, ?)`, [
      round.id,
      JSON.stringify(round),
      round.startedAt,
    ]);
    for (const r of [r1, r2])
      await tx.run(`INSERT INTO outbox (kind, record_id, payload, created_at) VALUES ('reading', ?, ?, ?)`, [
        r.id,
        JSON.stringify(r),
        r.deviceTime,
      ]);
  });
  // The payloads really are version 1 (shared/api/sync.ts PushRequestV1) and not version 2.
  const batch = {
    payloadVersion: 1,
    deviceId: 'd',
    sentAt: '2025-11-29T08:00:00Z',
    rounds: [round],
    readings: [r1, r2],
    checkAnswers: [],
    photos: [],
  };
  expect(PushRequestV1.safeParse(batch).success).toBe(true);
  expect(PushRequestV2.safeParse({ ...batch, payloadVersion: 2 }).success).toBe(false);
  return { db, round, r1, r2 };
}

describe('upgrading a version-1 store that holds data', () => {
  test('to the latest: the data survives, waiting outbox rows become payload version 2, and they push', async () => {
    const { db, round, r1, r2 } = await v1StoreWithData();
    const clock = manualClock();
    const store = await openStore(db, { clock });
    expect(store.migration).toEqual({ from: 1, to: 3, applied: ['2 flags-and-dismissals', '3 authors'] });
    const readings = await store.roundReadings(round.id, { all: true });
    expect(readings.map((r) => [r.id, r.valueTyped, r.flags, r.confirmedAfterFlag, r.supersededBy])).toEqual([
      [r1.id, 1.02, [], false, r2.id],
      [r2.id, 10.2, [], false, null],
    ]);
    expect((await store.getRound(round.id))!.dismissals).toEqual([]);
    expect(store.badRows()).toEqual([]);
    const items = await store.waitingBatch(10);
    expect(items.map((i) => i.kind)).toEqual(['round', 'reading', 'reading']);
    expect(items[1].payload).toMatchObject({ id: r1.id, flags: [], confirmedAfterFlag: false });
    const server = new FakeServer();
    const h = { db, store, clock, ids: counterIds(), actions: null as never };
    const r = await client(h, server).syncNow();
    expect(r.ok).toBe(true);
    expect(server.pushes[0].payloadVersion).toBe(2);
    expect(PushRequestV2.safeParse(server.pushes[0]).success).toBe(true);
    expect(server.readings.size).toBe(2);
  });

  test('a store reopened after the upgrade is not migrated again', async () => {
    const { db } = await v1StoreWithData();
    await openStore(db);
    const again = await openStore(db);
    expect(again.migration).toEqual({ from: 3, to: 3, applied: [] });
  });

  test('the upgraded bytes, reopened as a file, read the same (sql.js export → new database)', async () => {
    const { db, round } = await v1StoreWithData();
    await openStore(db);
    const copy = await openSqlJsDb(db.raw.export());
    const store = await openStore(copy);
    expect((await store.roundReadings(round.id)).map((r) => r.valueTyped)).toEqual([10.2]);
  });
});

describe('refusals', () => {
  test('a store written by a newer app is left alone with StoreVersionError', async () => {
    const db = await openSqlJsDb();
    await migrate(db);
    await db.run(`UPDATE meta SET value = '7' WHERE key = 'schema_version'`);
    const err = await openStore(db).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(StoreVersionError);
    expect((err as Error).message).toBe(
      'The device store is at schema version 7, newer than this app understands (3). Reload to get the current app; nothing has been changed.',
    );
  });

  test('a migration that fails is rolled back whole and the version stays where it was', async () => {
    const db = await openSqlJsDb();
    await migrate(db, MIGRATIONS, 1);
    const broken: Migration = {
      version: 4,
      name: 'broken',
      async up(tx) {
        await tx.exec('CREATE TABLE half_done (x INTEGER)');
        throw new Error('step failed');
      },
    };
    await expect(migrate(db, [...MIGRATIONS, broken])).rejects.toThrow('step failed');
    // Migrations 2 and 3 ran in their own transactions and stay; 4 left nothing behind.
    expect(await schemaVersion(db)).toBe(3);
    expect(await tables(db)).not.toContain('half_done');
  });

  test('a gap in the numbering is refused', async () => {
    const db = await openSqlJsDb();
    await expect(migrate(db, [MIGRATIONS[1]])).rejects.toThrow(
      'migration "flags-and-dismissals" is number 2, expected 1',
    );
  });
});
