/**
 * Access-token abuse that tests/api/auth.test.ts does not already cover (it has: no token, not
 * Bearer, expired, one flipped character, alg none, wrong secret / issuer / audience, HS512).
 * Here: the other token kind in the wrong place, a payload re-signed for nothing (sub swapped to
 * an admin's id), no exp, nbf in the future, a sub that is not a user id, "none" spelt otherwise,
 * a token in the query string, and a disabled or deleted user's still-unexpired token.
 * Sources: RFC 7519 (JWT), RFC 7515 (JWS), RFC 8725 (JWT Best Current Practices), RFC 6750 (Bearer).
 */
import type { Express } from 'express';
import jwt from 'jsonwebtoken';
import request from 'supertest';
import { UserEntity } from '../../server/entities';
import { hashPassword } from '../../server/auth/passwords';
import { demoUser } from '../../server/seed/demo-users';
import { bearer, signIn, TEST_SECRET, testApp } from './helpers/app';
import { createTestDatabase, type TestDb } from './helpers/db';

let db: TestDb;
let app: Express;
let techId: string;
let adminId: string;
let fernId: string;

beforeAll(async () => {
  db = await createTestDatabase();
  app = testApp(db.dataSource, db.url);
  techId = (await db.dataSource.getRepository(UserEntity).findOneByOrFail({ email: demoUser('technician').email })).id;
  adminId = (await db.dataSource.getRepository(UserEntity).findOneByOrFail({ email: demoUser('admin').email })).id;
  [{ id: fernId }] = (await db.dataSource.query(`SELECT "id" FROM "sites" WHERE "slug" = 'fernhallow'`)) as {
    id: string;
  }[];
});
afterAll(() => db?.drop());

const b64url = (o: object) => Buffer.from(JSON.stringify(o)).toString('base64url');
const now = () => Math.floor(Date.now() / 1000);
const claims = (sub: string) => ({ sub, iss: 'trueround', aud: 'trueround-api', iat: now(), exp: now() + 600 });

async function expect401(token: string, path = '/api/me') {
  const res = await request(app).get(path).set(bearer(token));
  expect({ token: token.slice(0, 40), status: res.status, code: res.body?.error?.code }).toEqual({
    token: token.slice(0, 40),
    status: 401,
    code: 'unauthorized',
  });
  return res;
}

test('a refresh token sent as the access token → 401; an access token sent to /refresh → 401 (two kinds, never swapped)', async () => {
  const s = await signIn(app, demoUser('technician').email);
  await expect401(s.refreshToken);
  await expect401(s.refreshToken, `/api/sites/${fernId}`);
  const res = await request(app)
    .post('/api/auth/refresh')
    .send({ refreshToken: s.accessToken.slice(0, 200) });
  expect(res.status).toBe(401);
  // both still work in their own place
  expect((await request(app).get('/api/me').set(bearer(s.accessToken))).status).toBe(200);
  expect((await request(app).post('/api/auth/refresh').send({ refreshToken: s.refreshToken })).status).toBe(200);
});

test("RFC 7515 §5.2: the technician's token with sub changed to the admin's id, signature kept → 401", async () => {
  const { accessToken } = await signIn(app, demoUser('technician').email);
  const [h, p, sig] = accessToken.split('.');
  const payload = JSON.parse(Buffer.from(p, 'base64url').toString('utf8')) as Record<string, unknown>;
  expect(payload.sub).toBe(techId);
  const forged = `${h}.${b64url({ ...payload, sub: adminId })}.${sig}`;
  await expect401(forged);
  const members = await request(app).get(`/api/sites/${fernId}/members`).set(bearer(forged));
  expect(members.status).toBe(401);
});

test('RFC 8725 §3.1: "alg" none in other spellings, with or without a signature part → 401', async () => {
  for (const alg of ['none', 'None', 'NONE', 'nOnE']) {
    const body = `${b64url({ alg, typ: 'JWT' })}.${b64url(claims(adminId))}`;
    await expect401(`${body}.`);
    await expect401(`${body}.${Buffer.from('x').toString('base64url')}`);
  }
});

test('RFC 7519 §4.1.4/§4.1.5: a token without exp, or not valid before a future nbf → 401', async () => {
  const noExp = jwt.sign({ sub: techId, iss: 'trueround', aud: 'trueround-api' }, TEST_SECRET, { algorithm: 'HS256' });
  expect((jwt.decode(noExp) as jwt.JwtPayload).exp).toBeUndefined();
  await expect401(noExp);
  const later = jwt.sign({ ...claims(techId), nbf: now() + 300 }, TEST_SECRET, { algorithm: 'HS256' });
  await expect401(later);
  // the same claims without nbf pass: the nbf is what failed
  expect(
    (
      await request(app)
        .get('/api/me')
        .set(bearer(jwt.sign(claims(techId), TEST_SECRET, { algorithm: 'HS256' })))
    ).status,
  ).toBe(200);
});

test('a correctly signed token whose sub is not a user id (an e-mail, a number, missing) → 401', async () => {
  for (const sub of [demoUser('admin').email, '1', ''])
    await expect401(jwt.sign(claims(sub), TEST_SECRET, { algorithm: 'HS256' }));
  const { sub: _sub, ...noSub } = claims(techId);
  await expect401(jwt.sign(noSub, TEST_SECRET, { algorithm: 'HS256' }));
});

test('RFC 6750 §2.3 is not supported: an access token in the query string or a form field → 401', async () => {
  const { accessToken } = await signIn(app, demoUser('technician').email);
  expect((await request(app).get(`/api/me?access_token=${accessToken}`)).status).toBe(401);
  expect(
    (await request(app).post('/api/auth/sign-out').type('form').send({ access_token: accessToken, refreshToken: 'x' }))
      .status,
  ).toBe(401);
});

describe('requireAuth re-checks the user: a disabled or deleted account loses access at once, not at exp', () => {
  test('disabling a user: their unexpired access token → 401 on every guarded route; enabling again restores it', async () => {
    const email = 'kept-out@fernhallow.example';
    const user = await db.dataSource
      .getRepository(UserEntity)
      .save({ email, name: 'Kept Out', passwordHash: await hashPassword('a long enough password'), disabled: false });
    await db.dataSource.query(`INSERT INTO "memberships" ("user_id", "site_id", "role") VALUES ($1, $2, 'admin')`, [
      user.id,
      fernId,
    ]);
    const s = await signIn(app, email, 'a long enough password');
    expect((await request(app).get(`/api/sites/${fernId}/members`).set(bearer(s.accessToken))).status).toBe(200);

    await db.dataSource.getRepository(UserEntity).update({ id: user.id }, { disabled: true });
    const res = await expect401(s.accessToken, `/api/sites/${fernId}/members`);
    expect(res.body.error.message).toMatch(/disabled/);
    expect(res.headers['www-authenticate']).toBe('Bearer error="invalid_token"');
    await expect401(s.accessToken, '/api/sync/pull?siteId=' + fernId);
    await expect401(s.accessToken, '/api/me');

    await db.dataSource.getRepository(UserEntity).update({ id: user.id }, { disabled: false });
    expect((await request(app).get(`/api/sites/${fernId}/members`).set(bearer(s.accessToken))).status).toBe(200);

    await db.dataSource.query(`DELETE FROM "users" WHERE "id" = $1`, [user.id]);
    await expect401(s.accessToken, `/api/sites/${fernId}`);
  });
});
