/**
 * Changing an instrument's configuration: PATCH /api/sites/:siteId/instruments/:instrumentId
 * (site admins). Status codes as RFC 9110 gives them: 200, 400 (§15.5.1), 403 (§15.5.4), 404
 * (§15.5.5), 409 Conflict (§15.5.10). Classes and grades as the standards list them: EN 837-1
 * accuracy classes 0.1, 0.25, 0.6, 1, 1.6, 2.5, 4 (% of span); IEC 60751 classes AA, A, B, C;
 * IEC 60584-1 classes 1, 2, 3. Absolute zero 0 K (SI brochure, 9th ed.). The deepest gauge
 * reading is a full vacuum at the ICAO standard atmosphere's pressure at −1000 m (ICAO Doc 7488).
 */
import type { Express } from 'express';
import request from 'supertest';
import { SiteEntity } from '../../server/entities';
import { InstrumentUpdateResponse } from '../../shared/api/instruments';
import { PullResponse } from '../../shared/api/sync';
import { barometricFromElevation } from '../../shared/units';
import { bearer, memoryLogger, signIn, testApp } from './helpers/app';
import { createTestDatabase, type TestDb } from './helpers/db';

let db: TestDb;
let app: Express;
let lines: string[];
let fernId: string;
let brackId: string;
const tok: Record<string, string> = {};
const inst: Record<
  string,
  {
    id: string;
    range: { min: number; max: number };
    accuracy: Record<string, unknown>;
    row_version: number;
    sync_version: string;
  }
> = {};
let brackInstrument: string;

beforeAll(async () => {
  db = await createTestDatabase();
  const mem = memoryLogger('info');
  lines = mem.lines;
  app = testApp(db.dataSource, db.url, {}, mem.logger);
  fernId = (await db.dataSource.getRepository(SiteEntity).findOneByOrFail({ slug: 'fernhallow' })).id;
  brackId = (await db.dataSource.getRepository(SiteEntity).findOneByOrFail({ slug: 'brackenmoor' })).id;
  for (const who of ['admin', 'engineer', 'planner'])
    tok[who] = (await signIn(app, `${who}@fernhallow.example`)).accessToken;
  tok.brackPlanner = (await signIn(app, 'planner@brackenmoor.example')).accessToken;
  const rows = (await db.dataSource.query(
    `SELECT i."tag", i."id", i."range", i."accuracy", i."row_version", i."sync_version" FROM "instruments" i JOIN "units" u ON u."id" = i."unit_id" WHERE u."site_id" = $1`,
    [fernId],
  )) as ({ tag: string } & (typeof inst)[string])[];
  for (const r of rows) inst[r.tag] = r;
  [{ id: brackInstrument }] = (await db.dataSource.query(
    `SELECT i."id" FROM "instruments" i JOIN "units" u ON u."id" = i."unit_id" WHERE u."site_id" = $1 LIMIT 1`,
    [brackId],
  )) as {
    id: string;
  }[];
});
afterAll(() => db?.drop());

const patch = (tag: string, body: object, who = 'admin', site = () => fernId) =>
  request(app)
    .patch(`/api/sites/${site()}/instruments/${inst[tag]?.id ?? tag}`)
    .set(bearer(tok[who]))
    .send(body);

test('an admin changes range, class, calibration interval and status; the span follows the range; the next pull carries it', async () => {
  const before = inst['PI-302'];
  expect(before.accuracy).toMatchObject({ kind: 'en837', class: 0.6 });
  const res = await patch('PI-302', {
    range: { min: 0, max: 16e5 },
    accuracyClass: '1.6',
    calibrationIntervalDays: 180,
    status: 'out-of-service',
    rowVersion: before.row_version,
  });
  expect(res.status).toBe(200);
  const body = InstrumentUpdateResponse.parse(res.body);
  expect(body.instrument).toMatchObject({
    tag: 'PI-302',
    range: { min: 0, max: 16e5 },
    calibrationIntervalDays: 180,
    status: 'out-of-service',
    rowVersion: before.row_version + 1,
  });
  // EN 837-1: the class is a % of the span, so the span goes with the new range (16 bar)
  expect(body.instrument.accuracy).toMatchObject({ kind: 'en837', class: 1.6, spanPa: 16e5 });
  expect(Object.keys(body.changes).sort()).toEqual(['accuracy', 'calibrationIntervalDays', 'range', 'status']);
  expect(body.changes.range).toEqual({ from: before.range, to: { min: 0, max: 16e5 } });
  // the phones see it: a pull from the row's old sync version carries the new row
  const pull = await request(app)
    .get(`/api/sync/pull?siteId=${fernId}&cursor=${Number(before.sync_version)}`)
    .set(bearer(tok.engineer));
  expect(pull.status).toBe(200);
  const p = PullResponse.parse(pull.body);
  expect(p.instruments.find((i) => i.tag === 'PI-302')).toMatchObject({
    status: 'out-of-service',
    calibrationIntervalDays: 180,
  });
  // an audit line names who changed what
  const audit = lines
    .map((l) => JSON.parse(l) as Record<string, unknown>)
    .find((l) => l.audit === 'instrument.update' && l.tag === 'PI-302');
  expect(audit).toMatchObject({
    siteId: fernId,
    instrumentId: before.id,
    changes: { status: { from: 'ok', to: 'out-of-service' } },
  });
  expect(typeof audit!.by).toBe('string');
});

test('classes by their standard: an RTD takes IEC 60751 B, a gauge refuses a class EN 837-1 does not have, an orifice has none', async () => {
  const rtd = await patch('TI-103', { accuracyClass: 'B' });
  expect(rtd.status).toBe(200);
  expect(rtd.body.instrument.accuracy).toMatchObject({ kind: 'iec60751', class: 'B' });
  const gauge = await patch('PI-301', { accuracyClass: 0.7 });
  expect(gauge.status).toBe(400);
  expect(gauge.body.error.details).toEqual([
    { path: 'accuracyClass', message: 'Must be one of 0.1, 0.25, 0.6, 1, 1.6, 2.5, 4 (EN 837-1 classes); got "0.7"' },
  ]);
  const orifice = await patch('FI-101', { accuracyClass: '1' });
  expect(orifice.status).toBe(400);
  expect(orifice.body.error.details[0]).toEqual({
    path: 'accuracyClass',
    message: "FI-101's accuracy is given as orifice, which has no class",
  });
  // nothing changed on a refusal
  const [row] = (await db.dataSource.query(`SELECT "accuracy" FROM "instruments" WHERE "id" = $1`, [
    inst['PI-301'].id,
  ])) as { accuracy: unknown }[];
  expect(row.accuracy).toEqual(inst['PI-301'].accuracy);
});

test('limits: each refusal names the field and its limit', async () => {
  const details = async (tag: string, body: object) => {
    const r = await patch(tag, body);
    expect(r.status).toBe(400);
    return r.body.error.details as { path: string; message: string }[];
  };
  expect(await details('TI-103', { range: { min: 400, max: 300 } })).toContainEqual({
    path: 'range.max',
    message: 'Must be greater than min',
  });
  expect(await details('TI-103', { range: { min: -1, max: 300 } })).toEqual([
    { path: 'range.min', message: 'Must be at least 0 (K, absolute zero); got -1' },
  ]);
  const vac = -Math.round(barometricFromElevation(-1000));
  expect(await details('PI-301', { range: { min: vac - 1, max: 10e5 } })).toEqual([
    {
      path: 'range.min',
      message: `Must be at least ${vac} (Pa gauge, a full vacuum at the highest atmospheric pressure); got ${vac - 1}`,
    },
  ]);
  expect(await details('TI-103', { range: { min: 0, max: 2e9 } })).toContainEqual({
    path: 'range.max',
    message: 'Must be between -1000000000 and 1000000000',
  });
  expect(await details('TI-103', { calibrationIntervalDays: 0 })).toEqual([
    { path: 'calibrationIntervalDays', message: 'Must be at least 1 day' },
  ]);
  expect(await details('TI-103', { calibrationIntervalDays: 3651 })).toEqual([
    { path: 'calibrationIntervalDays', message: 'Must be at most 3650 days' },
  ]);
  expect(await details('TI-103', { calibrationIntervalDays: 1.5 })).toEqual([
    { path: 'calibrationIntervalDays', message: 'Must be a whole number of days from 1 to 3650' },
  ]);
  expect(await details('TI-103', { status: 'broken' })).toEqual([
    { path: 'status', message: 'Must be one of ok, suspect, out-of-service' },
  ]);
  expect((await details('TI-103', {}))[0].message).toBe(
    'Give at least one of range, accuracyClass, calibrationIntervalDays, status',
  );
  expect((await details('TI-103', { tag: 'TI-999' }))[0].path).toBe('(body)');
  // null clears the interval
  const cleared = await patch('TI-103', { calibrationIntervalDays: null });
  expect(cleared.status).toBe(200);
  expect(cleared.body.instrument.calibrationIntervalDays).toBeNull();
});

test('a stale row version is a conflict; other roles, other sites and unknown ids are refused', async () => {
  const stale = await patch('TI-205', { status: 'suspect', rowVersion: inst['TI-205'].row_version });
  expect(stale.status).toBe(200);
  const again = await patch('TI-205', { status: 'ok', rowVersion: inst['TI-205'].row_version });
  expect(again.status).toBe(409);
  expect(again.body.error.message).toMatch(/^TI-205 changed since you read it/);

  expect((await patch('TI-205', { status: 'ok' }, 'engineer')).status).toBe(403);
  expect((await patch('TI-205', { status: 'ok' }, 'planner')).status).toBe(403);
  // Brackenmoor's planner is no member of Fernhallow: the site does not exist for them
  expect((await patch('TI-205', { status: 'ok' }, 'brackPlanner')).status).toBe(404);
  // an instrument of Brackenmoor through Fernhallow's URL
  const other = await request(app)
    .patch(`/api/sites/${fernId}/instruments/${brackInstrument}`)
    .set(bearer(tok.admin))
    .send({ status: 'ok' });
  expect(other.status).toBe(404);
  expect(
    (
      await request(app)
        .patch(`/api/sites/${fernId}/instruments/not-a-uuid`)
        .set(bearer(tok.admin))
        .send({ status: 'ok' })
    ).status,
  ).toBe(404);
});
