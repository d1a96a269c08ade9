/**
 * POST /api/sync/push on a real PostgreSQL: idempotent by client ids, refused whole on any
 * invalid item, readings stored as typed and in SI, payload versions, who may push.
 *
 * Barometric pressure of the Fernhallow demo site (112 m): ICAO Standard Atmosphere, ICAO Doc
 * 7488/3 (1993), troposphere: p = p0·(1 + β·H/T0)^(−g0/(β·R)) with p0 = 101 325 Pa, T0 = 288.15 K,
 * β = −0.0065 K/m, g0 = 9.806 65 m/s², R = 287.052 87 J/(kg·K), and geopotential H = r·z/(r + z),
 * r = 6 356 766 m. Written out here independently of shared/units.
 * Unit factors: NIST SP 811 (2008) App. B.8 — bar = 1e5 Pa, kPa = 1e3 Pa, mbar = 100 Pa,
 * T/K = t/°C + 273.15.
 */
import { randomUUID } from 'node:crypto';
import type { Express } from 'express';
import request from 'supertest';
import { PushResponse, type PushRequestV2 } from '../../shared/api/sync';
import { createApp } from '../../server/app';
import { InstrumentEntity, RouteEntity, SiteEntity } from '../../server/entities';
import { demoUser } from '../../server/seed/demo-users';
import { addMember, bearer, signIn, testApp, testConfig } from './helpers/app';
import { createTestDatabase, type TestDb } from './helpers/db';

function icaoPressure(zMetres: number): number {
  const r = 6356766;
  const H = (r * zMetres) / (r + zMetres);
  const beta = -0.0065;
  return 101325 * Math.pow(1 + (beta * H) / 288.15, -9.80665 / (beta * 287.05287));
}

let db: TestDb;
let app: Express;
/** The same database, with the analysis hook recorded. */
let hookedApp: Express;
const hookCalls: string[][] = [];
const tokens: Record<string, string> = {};
const userIds: Record<string, string> = {};
const version: Record<string, string> = {};
const inst: Record<string, string> = {};
const brackInst: Record<string, string> = {};

beforeAll(async () => {
  db = await createTestDatabase();
  app = testApp(db.dataSource, db.url);
  hookedApp = createApp({
    config: testConfig(db.url),
    dataSource: db.dataSource,
    syncHooks: { onRoundsPushed: (ids) => void hookCalls.push(ids) },
  });
  for (const [key, role, site] of [
    ['tech', 'technician', 'fernhallow'],
    ['planner', 'planner', 'fernhallow'],
    ['engineer', 'engineer', 'fernhallow'],
    ['admin', 'admin', 'fernhallow'],
    ['brackPlanner', 'planner', 'brackenmoor'],
  ] as const) {
    tokens[key] = (await signIn(app, demoUser(role, site).email)).accessToken;
  }
  // invented people of this file: a second Fernhallow technician, and an admin of Brackenmoor (a push role there)
  userIds.tech = (await signIn(app, demoUser('technician').email)).user.id;
  userIds.admin = (await signIn(app, demoUser('admin').email)).user.id;
  userIds.tech2 = await addMember(
    db.dataSource,
    'fernhallow',
    'ash.renner@fernhallow.example',
    'Ash Renner',
    'technician',
  );
  tokens.tech2 = (await signIn(app, 'ash.renner@fernhallow.example')).accessToken;
  await addMember(db.dataSource, 'brackenmoor', 'admin@brackenmoor.example', 'Lee Harrow', 'admin');
  tokens.brackAdmin = (await signIn(app, 'admin@brackenmoor.example')).accessToken;
  const routes = await db.dataSource.getRepository(RouteEntity).find();
  for (const r of routes) version[r.key] = r.currentVersionId!;
  const fern = await db.dataSource.getRepository(SiteEntity).findOneByOrFail({ slug: 'fernhallow' });
  const all = await db.dataSource.getRepository(InstrumentEntity).find({ relations: { unit: true } });
  for (const i of all) (i.unit!.siteId === fern.id ? inst : brackInst)[i.tag] = i.id;
});
afterAll(() => db?.drop());

const now = () => new Date().toISOString();

interface Reading {
  tag: string;
  value: number | null;
  unit: string;
  reference?: 'absolute' | 'gauge' | 'vacuum';
  skipReason?: string;
}

function batch(
  routeKey: string,
  readings: Reading[],
  extra: Partial<PushRequestV2> = {},
  roundId: string = randomUUID(),
): PushRequestV2 & { roundId: string } {
  return {
    roundId,
    payloadVersion: 2,
    deviceId: 'test-phone-1',
    sentAt: now(),
    rounds: [
      {
        id: roundId,
        routeVersionId: version[routeKey],
        startedAt: now(),
        finishedAt: null,
        status: 'in-progress',
        dismissals: [],
      },
    ],
    readings: readings.map((r) => ({
      id: randomUUID(),
      roundId,
      instrumentId: (routeKey.startsWith('brackenmoor') ? brackInst : inst)[r.tag],
      valueTyped: r.value,
      unit: r.unit,
      reference: r.reference ?? null,
      deviceTime: now(),
      note: null,
      skipReason: r.skipReason ?? null,
      supersedes: null,
      confirmedAfterFlag: false,
      flags: [],
    })),
    checkAnswers: [],
    photos: [],
    ...extra,
  };
}

const push = (body: unknown, token = tokens.tech, on: Express = app) =>
  request(on)
    .post('/api/sync/push')
    .set(bearer(token))
    .send(body as object);

async function counts(roundId: string) {
  const [row] = (await db.dataSource.query(
    `SELECT (SELECT count(*) FROM rounds WHERE id = $1)::int AS rounds,
            (SELECT count(*) FROM readings WHERE round_id = $1)::int AS readings,
            (SELECT count(*) FROM check_answers WHERE round_id = $1)::int AS "checkAnswers",
            (SELECT count(*) FROM photos WHERE round_id = $1)::int AS photos`,
    [roundId],
  )) as { rounds: number; readings: number; checkAnswers: number; photos: number }[];
  return row;
}

test('the same push sent 3 times stores each round, reading, answer and photo once', async () => {
  const b = batch('boiler-house', [
    { tag: 'PI-101', value: 67, unit: 'bar', reference: 'gauge' },
    { tag: 'TI-101', value: 284, unit: '°C' },
    { tag: 'LI-101', value: 52, unit: '%' },
    { tag: 'FI-101', value: null, unit: 't/h', skipReason: 'meter face fogged' },
  ]);
  b.checkAnswers = [
    {
      id: randomUUID(),
      roundId: b.roundId,
      checkId: 'drum-glass-clear',
      answer: { kind: 'yes-no', value: true },
      note: null,
      deviceTime: now(),
    },
  ];
  const photoId = randomUUID();
  b.photos = [
    {
      id: photoId,
      roundId: b.roundId,
      readingId: b.readings[0].id,
      sha256: 'a'.repeat(64),
      mime: 'image/jpeg',
      bytes: 1234,
    },
  ];

  const first = await push(b);
  expect(first.status).toBe(200);
  expect(PushResponse.parse(first.body)).toMatchObject({
    applied: { rounds: 1, readings: 4, checkAnswers: 1, photos: 1 },
    duplicates: { rounds: 0, readings: 0, checkAnswers: 0, photos: 0 },
    photosWanted: [photoId],
  });
  for (let i = 0; i < 2; i++) {
    const again = await push(b);
    expect(again.status).toBe(200);
    expect(again.body).toMatchObject({
      applied: { rounds: 0, readings: 0, checkAnswers: 0, photos: 0 },
      duplicates: { rounds: 1, readings: 4, checkAnswers: 1, photos: 1 },
      photosWanted: [photoId],
    });
  }
  expect(await counts(b.roundId)).toEqual({ rounds: 1, readings: 4, checkAnswers: 1, photos: 1 });
});

test('a replay that changes an existing reading is ignored and counted as a duplicate', async () => {
  const b = batch('boiler-house', [{ tag: 'PI-101', value: 66.5, unit: 'bar', reference: 'gauge' }]);
  expect((await push(b)).status).toBe(200);
  const changed = { ...b, readings: [{ ...b.readings[0], valueTyped: 12 }] };
  const res = await push(changed);
  expect(res.status).toBe(200);
  expect(res.body.duplicates.readings).toBe(1);
  const [row] = await db.dataSource.query(`SELECT value_typed FROM readings WHERE id = $1`, [b.readings[0].id]);
  expect(Number(row.value_typed)).toBe(66.5);
});

test('a push with one invalid reading is refused whole: 400 naming readings.2.unit, nothing stored', async () => {
  const b = batch('boiler-house', [
    { tag: 'PI-101', value: 67, unit: 'bar', reference: 'gauge' },
    { tag: 'TI-101', value: 284, unit: '°C' },
    { tag: 'PI-103', value: 75, unit: '°C' },
  ]);
  const res = await push(b);
  expect(res.status).toBe(400);
  expect(res.body.error.code).toBe('validation');
  expect(res.body.error.details).toEqual([
    {
      path: 'readings.2.unit',
      message: expect.stringContaining('PI-103: "°C" is a temperature unit, not a pressure unit'),
    },
  ]);
  expect(res.body.error.message).toContain('readings.2.unit');
  expect(await counts(b.roundId)).toEqual({ rounds: 0, readings: 0, checkAnswers: 0, photos: 0 });
});

test('shape errors are field-level too (readings.1.valueTyped, rounds.0.startedAt), nothing stored', async () => {
  const b = batch('boiler-house', [
    { tag: 'PI-101', value: 67, unit: 'bar', reference: 'gauge' },
    { tag: 'TI-101', value: 284, unit: '°C' },
  ]) as unknown as { roundId: string; readings: Record<string, unknown>[]; rounds: Record<string, unknown>[] };
  b.readings[1].valueTyped = 'two hundred';
  b.rounds[0].startedAt = 'yesterday';
  const res = await push(b);
  expect(res.status).toBe(400);
  const paths = (res.body.error.details as { path: string }[]).map((d) => d.path).sort();
  expect(paths).toEqual(['readings.1.valueTyped', 'rounds.0.startedAt']);
  expect(await counts(b.roundId)).toEqual({ rounds: 0, readings: 0, checkAnswers: 0, photos: 0 });
});

test('a bar(g) reading is stored as typed and in SI: 67 bar(g) → 67×1e5 Pa + p_baro of the ICAO atmosphere at 112 m', async () => {
  const pBaro = icaoPressure(112);
  expect(pBaro).toBeCloseTo(99986.8, 0); // ICAO Doc 7488 formula, worked by hand to 0.1 Pa
  const b = batch('condenser-cooling-water', [
    { tag: 'PI-401', value: 91, unit: 'kPa', reference: 'vacuum' },
    { tag: 'TI-401', value: 43.8, unit: '°C' },
  ]);
  const boiler = batch('boiler-house', [{ tag: 'PI-101', value: 67, unit: 'bar', reference: 'gauge' }]);
  expect((await push(b)).status).toBe(200);
  expect((await push(boiler)).status).toBe(200);
  const rows = (await db.dataSource.query(
    `SELECT i.tag, r.value_typed, r.unit, r.reference, r.value_si FROM readings r JOIN instruments i ON i.id = r.instrument_id
      WHERE r.round_id = ANY($1::uuid[]) ORDER BY i.tag`,
    [[b.roundId, boiler.roundId]],
  )) as { tag: string; value_typed: string; unit: string; reference: string | null; value_si: number }[];
  const by = Object.fromEntries(rows.map((r) => [r.tag, r]));
  expect(by['PI-101']).toMatchObject({ value_typed: '67', unit: 'bar', reference: 'gauge' });
  expect(by['PI-101'].value_si).toBeCloseTo(67 * 1e5 + pBaro, 6);
  // vacuum: absolute = barometric − vacuum
  expect(by['PI-401']).toMatchObject({ value_typed: '91', unit: 'kPa', reference: 'vacuum' });
  expect(by['PI-401'].value_si).toBeCloseTo(pBaro - 91e3, 6);
  expect(by['TI-401'].reference).toBeNull();
  expect(by['TI-401'].value_si).toBeCloseTo(43.8 + 273.15, 9);
});

test('with a barometer reading on the round, gauge readings refer to it (1013.2 mbar → 101 320 Pa)', async () => {
  const b = batch('boiler-house', [
    { tag: 'PI-001', value: 1013.2, unit: 'mbar', reference: 'absolute' },
    { tag: 'PI-302', value: 3.5, unit: 'bar', reference: 'gauge' },
  ]);
  expect((await push(b)).status).toBe(200);
  // a later push of the same round still finds the stored barometer reading
  const later = batch('boiler-house', [{ tag: 'PI-103', value: 75, unit: 'bar', reference: 'gauge' }], {}, b.roundId);
  expect((await push(later)).status).toBe(200);
  const rows = (await db.dataSource.query(
    `SELECT i.tag, r.value_si FROM readings r JOIN instruments i ON i.id = r.instrument_id WHERE r.round_id = $1 ORDER BY i.tag`,
    [b.roundId],
  )) as { tag: string; value_si: number }[];
  expect(rows.map((r) => r.tag)).toEqual(['PI-001', 'PI-103', 'PI-302']);
  expect(rows[0].value_si).toBeCloseTo(101320, 6);
  expect(rows[1].value_si).toBeCloseTo(75e5 + 101320, 6);
  expect(rows[2].value_si).toBeCloseTo(3.5e5 + 101320, 6);
});

test('an implausible barometer reading (1013 kPa, meant as 1013 hPa) is refused on its value', async () => {
  const b = batch('boiler-house', [{ tag: 'PI-001', value: 1013, unit: 'kPa', reference: 'absolute' }]);
  const res = await push(b);
  expect(res.status).toBe(400);
  expect(res.body.error.details[0]).toMatchObject({
    path: 'readings.0.valueTyped',
    message: expect.stringContaining('barometric pressure'),
  });
});

test('pressure references: a gauge without one, or a temperature with one, is refused on reference', async () => {
  const res = await push(
    batch('boiler-house', [
      { tag: 'PI-101', value: 67, unit: 'bar' },
      { tag: 'TI-101', value: 284, unit: '°C', reference: 'gauge' },
    ]),
  );
  expect(res.status).toBe(400);
  expect((res.body.error.details as { path: string }[]).map((d) => d.path)).toEqual([
    'readings.0.reference',
    'readings.1.reference',
  ]);
});

test('payloadVersion 1 (the previous) and 2 (current) are accepted; 3 is refused naming payloadVersion', async () => {
  const v2 = batch('turbine-hall', [{ tag: 'JI-601', value: 21.9, unit: 'MW' }]);
  v2.readings[0].flags = [{ code: 'twin', message: 'differs from JI-602 by 0.4 MW' }];
  v2.readings[0].confirmedAfterFlag = true;
  v2.rounds[0].dismissals = [
    { readingId: v2.readings[0].id, flag: 'twin', note: 'panel meter known to read high', deviceTime: now() },
  ];
  expect((await push(v2)).status).toBe(200);

  const v1 = batch('turbine-hall', [{ tag: 'JI-602', value: 21.87, unit: 'MW' }]) as unknown as Record<
    string,
    unknown
  > & {
    roundId: string;
    rounds: Record<string, unknown>[];
    readings: Record<string, unknown>[];
  };
  v1.payloadVersion = 1;
  delete v1.rounds[0].dismissals;
  delete v1.readings[0].flags;
  delete v1.readings[0].confirmedAfterFlag;
  const res1 = await push(v1);
  expect(res1.status).toBe(200);
  expect(res1.body.applied).toMatchObject({ rounds: 1, readings: 1 });

  const rows = (await db.dataSource.query(
    `SELECT r.flags, r.confirmed_after_flag, o.dismissals FROM readings r JOIN rounds o ON o.id = r.round_id WHERE r.round_id = ANY($1::uuid[]) ORDER BY o.id = $2 DESC`,
    [[v2.roundId, v1.roundId], v2.roundId],
  )) as { flags: unknown[]; confirmed_after_flag: boolean; dismissals: unknown[] }[];
  expect(rows[0]).toMatchObject({
    flags: [{ code: 'twin' }],
    confirmed_after_flag: true,
    dismissals: [{ flag: 'twin' }],
  });
  expect(rows[1]).toEqual({ flags: [], confirmed_after_flag: false, dismissals: [] });

  const v3 = { ...batch('turbine-hall', [{ tag: 'JI-601', value: 21.9, unit: 'MW' }]), payloadVersion: 3 };
  const res3 = await push(v3);
  expect(res3.status).toBe(400);
  expect(res3.body.error.details).toEqual([
    { path: 'payloadVersion', message: 'payloadVersion must be 1 or 2 (the current 2 or the previous 1), got 3' },
  ]);
  expect(await counts(v3.roundId)).toEqual({ rounds: 0, readings: 0, checkAnswers: 0, photos: 0 });
});

test("a push on another site's route answers byte for byte what an unknown route version answers; nothing stored", async () => {
  const b = batch('brackenmoor-boiler-house', [{ tag: 'PI-101', value: 9.5, unit: 'bar', reference: 'gauge' }]);
  const res = await push(b);
  const unknown = batch(
    'brackenmoor-boiler-house',
    [{ tag: 'PI-101', value: 9.5, unit: 'bar', reference: 'gauge' }],
    {},
    b.roundId,
  );
  unknown.rounds[0].routeVersionId = randomUUID();
  const res2 = await push(unknown);
  expect(res.status).toBe(400);
  expect(res.body.error.details[0]).toEqual({
    path: 'rounds.0.routeVersionId',
    message: 'this route version does not exist (pull again for the current routes)',
  });
  expect({ status: res.status, body: res.text }).toEqual({ status: res2.status, body: res2.text });
  expect(await counts(b.roundId)).toEqual({ rounds: 0, readings: 0, checkAnswers: 0, photos: 0 });
  // mixed with a good round of the caller's own site: the whole batch is refused
  const own = batch('boiler-house', [{ tag: 'PI-101', value: 67, unit: 'bar', reference: 'gauge' }]);
  const mixed = { ...own, rounds: [...own.rounds, ...b.rounds], readings: [...own.readings, ...b.readings] };
  expect((await push(mixed)).status).toBe(400);
  expect(await counts(own.roundId)).toEqual({ rounds: 0, readings: 0, checkAnswers: 0, photos: 0 });
});

test('a planner pushing → 403 (their own site, and a planner of another site)', async () => {
  const b = batch('boiler-house', [{ tag: 'PI-101', value: 67, unit: 'bar', reference: 'gauge' }]);
  for (const t of [tokens.planner, tokens.brackPlanner]) {
    const res = await push(b, t);
    expect(res.status).toBe(403);
    expect(res.body.error.message).toMatch(/technician, engineer, admin/);
  }
  expect(await counts(b.roundId)).toEqual({ rounds: 0, readings: 0, checkAnswers: 0, photos: 0 });
  expect((await request(app).post('/api/sync/push').send(b)).status).toBe(401);
});

test("an engineer may push rounds, but not add readings to the technician's round; an admin may", async () => {
  const mine = batch('turbine-hall', [{ tag: 'PI-102', value: 63, unit: 'bar', reference: 'gauge' }]);
  expect((await push(mine, tokens.engineer)).status).toBe(200);
  const techRound = batch('turbine-hall', [{ tag: 'PI-201', value: 12, unit: 'bar', reference: 'gauge' }]);
  expect((await push(techRound)).status).toBe(200);
  const intoIt = batch(
    'turbine-hall',
    [{ tag: 'PI-202', value: 12, unit: 'bar', reference: 'gauge' }],
    {},
    techRound.roundId,
  );
  intoIt.rounds = [];
  expect((await push(intoIt, tokens.engineer)).status).toBe(403);
  expect((await push(intoIt, tokens.admin)).status).toBe(200);
  expect((await counts(techRound.roundId)).readings).toBe(2);
});

test('a reading for a round neither pushed nor stored, or an instrument of another unit, is named', async () => {
  const b = batch('boiler-house', [{ tag: 'PI-101', value: 67, unit: 'bar', reference: 'gauge' }]);
  b.readings[0].roundId = randomUUID();
  b.readings.push({ ...b.readings[0], id: randomUUID(), roundId: b.roundId, instrumentId: brackInst['PI-101'] });
  const res = await push(b);
  expect(res.status).toBe(400);
  expect((res.body.error.details as { path: string }[]).map((d) => d.path)).toEqual([
    'readings.0.roundId',
    'readings.1.instrumentId',
  ]);
});

test('check answers are checked against the round’s template: unknown check, wrong kind, not an option', async () => {
  const b = batch('boiler-house', []);
  const a = (checkId: string, answer: PushRequestV2['checkAnswers'][number]['answer']) => ({
    id: randomUUID(),
    roundId: b.roundId,
    checkId,
    answer,
    note: null,
    deviceTime: now(),
  });
  b.checkAnswers = [
    a('no-such-check', { kind: 'yes-no', value: true }),
    a('drum-glass-clear', { kind: 'text', value: 'looks fine' }),
    a('bfp-noise', { kind: 'choice', value: 'squeaky' }),
    a('bfp-noise', { kind: 'choice', value: 'normal' }),
  ];
  const res = await push(b);
  expect(res.status).toBe(400);
  expect((res.body.error.details as { path: string }[]).map((d) => d.path)).toEqual([
    'checkAnswers.0.checkId',
    'checkAnswers.1.answer.kind',
    'checkAnswers.2.answer.value',
  ]);
  b.checkAnswers = [b.checkAnswers[3]];
  expect((await push(b)).body.applied.checkAnswers).toBe(1);
});

test('a correction supersedes the old reading; both stay (append-only), and the database refuses an UPDATE', async () => {
  const b = batch('boiler-house', [{ tag: 'TI-103', value: 194.9, unit: '°C' }]);
  expect((await push(b)).status).toBe(200);
  const fix = batch('boiler-house', [{ tag: 'TI-103', value: 149.4, unit: '°C' }], {}, b.roundId);
  fix.readings[0].supersedes = b.readings[0].id;
  expect((await push(fix)).body.applied.readings).toBe(1);
  const wrong = batch('boiler-house', [{ tag: 'TI-101', value: 284, unit: '°C' }], {}, b.roundId);
  wrong.readings[0].supersedes = b.readings[0].id;
  expect((await push(wrong)).body.error.details[0].path).toBe('readings.0.supersedes');
  expect((await counts(b.roundId)).readings).toBe(2);
  await expect(
    db.dataSource.query(`UPDATE readings SET value_typed = 1 WHERE id = $1`, [b.readings[0].id]),
  ).rejects.toThrow(/append-only/);
});

test('clock skew is recorded (server receive time − sentAt), and a later push finishes the round', async () => {
  const b = batch('condenser-cooling-water', [{ tag: 'TI-402', value: 24, unit: '°C' }]);
  b.sentAt = new Date(Date.now() - 90_000).toISOString(); // the phone's clock is 90 s behind
  expect((await push(b)).status).toBe(200);
  const [r] = await db.dataSource.query(
    `SELECT client_clock_skew_ms, status, route_version_id FROM rounds WHERE id = $1`,
    [b.roundId],
  );
  expect(Number(r.client_clock_skew_ms)).toBeGreaterThanOrEqual(90_000);
  expect(Number(r.client_clock_skew_ms)).toBeLessThan(100_000);
  expect(r.status).toBe('in-progress');

  const done = { ...b, readings: [], sentAt: now() };
  done.rounds = [{ ...b.rounds[0], status: 'finished', finishedAt: now() }];
  const res = await push(done);
  expect(res.body.applied.rounds).toBe(1);
  const [after] = await db.dataSource.query(
    `SELECT status, finished_at_device, client_clock_skew_ms FROM rounds WHERE id = $1`,
    [b.roundId],
  );
  expect(after.status).toBe('finished');
  expect(after.finished_at_device).not.toBeNull();
  expect(Number(after.client_clock_skew_ms)).toBe(Number(r.client_clock_skew_ms)); // first receipt's skew is kept
  expect((await push(done)).body.duplicates.rounds).toBe(1);
});

test('onRoundsPushed gets the rounds with something new, after the commit; a replay does not call it', async () => {
  hookCalls.length = 0;
  const b = batch('boiler-house', [{ tag: 'LI-101', value: 50, unit: '%' }]);
  expect((await push(b, tokens.tech, hookedApp)).status).toBe(200);
  expect(hookCalls).toEqual([[b.roundId]]);
  expect((await push(b, tokens.tech, hookedApp)).status).toBe(200);
  expect(hookCalls).toHaveLength(1);
});

test('a failing onRoundsPushed hook is logged and the stored push still answers 200', async () => {
  const failing = createApp({
    config: testConfig(db.url),
    dataSource: db.dataSource,
    syncHooks: {
      onRoundsPushed: () => {
        throw new Error('queue down');
      },
    },
  });
  const b = batch('boiler-house', [{ tag: 'LI-101', value: 48, unit: '%' }]);
  const res = await push(b, tokens.tech, failing);
  expect(res.status).toBe(200);
  expect(await counts(b.roundId)).toMatchObject({ rounds: 1, readings: 1 });
});

test('more than 2000 items in one push is refused', async () => {
  const b = batch('boiler-house', []);
  const r = { ...batch('boiler-house', [{ tag: 'LI-101', value: 50, unit: '%' }], {}, b.roundId).readings[0] };
  b.readings = Array.from({ length: 2001 }, () => ({ ...r, id: randomUUID() }));
  const res = await push(b);
  expect(res.status).toBe(400);
  expect(res.body.error.details[0]).toEqual({
    path: 'readings',
    message: expect.stringContaining('At most 2000 items'),
  });
});

test('dismissals only grow: a later copy of a stored round adds its new dismissal, a replay adds nothing', async () => {
  const b = batch('boiler-house', [{ tag: 'TI-101', value: 299, unit: '°C' }]);
  expect((await push(b)).status).toBe(200);
  const d1 = { tag: 'TI-101', flag: 'suspect', note: 'gauge known faulty, work order open', deviceTime: now() };
  const again = { ...b, readings: [], rounds: [{ ...b.rounds[0], dismissals: [d1] }] };
  expect((await push(again)).status).toBe(200);
  expect((await push(again)).status).toBe(200);
  const d2 = { tag: 'PI-101', flag: 'saturation', note: 'drum gauge under calibration', deviceTime: now() };
  const finished = {
    ...again,
    rounds: [{ ...b.rounds[0], status: 'finished' as const, finishedAt: now(), dismissals: [d1, d2] }],
  };
  expect((await push(finished)).status).toBe(200);
  const [row] = (await db.dataSource.query(`SELECT status, dismissals FROM rounds WHERE id = $1`, [b.roundId])) as {
    status: string;
    dismissals: { tag: string; note: string }[];
  }[];
  expect(row.status).toBe('finished');
  expect(row.dismissals.map((d) => [d.tag, d.note])).toEqual([
    ['TI-101', 'gauge known faulty, work order open'],
    ['PI-101', 'drum gauge under calibration'],
  ]);
});

test('a batch with a thousand bad readings gets a short message (10 named, the count of the rest) and the first 200 details', async () => {
  const b = batch(
    'boiler-house',
    Array.from({ length: 1000 }, () => ({ tag: 'TI-101', value: 284, unit: '°C' })),
  );
  for (const r of b.readings) delete (r as Partial<typeof r>).instrumentId;
  const res = await push(b);
  expect(res.status).toBe(400);
  expect(res.body.error.message).toMatch(
    /^Invalid request body: readings\.0\.instrumentId: Required; .*readings\.9\.instrumentId: Required; and 990 more problems$/,
  );
  expect(res.body.error.details).toHaveLength(200);
  expect(await counts(b.roundId)).toEqual({ rounds: 0, readings: 0, checkAnswers: 0, photos: 0 });
});

test('the model version the device held is kept on the round', async () => {
  const b = batch('boiler-house', [{ tag: 'TI-101', value: 284, unit: '°C' }]);
  b.rounds[0] = { ...b.rounds[0], modelVersion: 'fnv1a64:0123456789abcdef' };
  expect((await push(b)).status).toBe(200);
  const [row] = (await db.dataSource.query(`SELECT device_model_version FROM rounds WHERE id = $1`, [b.roundId])) as {
    device_model_version: string;
  }[];
  expect(row.device_model_version).toBe('fnv1a64:0123456789abcdef');
});

// ---------------------------------------------------------------------------------------------
// Re-takes and every other field that points at a stored record (issue "tighter guards").

/** Every row of these rounds, and which readings are superseded: to show that a refused push changed nothing. */
async function snapshot(roundIds: string[]) {
  return db.dataSource.query(
    `SELECT x."id", x."round_id", x."supersedes", x."recorded_by",
            EXISTS (SELECT 1 FROM "readings" s WHERE s."supersedes" = x."id") AS "superseded"
       FROM "readings" x WHERE x."round_id" = ANY($1::uuid[]) ORDER BY x."id"`,
    [roundIds],
  ) as Promise<
    { id: string; round_id: string; supersedes: string | null; recorded_by: string | null; superseded: boolean }[]
  >;
}

describe("a re-take supersedes only a reading of the same round, pushed by that round's technician or a site admin", () => {
  let techRound: ReturnType<typeof batch>;
  beforeAll(async () => {
    techRound = batch('boiler-house', [{ tag: 'TI-103', value: 194.9, unit: '°C' }]);
    expect((await push(techRound)).status).toBe(200);
  });
  const retake = (roundId: string, supersedes: string) => {
    const b = batch('boiler-house', [{ tag: 'TI-103', value: 150.1, unit: '°C' }], {}, roundId);
    b.readings[0].supersedes = supersedes;
    return b;
  };

  test("an engineer's own round superseding the technician's reading → 400 on readings.0.supersedes; their round, their reading and the mark are not stored", async () => {
    const before = await snapshot([techRound.roundId]);
    const b = retake(randomUUID(), techRound.readings[0].id); // a new round of the engineer's, in the same push
    const res = await push(b, tokens.engineer);
    expect(res.status).toBe(400);
    expect(res.body.error.details).toEqual([
      {
        path: 'readings.0.supersedes',
        message: 'the reading it supersedes is of another round: a re-take replaces a reading of its own round only',
      },
    ]);
    expect(await counts(b.roundId)).toEqual({ rounds: 0, readings: 0, checkAnswers: 0, photos: 0 });
    expect(await snapshot([techRound.roundId])).toEqual(before);
    expect(before.every((r) => !r.superseded)).toBe(true);
  });

  test('another technician of the site, from a round of their own → the same 400, nothing stored', async () => {
    const b = retake(randomUUID(), techRound.readings[0].id);
    const res = await push(b, tokens.tech2);
    expect(res.status).toBe(400);
    expect(res.body.error.details[0].path).toBe('readings.0.supersedes');
    expect(await counts(b.roundId)).toEqual({ rounds: 0, readings: 0, checkAnswers: 0, photos: 0 });
  });

  test('the same technician, from another round of theirs → 400 (a re-take belongs to its round), nothing stored', async () => {
    const b = retake(randomUUID(), techRound.readings[0].id);
    expect((await push(b)).status).toBe(400);
    expect(await counts(b.roundId)).toEqual({ rounds: 0, readings: 0, checkAnswers: 0, photos: 0 });
  });

  test("another technician writing into the technician's round itself → 403, nothing stored", async () => {
    const b = retake(techRound.roundId, techRound.readings[0].id);
    b.rounds = [];
    const res = await push(b, tokens.tech2);
    expect(res.status).toBe(403);
    expect(res.body.error.message).toBe(
      `Round ${techRound.roundId} cannot take this push: only the technician who recorded it, or an admin of its site, adds to it`,
    );
    expect((await snapshot([techRound.roundId])).length).toBe(1);
  });

  test("the round's technician re-takes in the round → 200, kept as theirs; a site admin's re-take is recorded as the admin's", async () => {
    const own = retake(techRound.roundId, techRound.readings[0].id);
    own.rounds = [];
    expect((await push(own)).body.applied.readings).toBe(1);
    const byAdmin = retake(techRound.roundId, own.readings[0].id);
    byAdmin.rounds = [];
    expect((await push(byAdmin, tokens.admin)).body.applied.readings).toBe(1);
    const rows = await snapshot([techRound.roundId]);
    const by = Object.fromEntries(rows.map((r) => [r.id, r]));
    expect(by[own.readings[0].id]).toMatchObject({
      supersedes: techRound.readings[0].id,
      recorded_by: userIds.tech,
      superseded: true,
    });
    expect(by[byAdmin.readings[0].id]).toMatchObject({
      supersedes: own.readings[0].id,
      recorded_by: userIds.admin,
      superseded: false,
    });
    expect(by[techRound.readings[0].id]).toMatchObject({ recorded_by: userIds.tech, superseded: true });
  });

  test('a re-take in one push with the round: the superseded reading of the same batch is accepted, of another round of the batch refused', async () => {
    const b = batch('boiler-house', [
      { tag: 'TI-103', value: 194.9, unit: '°C' },
      { tag: 'TI-103', value: 150.2, unit: '°C' },
    ]);
    b.readings[1].supersedes = b.readings[0].id;
    const other = batch('boiler-house', [{ tag: 'TI-103', value: 150.3, unit: '°C' }]);
    other.readings[0].supersedes = b.readings[0].id;
    const both = { ...b, rounds: [...b.rounds, ...other.rounds], readings: [...b.readings, ...other.readings] };
    const res = await push(both);
    expect(res.status).toBe(400);
    expect(res.body.error.details.map((d: { path: string }) => d.path)).toEqual(['readings.2.supersedes']);
    expect(await counts(b.roundId)).toEqual({ rounds: 0, readings: 0, checkAnswers: 0, photos: 0 });
    expect((await push(b)).body.applied.readings).toBe(2);
  });
});

describe("ids of another site answer exactly what unknown ids answer (Brackenmoor's admin pushing with Fernhallow ids)", () => {
  let fernRound: ReturnType<typeof batch>;
  beforeAll(async () => {
    fernRound = batch('boiler-house', [{ tag: 'PI-101', value: 67, unit: 'bar', reference: 'gauge' }]);
    expect((await push(fernRound)).status).toBe(200);
  });
  const brack = () =>
    batch('brackenmoor-boiler-house', [{ tag: 'PI-101', value: 9.5, unit: 'bar', reference: 'gauge' }]);
  /** Both pushes are refused; status and body must be equal byte for byte. */
  async function same(outside: object, unknown: object) {
    const a = await push(outside, tokens.brackAdmin);
    const b = await push(unknown, tokens.brackAdmin);
    expect(a.status).toBe(400);
    expect({ status: a.status, body: a.text }).toEqual({ status: b.status, body: b.text });
    return a.body.error.details as { path: string; message: string }[];
  }

  test('a reading for a Fernhallow round (not in the push) vs an unknown round', async () => {
    const [o, u] = [brack(), brack()];
    o.readings[0].roundId = fernRound.roundId;
    u.readings[0].roundId = randomUUID();
    expect(await same(o, u)).toEqual([
      {
        path: 'readings.0.roundId',
        message: 'this round is neither in this push nor stored; push the round with its readings',
      },
    ]);
  });

  test("a Fernhallow instrument on a Brackenmoor round vs an unknown instrument (the other site's tag is not named)", async () => {
    const [o, u] = [brack(), brack()];
    o.readings[0].instrumentId = inst['PI-101'];
    u.readings[0].instrumentId = randomUUID();
    expect(await same(o, u)).toEqual([{ path: 'readings.0.instrumentId', message: 'this instrument does not exist' }]);
  });

  test('supersedes naming a Fernhallow reading vs an unknown reading', async () => {
    const [o, u] = [brack(), brack()];
    o.readings[0].supersedes = fernRound.readings[0].id;
    u.readings[0].supersedes = randomUUID();
    expect(await same(o, u)).toEqual([
      { path: 'readings.0.supersedes', message: 'the reading it supersedes is neither in this push nor stored' },
    ]);
    expect((await snapshot([fernRound.roundId]))[0].superseded).toBe(false);
  });

  test('a photo of a Fernhallow reading vs of an unknown reading', async () => {
    const photo = (readingId: string, roundId: string) => ({
      id: randomUUID(),
      roundId,
      readingId,
      checkId: null,
      sha256: 'a'.repeat(64),
      mime: 'image/jpeg' as const,
      bytes: 10,
    });
    const [o, u] = [brack(), brack()];
    o.photos = [photo(fernRound.readings[0].id, o.roundId)];
    u.photos = [photo(randomUUID(), u.roundId)];
    expect(await same(o, u)).toEqual([
      { path: 'photos.0.readingId', message: 'this reading is neither in this push nor stored' },
    ]);
  });
});
