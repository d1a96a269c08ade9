/**
 * Site administration: inviting a person and publishing a route version (server/admin).
 * Status codes as RFC 9110 gives them: 201 Created (§15.3.2), 400 (§15.5.1), 403 (§15.5.4),
 * 404 (§15.5.5), 409 Conflict (§15.5.10). The invitation's one-time password travels only in the
 * e-mail (mail_outbox); signing in with it is the check that it is the account's password.
 */
import type { Express } from 'express';
import request from 'supertest';
import { SiteEntity } from '../../server/entities';
import { bearer, signIn, testApp } from './helpers/app';
import { createTestDatabase, type TestDb } from './helpers/db';

let db: TestDb;
let app: Express;
let siteId: string;
let admin: string;
let planner: string;

beforeAll(async () => {
  db = await createTestDatabase();
  app = testApp(db.dataSource, db.url);
  siteId = (await db.dataSource.getRepository(SiteEntity).findOneByOrFail({ slug: 'fernhallow' })).id;
  admin = (await signIn(app, 'admin@fernhallow.example')).accessToken;
  planner = (await signIn(app, 'planner@fernhallow.example')).accessToken;
});
afterAll(() => db?.drop());

test('an admin invites a new person: 201, the e-mail carries a one-time password that signs in with the given role', async () => {
  const res = await request(app)
    .post(`/api/sites/${siteId}/invitations`)
    .set(bearer(admin))
    .send({ email: ' Kim.Ward@Fernhallow.example ', name: 'Kim Ward', role: 'engineer' });
  expect(res.status).toBe(201);
  expect(res.body).toEqual({
    userId: expect.any(String),
    email: 'kim.ward@fernhallow.example',
    name: 'Kim Ward',
    role: 'engineer',
    mailQueued: true,
  });
  const [mail] = (await db.dataSource.query(`SELECT "subject", "text" FROM "mail_outbox" WHERE "to_address" = $1`, [
    'kim.ward@fernhallow.example',
  ])) as { subject: string; text: string }[];
  expect(mail.subject).toBe('Trueround: your access to Fernhallow Works');
  const password = /one-time password:\s+(\S+)/.exec(mail.text)![1];
  expect(password).toHaveLength(16);
  const s = await signIn(app, 'kim.ward@fernhallow.example', password);
  expect(s.user.memberships).toEqual([expect.objectContaining({ siteId, role: 'engineer' })]);
  // the members list shows the new person
  const members = await request(app).get(`/api/sites/${siteId}/members`).set(bearer(admin));
  expect(members.body.members).toContainEqual(
    expect.objectContaining({ email: 'kim.ward@fernhallow.example', role: 'engineer' }),
  );
});

test('inviting someone already on the site → 409; an existing user of another site is added without a new password, and nothing of theirs shows', async () => {
  const again = await request(app)
    .post(`/api/sites/${siteId}/invitations`)
    .set(bearer(admin))
    .send({ email: 'planner@fernhallow.example', name: 'X', role: 'engineer' });
  expect(again.status).toBe(409);
  expect(again.body.error.message).toBe('planner@fernhallow.example is already a member of this site (as planner)');
  const other = await request(app)
    .post(`/api/sites/${siteId}/invitations`)
    .set(bearer(admin))
    .send({ email: 'planner@brackenmoor.example', name: 'A. Pryce', role: 'planner' });
  const fresh = await request(app)
    .post(`/api/sites/${siteId}/invitations`)
    .set(bearer(admin))
    .send({ email: 'robin.new@fernhallow.example', name: 'Robin New', role: 'planner' });
  expect(other.status).toBe(201);
  // the same shape as for a new person: the name typed here, no word of an account elsewhere
  expect(Object.keys(other.body).sort()).toEqual(Object.keys(fresh.body).sort());
  expect(other.body).toEqual({
    userId: expect.any(String),
    email: 'planner@brackenmoor.example',
    name: 'A. Pryce',
    role: 'planner',
    mailQueued: true,
  });
  expect(other.text).not.toContain('Alex Pryce');
  // the site's lists show the person by the name this site gave, and the e-mail greets them by it
  for (const path of ['members', 'assignees']) {
    const list = await request(app).get(`/api/sites/${siteId}/${path}`).set(bearer(admin));
    expect(list.text).not.toContain('Alex Pryce');
    expect(list.body.members).toContainEqual(
      expect.objectContaining({ email: 'planner@brackenmoor.example', name: 'A. Pryce' }),
    );
  }
  const [mail] = (await db.dataSource.query(
    `SELECT "text", "site_id" FROM "mail_outbox" WHERE "to_address" = 'planner@brackenmoor.example'`,
  )) as { text: string; site_id: string }[];
  expect(mail.text).toMatch(/^Hello A\. Pryce,/);
  expect(mail.site_id).toBe(siteId);
  const s = await signIn(app, 'planner@brackenmoor.example'); // the demo password still works
  expect(s.user.memberships.map((m) => m.siteId)).toContain(siteId);
});

test('a planner may not invite (403); a bad body is a 400 naming each field', async () => {
  expect(
    (
      await request(app)
        .post(`/api/sites/${siteId}/invitations`)
        .set(bearer(planner))
        .send({ email: 'a@b.example', name: 'A', role: 'planner' })
    ).status,
  ).toBe(403);
  const bad = await request(app)
    .post(`/api/sites/${siteId}/invitations`)
    .set(bearer(admin))
    .send({ email: 'not-an-address', role: 'boss' });
  expect(bad.status).toBe(400);
  expect(bad.body.error.details).toEqual(
    expect.arrayContaining([
      { path: 'email', message: 'Must be an e-mail address' },
      { path: 'name', message: 'Required' },
      { path: 'role', message: 'Must be one of technician, planner, engineer, admin' },
    ]),
  );
});

test('an admin publishes a new route version: 201 with the next number; a template the validator refuses is a 400 with its messages', async () => {
  const [route] = (await db.dataSource.query(
    `SELECT r."id", v."number", v."template" FROM "routes" r JOIN "route_versions" v ON v."id" = r."current_version_id" JOIN "sites" s ON s."id" = r."site_id" WHERE s."slug" = 'fernhallow' ORDER BY r."key" LIMIT 1`,
  )) as { id: string; number: number; template: { name: string; stops: { readings: { tag: string }[] }[] } }[];
  const renamed = { ...route.template, name: `${route.template.name} (revised)` };
  const ok = await request(app)
    .post(`/api/sites/${siteId}/routes/${route.id}/versions`)
    .set(bearer(admin))
    .send({ template: renamed });
  expect(ok.status).toBe(201);
  expect(ok.body).toMatchObject({ routeId: route.id, number: route.number + 1 });
  const [now] = (await db.dataSource.query(`SELECT "name" FROM "routes" WHERE "id" = $1`, [route.id])) as {
    name: string;
  }[];
  expect(now.name).toBe(renamed.name);

  const broken = structuredClone(route.template);
  broken.stops[0].readings[0].tag = 'XX-999';
  const bad = await request(app)
    .post(`/api/sites/${siteId}/routes/${route.id}/versions`)
    .set(bearer(admin))
    .send({ template: broken });
  expect(bad.status).toBe(400);
  expect(bad.body.error.code).toBe('validation');
  expect(JSON.stringify(bad.body.error.details)).toContain('XX-999');

  expect(
    (
      await request(app)
        .post(`/api/sites/${siteId}/routes/${route.id}/versions`)
        .set(bearer(planner))
        .send({ template: renamed })
    ).status,
  ).toBe(403);
  expect(
    (
      await request(app)
        .post(`/api/sites/${siteId}/routes/00000000-0000-4000-8000-000000000000/versions`)
        .set(bearer(admin))
        .send({ template: renamed })
    ).status,
  ).toBe(404);
});
