/**
 * GET /api/sync/pull: reference data changed since a cursor (a value of the global sync_seq).
 * Expected contents come from the demo data (demo/routes, demo/unit.ts); the
 * protocol rules (server-made strictly increasing version as the cursor; a pull applied twice
 * gives the same state) are the usual ones of offline sync protocols (common practice).
 */
import { randomUUID } from 'node:crypto';
import type { Express } from 'express';
import request from 'supertest';
import { PullResponse } from '../../shared/api/sync';
import { boilerHouseRoute, fernhallowRoutes } from '../../demo/routes';
import { demoUnit } from '../../demo/unit';
import { InstrumentEntity, RouteEntity, SiteEntity } from '../../server/entities';
import { demoUser } from '../../server/seed/demo-users';
import { publishRouteVersion } from '../../server/sync/route-versions';
import { bearer, signIn, testApp } from './helpers/app';
import { createTestDatabase, type TestDb } from './helpers/db';

let db: TestDb;
let app: Express;
let fern: string;
let brack: string;
let tech: string;

beforeAll(async () => {
  db = await createTestDatabase();
  app = testApp(db.dataSource, db.url);
  fern = (await db.dataSource.getRepository(SiteEntity).findOneByOrFail({ slug: 'fernhallow' })).id;
  brack = (await db.dataSource.getRepository(SiteEntity).findOneByOrFail({ slug: 'brackenmoor' })).id;
  tech = (await signIn(app, demoUser('technician').email)).accessToken;
});
afterAll(() => db?.drop());

const pull = async (cursor: number | string | undefined, siteId = fern, token = tech) => {
  const res = await request(app)
    .get('/api/sync/pull')
    .query(cursor === undefined ? { siteId } : { siteId, cursor })
    .set(bearer(token));
  return res;
};

/** A device store: rows by id, overwritten by each pull (what the offline store does). */
function apply(store: Map<string, unknown>, body: PullResponse) {
  for (const u of body.units) store.set(`unit:${u.id}`, u);
  for (const i of body.instruments) store.set(`instrument:${i.id}`, i);
  for (const r of body.routes) store.set(`route:${r.id}`, r);
}

test('cursor 0 gives the site’s unit, its 42 instruments and its three routes with their templates; nothing of Brackenmoor', async () => {
  const res = await pull(0);
  expect(res.status).toBe(200);
  const body = PullResponse.parse(res.body);
  expect(body.units.map((u) => u.name)).toEqual([demoUnit.name]);
  expect((body.units[0].model as { id: string }).id).toBe('fernhallow-u1');
  expect(body.units[0].modelVersion).toBe(demoUnit.version);
  expect(body.instruments).toHaveLength(demoUnit.instruments.length + 1);
  expect(body.instruments.filter((i) => i.isBarometer).map((i) => i.tag)).toEqual(['PI-001']);
  const pi101 = body.instruments.find((i) => i.tag === 'PI-101')!;
  expect(pi101).toMatchObject({
    quantity: 'pressure',
    reference: 'gauge',
    gaugeUnit: 'bar',
    pointRef: 'drum',
    status: 'ok',
    rowVersion: 1,
  });
  expect(pi101.calibrationDate).toMatch(/^\d{4}-\d{2}-\d{2}$/);
  expect(body.routes.map((r) => r.name).sort()).toEqual(fernhallowRoutes.map((r) => r.name).sort());
  const bh = body.routes.find((r) => r.name === 'Boiler house')!;
  expect(bh.version).toMatchObject({ number: 1, template: boilerHouseRoute });
  const max = Math.max(
    ...body.units.map((u) => u.syncVersion),
    ...body.instruments.map((i) => i.syncVersion),
    ...body.routes.map((r) => r.syncVersion),
  );
  expect(body.cursor).toBe(max);
  // an absent cursor is 0
  expect(PullResponse.parse((await pull(undefined)).body).instruments).toHaveLength(body.instruments.length);
});

test('a pull with the returned cursor gives nothing new, and the same cursor back', async () => {
  const first = PullResponse.parse((await pull(0)).body);
  const again = PullResponse.parse((await pull(first.cursor)).body);
  expect(again).toMatchObject({ cursor: first.cursor, units: [], instruments: [], routes: [] });
});

test('applying the same pull twice gives the same device state', async () => {
  const a = PullResponse.parse((await pull(0)).body);
  const b = PullResponse.parse((await pull(0)).body);
  const once = new Map<string, unknown>();
  apply(once, a);
  const twice = new Map<string, unknown>();
  apply(twice, a);
  apply(twice, b);
  expect(twice).toEqual(once);
  expect({ ...b, serverTime: '' }).toEqual({ ...a, serverTime: '' });
});

test('after a new route version is published the next pull returns that route (version 2) and only it; old rounds keep version 1', async () => {
  const start = PullResponse.parse((await pull(0)).body);
  const route = await db.dataSource.getRepository(RouteEntity).findOneByOrFail({ siteId: fern, key: 'boiler-house' });
  const v1 = route.currentVersionId!;

  const template = structuredClone(boilerHouseRoute);
  template.stops[3].caution = `${template.stops[3].caution} Two people on the platform when blowing down.`;
  template.stops[3].readings[2].band = { min: 40, max: 60 };
  const admin = (await db.dataSource.query(`SELECT id FROM users WHERE email = $1`, [demoUser('admin').email]))[0]
    .id as string;
  const v2 = await db.dataSource.transaction((em) => publishRouteVersion(em, route.id, template, admin));
  expect(v2.number).toBe(2);

  const next = PullResponse.parse((await pull(start.cursor)).body);
  expect(next.units).toEqual([]);
  expect(next.instruments).toEqual([]);
  expect(next.routes).toHaveLength(1);
  expect(next.routes[0]).toMatchObject({ id: route.id, version: { id: v2.id, number: 2, template } });
  expect(next.cursor).toBeGreaterThan(start.cursor);
  expect(PullResponse.parse((await pull(next.cursor)).body).routes).toEqual([]);

  // a round the phone started on version 1 is still accepted on it, and keeps it
  const roundId = randomUUID();
  const res = await request(app)
    .post('/api/sync/push')
    .set(bearer(tech))
    .send({
      payloadVersion: 2,
      deviceId: 'test-phone-2',
      sentAt: new Date().toISOString(),
      rounds: [
        { id: roundId, routeVersionId: v1, startedAt: new Date().toISOString(), status: 'in-progress', dismissals: [] },
      ],
      readings: [],
      checkAnswers: [],
      photos: [],
    });
  expect(res.status).toBe(200);
  expect(
    (await db.dataSource.query(`SELECT route_version_id FROM rounds WHERE id = $1`, [roundId]))[0].route_version_id,
  ).toBe(v1);
});

test('a template that does not fit the unit is not published (400 naming template.<path>)', async () => {
  const route = await db.dataSource.getRepository(RouteEntity).findOneByOrFail({ siteId: fern, key: 'turbine-hall' });
  const bad = structuredClone(boilerHouseRoute);
  bad.id = 'turbine-hall';
  bad.stops[1].readings[0].tag = 'PI-999';
  await expect(db.dataSource.transaction((em) => publishRouteVersion(em, route.id, bad, null))).rejects.toMatchObject({
    status: 400,
    details: [
      { path: 'template.stops.1.readings.0.tag', message: 'PI-999 is not an instrument of unit "fernhallow-u1"' },
    ],
  });
});

test('an instrument marked suspect comes down on the next pull with its new row version', async () => {
  const start = PullResponse.parse((await pull(0)).body);
  const repo = db.dataSource.getRepository(InstrumentEntity);
  const row = await repo.findOneOrFail({
    where: { tag: 'TI-102A', unit: { siteId: fern } },
    relations: { unit: true },
  });
  await repo.save({ ...row, status: 'suspect' });
  const next = PullResponse.parse((await pull(start.cursor)).body);
  expect(next.instruments.map((i) => [i.tag, i.status, i.rowVersion])).toEqual([['TI-102A', 'suspect', 2]]);
  expect(next.cursor).toBeGreaterThan(start.cursor);
});

test('Brackenmoor’s pull is its own; a site you are not a member of is 404; a bad cursor is 400', async () => {
  const planner = (await signIn(app, demoUser('planner', 'brackenmoor').email)).accessToken;
  const own = PullResponse.parse((await pull(0, brack, planner)).body);
  expect(own.routes.map((r) => r.name)).toEqual(['Boiler 1 round']);
  expect(own.instruments.map((i) => i.tag).sort()).toEqual(['FI-101', 'LI-101', 'PI-101', 'TI-101']);
  const foreign = await pull(0, fern, planner);
  expect(foreign.status).toBe(404);
  expect(foreign.body.error.code).toBe('not_found');
  const bad = await pull('-1');
  expect(bad.status).toBe(400);
  expect(bad.body.error.details).toEqual([
    { path: 'cursor', message: 'Must be a whole number ≥ 0 (the cursor of the last pull)' },
  ]);
  expect((await request(app).get('/api/sync/pull').query({ siteId: fern })).status).toBe(401);
});
