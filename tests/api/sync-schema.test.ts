/**
 * The sync tables: the hand-written migration matches the entities (TypeORM's own schema builder,
 * what `synchronize` would run, finds nothing to change), the sync_seq stamp, the append-only
 * rule, and down/up. PostgreSQL semantics relied on (BEFORE triggers, advisory locks, sequences):
 * PostgreSQL 15 documentation, chapters 39 (triggers), 9.27.10 (advisory locks), 9.17 (sequences).
 */
import { MIGRATIONS } from '../../server/migrations';
import { PlantUnitEntity } from '../../server/entities';
import { createTestDatabase, type TestDb } from './helpers/db';

let db: TestDb;
beforeAll(async () => {
  db = await createTestDatabase();
});
afterAll(() => db?.drop());

const SYNC_TABLES = [
  'check_answers',
  'instruments',
  'photos',
  'readings',
  'rounds',
  'route_versions',
  'routes',
  'units',
];

test('the sync tables exist and the schema builder finds no difference from the entities', async () => {
  const rows = (await db.dataSource.query(
    `SELECT table_name FROM information_schema.tables WHERE table_schema = 'public' AND table_name = ANY($1) ORDER BY 1`,
    [SYNC_TABLES],
  )) as { table_name: string }[];
  expect(rows.map((r) => r.table_name)).toEqual(SYNC_TABLES);
  const diff = await db.dataSource.driver.createSchemaBuilder().log();
  expect(diff.upQueries.map((q) => q.query)).toEqual([]);
  // the comparison sees a real difference (so the empty diff above means something)
  await db.dataSource.query(`DROP INDEX "ix_readings_instrument_time"`);
  const drift = await db.dataSource.driver.createSchemaBuilder().log();
  expect(drift.upQueries.map((q) => q.query).join('\n')).toMatch(
    /CREATE INDEX "ix_readings_instrument_time" ON "readings"\s+\("instrument_id", "device_time"\)/,
  );
  await db.dataSource.query(
    `CREATE INDEX "ix_readings_instrument_time" ON "readings" ("instrument_id", "device_time")`,
  );
});

test('every insert and update of a synced row takes a new, larger sync_version', async () => {
  const repo = db.dataSource.getRepository(PlantUnitEntity);
  const unit = await repo.findOneByOrFail({ name: 'Brackenmoor Boiler House — Boiler 1 (Brackenmoor Mills)' });
  await db.dataSource.query(`UPDATE units SET name = name WHERE id = $1`, [unit.id]);
  const after = await repo.findOneByOrFail({ id: unit.id });
  expect(after.syncVersion).toBeGreaterThan(unit.syncVersion);
  // an explicit value is overwritten: the stamp cannot be forged
  await db.dataSource.query(`UPDATE units SET sync_version = 1 WHERE id = $1`, [unit.id]);
  expect((await repo.findOneByOrFail({ id: unit.id })).syncVersion).toBeGreaterThan(after.syncVersion);
});

test('readings and check answers refuse UPDATE (append-only)', async () => {
  for (const t of ['readings', 'check_answers']) {
    const [{ tgname }] = await db.dataSource.query(
      `SELECT tgname FROM pg_trigger WHERE tgrelid = $1::regclass AND NOT tgisinternal`,
      [t],
    );
    expect(tgname).toBe(`tg_${t}_append_only`);
  }
});

test('down removes every sync table, type, function and the sequence; up brings them back', async () => {
  // Undo the later migrations first, then the sync one itself.
  const at = MIGRATIONS.findIndex((m) => /SyncAndRoutes/.test(m.name));
  expect(at).toBeGreaterThan(-1);
  for (let i = MIGRATIONS.length - 1; i >= at; i--) await db.dataSource.undoLastMigration();
  const left = await db.dataSource.query(
    `SELECT (SELECT count(*) FROM information_schema.tables WHERE table_schema = 'public' AND table_name = ANY($1))::int AS tables,
            (SELECT count(*) FROM pg_class WHERE relname = 'sync_seq')::int AS seq,
            (SELECT count(*) FROM pg_proc WHERE proname IN ('sync_stamp', 'refuse_update'))::int AS funcs,
            (SELECT count(*) FROM pg_type WHERE typname IN ('instrument_quantity', 'pressure_reference', 'instrument_status', 'round_status', 'photo_status'))::int AS types`,
    [SYNC_TABLES],
  );
  expect(left).toEqual([{ tables: 0, seq: 0, funcs: 0, types: 0 }]);
  await db.dataSource.runMigrations();
  expect(await db.dataSource.showMigrations()).toBe(false);
});
