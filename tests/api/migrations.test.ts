/**
 * Migrations: up and down run cleanly, and the hand-written SQL matches the entities exactly
 * (TypeORM's own schema builder, the thing `synchronize` would run, finds nothing to change).
 * The demo seed is idempotent.
 */
import { MIGRATIONS } from '../../server/migrations';
import { seedDemo } from '../../server/seed/demo';
import { demoSites, demoUsers } from '../../server/seed/demo-users';
import { MembershipEntity, SiteEntity, UserEntity } from '../../server/entities';
import { createTestDatabase, type TestDb } from './helpers/db';

let db: TestDb;
beforeAll(async () => {
  db = await createTestDatabase({ migrate: false });
});
afterAll(() => db?.drop());

const tables = async () =>
  (
    (await db.dataSource.query(
      `select table_name from information_schema.tables where table_schema = 'public' and table_name <> 'typeorm_migrations' order by 1`,
    )) as { table_name: string }[]
  ).map((r) => r.table_name);
const enumTypes = async () =>
  (
    (await db.dataSource.query(`select typname from pg_type where typtype = 'e' order by 1`)) as { typname: string }[]
  ).map((r) => r.typname);

test('migration class names end in a 13-digit timestamp, strictly increasing (TypeORM requires it)', () => {
  const stamps = MIGRATIONS.map((m) => {
    const match = /(\d{13})$/.exec(m.name);
    expect(match).not.toBeNull();
    return Number(match![1]);
  });
  expect([...stamps].sort((a, b) => a - b)).toEqual(stamps);
  expect(new Set(stamps).size).toBe(stamps.length);
});

/** Every table and enum type the migrations create, sorted (a new migration adds its own here). */
const ALL_TABLES = [
  'analyses',
  'analysis_instruments',
  'calibration_records',
  'check_answers',
  'findings',
  'instruments',
  'mail_messages',
  'mail_outbox',
  'memberships',
  'photos',
  'readings',
  'refresh_tokens',
  'rounds',
  'route_versions',
  'routes',
  'sites',
  'units',
  'users',
  'work_order_counters',
  'work_order_events',
  'work_order_findings',
  'work_orders',
];
const ALL_ENUMS = [
  'instrument_quantity',
  'instrument_status',
  'membership_role',
  'photo_status',
  'pressure_reference',
  'round_status',
  'work_order_kind',
  'work_order_status',
];

test('up, the schema matches the entities, down to nothing, and up again', async () => {
  expect(await db.dataSource.showMigrations()).toBe(true);
  const applied = await db.dataSource.runMigrations();
  expect(applied.map((m) => m.name)).toEqual(MIGRATIONS.map((m) => m.name));
  expect(await tables()).toEqual(ALL_TABLES);
  expect(await enumTypes()).toEqual(ALL_ENUMS);
  expect(await db.dataSource.showMigrations()).toBe(false);

  const diff = await db.dataSource.driver.createSchemaBuilder().log();
  expect(diff.upQueries.map((q) => q.query)).toEqual([]);

  // The comparison sees real differences (so the empty diff above means something).
  await db.dataSource.query(`alter table "sites" drop constraint "uq_sites_slug"`);
  const drift = await db.dataSource.driver.createSchemaBuilder().log();
  expect(drift.upQueries.map((q) => q.query).join('\n')).toMatch(
    /ALTER TABLE "sites" ADD CONSTRAINT "\w+" UNIQUE \("slug"\)/,
  );
  await db.dataSource.query(`alter table "sites" add constraint "uq_sites_slug" unique ("slug")`);

  for (let i = 0; i < MIGRATIONS.length; i++) await db.dataSource.undoLastMigration();
  expect(await tables()).toEqual([]);
  expect(await enumTypes()).toEqual([]);

  await db.dataSource.runMigrations();
  expect(await tables()).toEqual(ALL_TABLES);
});

test('the database keeps e-mails lower-case and unique', async () => {
  const users = db.dataSource.getRepository(UserEntity);
  await expect(
    users.save({ email: 'Upper@Example.test', name: 'X', passwordHash: 'x', disabled: false }),
  ).rejects.toThrow(/ck_users_email_lower/);
  await users.save({ email: 'one@example.test', name: 'X', passwordHash: 'x', disabled: false });
  await expect(
    users.insert({ email: 'one@example.test', name: 'Y', passwordHash: 'x', disabled: false }),
  ).rejects.toThrow(/uq_users_email/);
  await users.delete({ email: 'one@example.test' });
});

test('seedDemo loads the demo once; a second run does nothing', async () => {
  const first = await seedDemo(db.dataSource);
  expect(first).toEqual({ seeded: true, sites: demoSites.length, users: demoUsers.length });
  const second = await seedDemo(db.dataSource);
  expect(second.seeded).toBe(false);
  expect(await db.dataSource.getRepository(SiteEntity).count()).toBe(2);
  expect(await db.dataSource.getRepository(UserEntity).count()).toBe(5);
  const fern = await db.dataSource.getRepository(SiteEntity).findOneByOrFail({ slug: 'fernhallow' });
  expect(fern).toMatchObject({ name: 'Fernhallow Works', timezone: 'Europe/London', elevationM: 112 });
  // One membership per user and site.
  const planner = await db.dataSource
    .getRepository(UserEntity)
    .findOneByOrFail({ email: 'planner@fernhallow.example' });
  await expect(
    db.dataSource.getRepository(MembershipEntity).insert({ userId: planner.id, siteId: fern.id, role: 'admin' }),
  ).rejects.toThrow(/uq_memberships_user_site/);
  // Europe/London is a valid IANA zone name (the runtime's tz database knows it).
  expect(() => new Intl.DateTimeFormat('en-GB', { timeZone: fern.timezone })).not.toThrow();
});

test('two seeds racing load the demo once', async () => {
  for (let i = 0; i < MIGRATIONS.length; i++) await db.dataSource.undoLastMigration();
  await db.dataSource.runMigrations();
  const results = await Promise.all([seedDemo(db.dataSource), seedDemo(db.dataSource)]);
  expect(results.map((r) => r.seeded).sort()).toEqual([false, true]);
  expect(await db.dataSource.getRepository(UserEntity).count()).toBe(5);
});
