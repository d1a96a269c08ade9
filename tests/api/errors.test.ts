/**
 * Health, the error shape and the error middleware, request logging.
 * Every error is `{ error: { code, message, details } }` (server/errors.ts); status codes per
 * RFC 9110 §15.5 and §15.6.
 */
import type { Express } from 'express';
import request from 'supertest';
import { ApiError } from '../../shared/api/errors';
import { makeDataSource } from '../../server/db';
import { demoUser } from '../../server/seed/demo-users';
import { bearer, memoryLogger, signIn, testApp } from './helpers/app';
import { createTestDatabase, type TestDb } from './helpers/db';

let db: TestDb;
let app: Express;

beforeAll(async () => {
  db = await createTestDatabase();
  app = testApp(db.dataSource, db.url);
});
afterAll(() => db?.drop());

const expectError = (res: request.Response, status: number, code: string) => {
  expect(res.status).toBe(status);
  expect(res.headers['content-type']).toMatch(/^application\/json/);
  const body = ApiError.parse(res.body);
  expect(body.error.code).toBe(code);
  expect(Object.keys(body.error).sort()).toEqual(['code', 'details', 'message']);
  return body.error;
};

test('GET /api/health → { status: ok, db: ok } after select 1', async () => {
  const res = await request(app).get('/api/health');
  expect(res.status).toBe(200);
  expect(res.body).toEqual({ status: 'ok', db: 'ok' });
});

test('health → 503 db_unavailable when the database is gone', async () => {
  const gone = await createTestDatabase({ migrate: false });
  const deadApp = testApp(gone.dataSource, gone.url);
  expect((await request(deadApp).get('/api/health')).status).toBe(200);
  await gone.admin(`drop database "${gone.name}" with (force)`);
  const res = await request(deadApp).get('/api/health');
  expectError(res, 503, 'db_unavailable');
  await gone.drop();
});

test('an unknown /api route → 404 JSON, with or without a token', async () => {
  const e = expectError(await request(app).get('/api/no-such-thing'), 404, 'not_found');
  expect(e.message).toContain('/api/no-such-thing');
  expectError(await request(app).post('/api/auth/no-such-thing').send({}), 404, 'not_found');
  const { accessToken } = await signIn(app, demoUser('technician').email);
  expectError(await request(app).delete('/api/me').set(bearer(accessToken)), 404, 'not_found');
});

test('RFC 8259: a body that is not JSON → 400 bad_json', async () => {
  const res = await request(app)
    .post('/api/auth/sign-in')
    .set('Content-Type', 'application/json')
    .send('{"email": "tech@');
  expectError(res, 400, 'bad_json');
});

test('missing fields → 400 validation, naming the field (email) in message and details', async () => {
  const e = expectError(await request(app).post('/api/auth/sign-in').send({ password: 'x' }), 400, 'validation');
  expect(e.details).toEqual([{ path: 'email', message: 'Required' }]);
  expect(e.message).toContain('email');
  const both = expectError(await request(app).post('/api/auth/sign-in').send({}), 400, 'validation');
  expect((both.details as { path: string }[]).map((d) => d.path)).toEqual(['email', 'password']);
  const bad = expectError(
    await request(app).post('/api/auth/sign-in').send({ email: 'not-an-address', password: 'x' }),
    400,
    'validation',
  );
  expect(bad.details).toEqual([{ path: 'email', message: 'Must be an e-mail address' }]);
  // No body at all names the fields too.
  const empty = expectError(await request(app).post('/api/auth/sign-in'), 400, 'validation');
  expect((empty.details as { path: string }[]).map((d) => d.path)).toEqual(['email', 'password']);
});

test('a body that is not JSON at all → 415', async () => {
  const res = await request(app).post('/api/auth/sign-in').set('Content-Type', 'text/plain').send('email=tech');
  expectError(res, 415, 'unsupported_media_type');
});

test('RFC 9110 §15.5.14: a JSON body over 1 MB → 413 too_large', async () => {
  const big = JSON.stringify({ email: 'tech@fernhallow.example', password: 'x'.repeat(1024 * 1024) });
  const e = expectError(
    await request(app).post('/api/auth/sign-in').set('Content-Type', 'application/json').send(big),
    413,
    'too_large',
  );
  expect(e.details).toEqual({ limit: 1048576 });
  // Just under the limit is parsed (and then refused by the schema, naming the field).
  const under = JSON.stringify({ email: 'tech@fernhallow.example', password: 'x'.repeat(1024 * 1024 - 100) });
  const v = expectError(
    await request(app).post('/api/auth/sign-in').set('Content-Type', 'application/json').send(under),
    400,
    'validation',
  );
  expect(v.details).toEqual([{ path: 'password', message: 'Must be at most 1024 characters' }]);
});

test('a 500 says "internal error" with no stack in the body; the stack goes to the log', async () => {
  // A database that has gone away under a signed-in user makes /api/me fail inside TypeORM.
  const { accessToken } = await signIn(app, demoUser('technician').email);
  const dead = makeDataSource(db.url);
  await dead.initialize();
  await dead.destroy();
  const { logger, lines } = memoryLogger('error');
  const res = await request(testApp(dead, db.url, {}, logger))
    .get('/api/me')
    .set(bearer(accessToken));
  const e = expectError(res, 500, 'internal');
  expect(e).toEqual({ code: 'internal', message: 'internal error', details: null });
  expect(res.text).not.toMatch(/\bat .+:\d+:\d+/); // no "at file:line:col" frames
  const logged = lines.join('');
  expect(logged).toContain('"stack"');
  expect(logged).toMatch(/at .+:\d+:\d+/);
});

test('request logs carry method, path and status but no Authorization header, password or token', async () => {
  const { logger, lines } = memoryLogger('info');
  const logged = testApp(db.dataSource, db.url, {}, logger);
  const s = await signIn(logged, demoUser('planner').email);
  await request(logged).get('/api/me?x=1').set(bearer(s.accessToken));
  await request(logged).post('/api/auth/refresh').send({ refreshToken: s.refreshToken });
  await request(logged)
    .post('/api/auth/sign-in')
    .send({ email: demoUser('planner').email, password: 'wrong-password-typed' });
  const text = lines.join('');
  expect(lines.length).toBeGreaterThanOrEqual(4);
  expect(text).toContain('"path":"/api/me"');
  expect(text).toContain('"statusCode":401');
  for (const secret of [
    'trueround-demo',
    'wrong-password-typed',
    s.accessToken,
    s.refreshToken,
    'Bearer',
    'authorization',
  ]) {
    expect(text).not.toContain(secret);
  }
});

test('every response carries a request id that matches its log line', async () => {
  const { logger, lines } = memoryLogger('info');
  const res = await request(testApp(db.dataSource, db.url, {}, logger)).get('/api/health');
  expect(res.headers['x-request-id']).toMatch(/^[0-9a-f-]{36}$/);
  expect(lines.join('')).toContain(res.headers['x-request-id']);
});
