/**
 * What the server logs (pino, server/logger.ts) must not hold a password, an access or refresh
 * token, a password hash or the JWT secret (OWASP Logging Cheat Sheet, "Data to exclude":
 * authentication passwords, session identifiers, access tokens, encryption keys and other
 * secrets). Every line of a busy session at the most verbose level (trace) is kept in memory:
 * sign-in (right and wrong), refresh, sign-out, an invitation and its acceptance (sign-in with the
 * one-time password, a new password set), a push, failures with a token in the query string and a
 * bad body; then each secret is searched for in the whole log text. The redaction paths, the
 * second guard for anything logged by hand, are checked on objects that carry secrets.
 */
import type { Express } from 'express';
import request from 'supertest';
import { createApp } from '../../server/app';
import { DEMO_PASSWORD } from '../../server/seed/demo-users';
import { memoryLogger, TEST_SECRET, testConfig } from './helpers/app';
import { designRound, makeWorld, type World } from './analysis-helpers';

let w: World;
let app: Express;
let lines: string[];
const secrets: Record<string, string> = {};

const keep = (name: string, value: string) => {
  expect(value.length).toBeGreaterThanOrEqual(8);
  secrets[name] = value;
};

beforeAll(async () => {
  w = await makeWorld();
  const mem = memoryLogger('trace');
  lines = mem.lines;
  app = createApp({
    config: testConfig(w.db.url, { LOG_LEVEL: 'trace' }),
    dataSource: w.db.dataSource,
    logger: mem.logger,
  });
  keep('JWT secret', TEST_SECRET);
  keep('demo password', DEMO_PASSWORD);

  // sign-in, a wrong password, refresh, sign-out
  const tech = await request(app)
    .post('/api/auth/sign-in')
    .send({ email: 'tech@fernhallow.example', password: DEMO_PASSWORD });
  expect(tech.status).toBe(200);
  keep('access token', tech.body.accessToken);
  keep('refresh token', tech.body.refreshToken);
  expect(
    (
      await request(app)
        .post('/api/auth/sign-in')
        .send({ email: 'tech@fernhallow.example', password: 'a-wrong-password-typed' })
    ).status,
  ).toBe(401);
  keep('wrong password', 'a-wrong-password-typed');
  const refreshed = await request(app).post('/api/auth/refresh').send({ refreshToken: tech.body.refreshToken });
  expect(refreshed.status).toBe(200);
  keep('refreshed access token', refreshed.body.accessToken);
  keep('refreshed refresh token', refreshed.body.refreshToken);
  // reuse of the old token (a 401 that revokes the family): its log line must not name it either
  expect((await request(app).post('/api/auth/refresh').send({ refreshToken: tech.body.refreshToken })).status).toBe(
    401,
  );

  // a push with the technician's (new) token
  const tech2 = await request(app)
    .post('/api/auth/sign-in')
    .send({ email: 'tech@fernhallow.example', password: DEMO_PASSWORD });
  keep('access token 2', tech2.body.accessToken);
  keep('refresh token 2', tech2.body.refreshToken);
  const round = designRound(w, { photos: ['PI-101'] });
  expect(
    (
      await request(app)
        .post('/api/sync/push')
        .set('Authorization', `Bearer ${tech2.body.accessToken}`)
        .send(round.body)
    ).status,
  ).toBe(200);
  expect(
    (
      await request(app)
        .post('/api/auth/sign-out')
        .set('Authorization', `Bearer ${tech2.body.accessToken}`)
        .send({ refreshToken: tech2.body.refreshToken })
    ).status,
  ).toBe(204);

  // an invitation, and the invitee accepting it: the one-time password, then their own
  const admin = await request(app)
    .post('/api/auth/sign-in')
    .send({ email: 'admin@fernhallow.example', password: DEMO_PASSWORD });
  keep('admin access token', admin.body.accessToken);
  const inv = await request(app)
    .post(`/api/sites/${w.fernId}/invitations`)
    .set('Authorization', `Bearer ${admin.body.accessToken}`)
    .send({ email: 'log.check@fernhallow.example', name: 'Log Check', role: 'technician' });
  expect(inv.status).toBe(201);
  const [mail] = (await w.db.dataSource.query(
    `SELECT "text" FROM "mail_outbox" WHERE "to_address" = 'log.check@fernhallow.example'`,
  )) as { text: string }[];
  const oneTime = /one-time password:\s+(\S+)/.exec(mail.text)![1];
  keep('one-time password', oneTime);
  const invitee = await request(app)
    .post('/api/auth/sign-in')
    .send({ email: 'log.check@fernhallow.example', password: oneTime });
  expect(invitee.status).toBe(200);
  keep('invitee access token', invitee.body.accessToken);
  const chosen = 'my own secret passphrase 42';
  keep('chosen password', chosen);
  const set = await request(app)
    .post('/api/auth/password')
    .set('Authorization', `Bearer ${invitee.body.accessToken}`)
    .send({ currentPassword: oneTime, newPassword: chosen });
  expect(set.status).toBe(200);
  keep('access token after password change', set.body.accessToken);
  keep('refresh token after password change', set.body.refreshToken);
  // a refused new password (the policy's 400) with a body that holds passwords
  expect(
    (
      await request(app)
        .post('/api/auth/password')
        .set('Authorization', `Bearer ${set.body.accessToken}`)
        .send({ currentPassword: chosen, newPassword: 'short-pass1' })
    ).status,
  ).toBe(400);
  keep('refused new password', 'short-pass1');

  // a token where it does not belong: in the query string of a 401, and in a malformed body
  expect(
    (await request(app).get(`/api/me?access_token=${tech2.body.accessToken}&refresh=${tech2.body.refreshToken}`))
      .status,
  ).toBe(401);
  expect(
    (
      await request(app)
        .post('/api/auth/sign-in')
        .set('Content-Type', 'application/json')
        .send(`{"email":"x@y.z","password":"${chosen}"`)
    ).status,
  ).toBe(400);

  const hashes = (await w.db.dataSource.query(
    `SELECT "password_hash" FROM "users" WHERE "email" IN ('tech@fernhallow.example', 'log.check@fernhallow.example')`,
  )) as { password_hash: string }[];
  hashes.forEach((h, i) => keep(`password hash ${i}`, h.password_hash));
});
afterAll(() => w?.db.drop());

test('the session above was logged (request lines at trace level, so the search below has something to search)', () => {
  const text = lines.join('');
  // one request line for each of the 14 requests above
  expect(lines.filter((l) => (JSON.parse(l) as { req?: unknown }).req).length).toBeGreaterThanOrEqual(14);
  for (const p of ['/api/auth/sign-in', '/api/auth/refresh', '/api/auth/password', '/api/sync/push', '/api/sites/'])
    expect(text).toContain(p);
});

test('no password, token, password hash or JWT secret anywhere in the log', () => {
  const text = lines.join('');
  const found = Object.entries(secrets)
    .filter(([, v]) => text.includes(v) || text.includes(JSON.stringify(v).slice(1, -1)))
    .map(([k]) => k);
  expect(found).toEqual([]);
  // no Authorization header, no argon2 PHC string, no query string of any request
  expect(text).not.toMatch(/Bearer\s+ey/);
  expect(text).not.toMatch(/\$argon2id\$/);
  expect(text).not.toMatch(/access_token=/);
});

test('redaction: secrets in hand-logged objects (top level, nested one and two deep) come out as [redacted]', () => {
  const mem = memoryLogger('info');
  const password = 'hand-logged-password';
  mem.logger.info(
    {
      password,
      user: { email: 'a@b.c', passwordHash: '$argon2id$v=19$m=19456,t=2,p=1$x$y', newPassword: password },
      body: { refreshToken: 'rt-hand-logged-0123', currentPassword: password },
      config: { JWT_SECRET: TEST_SECRET, PORT: 8080 },
      req: { headers: { authorization: 'Bearer hand-logged-token' } },
      deep: { input: { accessToken: 'at-hand-logged-0123' } },
      err: { config: { JWT_SECRET: TEST_SECRET } },
    },
    'something happened',
  );
  const out = mem.lines.join('');
  for (const s of [
    password,
    'rt-hand-logged-0123',
    TEST_SECRET,
    'hand-logged-token',
    'at-hand-logged-0123',
    '$argon2id$',
  ])
    expect(out).not.toContain(s);
  const line = JSON.parse(mem.lines[0]) as Record<string, Record<string, unknown>>;
  expect(line.user).toEqual({ email: 'a@b.c', passwordHash: '[redacted]', newPassword: '[redacted]' });
  expect(line.config).toEqual({ JWT_SECRET: '[redacted]', PORT: 8080 });
  expect(line.password).toBe('[redacted]');
  // what is not secret stays readable
  expect(line.msg).toBe('something happened');
});
