/**
 * Site guards: requireSiteRole. Not a member → 404 (RFC 9110 §15.5.5 allows 404 to hide that a
 * resource exists); a member without the role → 403 (RFC 9110 §15.5.4).
 */
import type { Express } from 'express';
import request from 'supertest';
import { SiteMembersResponse, SiteResponse } from '../../shared/api/sites';
import { SiteEntity } from '../../server/entities';
import { demoUser, demoUsers } from '../../server/seed/demo-users';
import { bearer, signIn, testApp } from './helpers/app';
import { createTestDatabase, type TestDb } from './helpers/db';

let db: TestDb;
let app: Express;
let fernhallowId: string;
let brackenmoorId: string;
const tokens: Record<string, string> = {};

beforeAll(async () => {
  db = await createTestDatabase();
  app = testApp(db.dataSource, db.url);
  const sites = db.dataSource.getRepository(SiteEntity);
  fernhallowId = (await sites.findOneByOrFail({ slug: 'fernhallow' })).id;
  brackenmoorId = (await sites.findOneByOrFail({ slug: 'brackenmoor' })).id;
  for (const u of demoUsers) tokens[`${u.role}@${u.site}`] = (await signIn(app, u.email)).accessToken;
});
afterAll(() => db?.drop());

test('any member reads the site: Fernhallow Works, Europe/London, 112 m, with their own role', async () => {
  for (const role of ['technician', 'planner', 'engineer', 'admin'] as const) {
    const res = await request(app)
      .get(`/api/sites/${fernhallowId}`)
      .set(bearer(tokens[`${role}@fernhallow`]));
    expect(res.status).toBe(200);
    expect(SiteResponse.parse(res.body)).toEqual({
      id: fernhallowId,
      name: 'Fernhallow Works',
      slug: 'fernhallow',
      timezone: 'Europe/London',
      elevationM: 112,
      role,
    });
  }
});

test('the technician on the admin-only members route → 403 forbidden', async () => {
  const res = await request(app).get(`/api/sites/${fernhallowId}/members`).set(bearer(tokens['technician@fernhallow']));
  expect(res.status).toBe(403);
  expect(res.body.error.code).toBe('forbidden');
  expect(res.body.error.message).toContain('admin');
  for (const role of ['planner', 'engineer']) {
    expect(
      (
        await request(app)
          .get(`/api/sites/${fernhallowId}/members`)
          .set(bearer(tokens[`${role}@fernhallow`]))
      ).status,
    ).toBe(403);
  }
});

test("the admin lists Fernhallow's members: its four demo users with their roles, nobody from Brackenmoor", async () => {
  const res = await request(app).get(`/api/sites/${fernhallowId}/members`).set(bearer(tokens['admin@fernhallow']));
  expect(res.status).toBe(200);
  const { members } = SiteMembersResponse.parse(res.body);
  const expected = demoUsers.filter((u) => u.site === 'fernhallow');
  expect(members.map((m) => [m.email, m.role]).sort()).toEqual(expected.map((u) => [u.email, u.role]).sort());
  expect(members.find((m) => m.email === demoUser('planner', 'brackenmoor').email)).toBeUndefined();
});

test("the Brackenmoor planner asking for Fernhallow's site → 404, the same as a site that does not exist", async () => {
  const other = await request(app).get(`/api/sites/${fernhallowId}`).set(bearer(tokens['planner@brackenmoor']));
  expect(other.status).toBe(404);
  expect(other.body.error.code).toBe('not_found');
  const members = await request(app)
    .get(`/api/sites/${fernhallowId}/members`)
    .set(bearer(tokens['planner@brackenmoor']));
  expect(members.status).toBe(404);
  const none = await request(app)
    .get('/api/sites/00000000-0000-4000-8000-000000000000')
    .set(bearer(tokens['planner@brackenmoor']));
  expect(none.status).toBe(404);
  expect(none.body).toEqual(other.body);
  const notUuid = await request(app).get('/api/sites/fernhallow').set(bearer(tokens['planner@brackenmoor']));
  expect(notUuid.status).toBe(404);
  // …and their own site is there.
  expect(
    (await request(app).get(`/api/sites/${brackenmoorId}`).set(bearer(tokens['planner@brackenmoor']))).body.name,
  ).toBe('Brackenmoor Boiler House');
});

test('site routes need a token: 401 before any site lookup', async () => {
  const res = await request(app).get(`/api/sites/${fernhallowId}`);
  expect(res.status).toBe(401);
  expect(res.body.error.code).toBe('unauthorized');
});

test('planners and engineers list the people a work order can go to; a technician may not (403)', async () => {
  for (const role of ['planner', 'engineer', 'admin']) {
    const res = await request(app)
      .get(`/api/sites/${fernhallowId}/assignees`)
      .set(bearer(tokens[`${role}@fernhallow`]));
    expect(res.status).toBe(200);
    expect(res.body.members.map((m: { email: string }) => m.email).sort()).toEqual([
      'admin@fernhallow.example',
      'engineer@fernhallow.example',
      'planner@fernhallow.example',
      'tech@fernhallow.example',
    ]);
  }
  expect(
    (await request(app).get(`/api/sites/${fernhallowId}/assignees`).set(bearer(tokens['technician@fernhallow'])))
      .status,
  ).toBe(403);
});
