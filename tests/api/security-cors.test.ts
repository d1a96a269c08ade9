/**
 * CORS (Fetch standard, "CORS protocol"): only the origins in CORS_ORIGINS get CORS headers.
 * tests/api/web.test.ts checks the basic allowed preflight and one stranger's GET; here: a
 * stranger's preflight gets no allow headers at all, look-alike origins (same host other port or
 * scheme, a suffix, "null", a trailing slash) are strangers, the allowed origins can read error
 * responses, credentials are never allowed, and every answer to a request with an Origin says
 * `Vary: Origin` (Fetch standard, "CORS protocol and HTTP caches") so a cache cannot hand one
 * origin's answer to another. No database is needed: nothing here gets past requireAuth.
 */
import request from 'supertest';
import { makeDataSource } from '../../server/db';
import { testApp } from './helpers/app';

const url = 'postgres://trueround@127.0.0.1:1/none';
const noDb = makeDataSource(url);
const OURS = ['http://localhost:8081', 'http://127.0.0.1:8081'];
const app = testApp(noDb, url, { CORS_ORIGINS: OURS.join(',') });

const ALLOW_HEADERS = [
  'access-control-allow-origin',
  'access-control-allow-methods',
  'access-control-allow-headers',
  'access-control-allow-credentials',
  'access-control-max-age',
  'access-control-expose-headers',
];
const corsHeaders = (h: Record<string, string>) => Object.keys(h).filter((k) => ALLOW_HEADERS.includes(k));

const preflight = (path: string, origin: string, method = 'POST') =>
  request(app)
    .options(path)
    .set('Origin', origin)
    .set('Access-Control-Request-Method', method)
    .set('Access-Control-Request-Headers', 'authorization, content-type');

const STRANGERS = [
  'http://evil.example',
  'https://localhost:8081', // other scheme
  'http://localhost:8082', // other port
  'http://localhost', // default port
  'http://localhost:8081.evil.example', // our origin as a prefix
  'http://evil.localhost:8081', // a subdomain
  'http://localhost:80810',
  'http://localhost:8081/', // not an origin (trailing slash)
  'HTTP://LOCALHOST:8081', // origins are serialised lower-case; any other spelling is not ours
  'null', // sandboxed frames, file: pages
];

test('each configured origin: the preflight of sign-in and of a guarded route is answered with allow headers, no credentials', async () => {
  for (const origin of OURS) {
    for (const path of ['/api/auth/sign-in', '/api/sites/00000000-0000-4000-8000-000000000000/work-orders']) {
      const res = await preflight(path, origin);
      expect(res.status).toBe(204);
      expect(res.headers['access-control-allow-origin']).toBe(origin);
      expect(res.headers['access-control-allow-methods']).toMatch(/POST/);
      expect(res.headers['access-control-allow-headers']).toMatch(/Authorization/);
      expect(res.headers['access-control-allow-credentials']).toBeUndefined();
      expect(res.headers.vary).toMatch(/Origin/);
    }
  }
});

test('a stranger origin: the preflight gets no allow headers whatever the path and method', async () => {
  for (const origin of STRANGERS) {
    for (const [path, method] of [
      ['/api/auth/sign-in', 'POST'],
      ['/api/me', 'GET'],
      ['/api/sites/x/work-orders/y/cancel', 'POST'],
      ['/api/photos/x', 'DELETE'],
    ]) {
      const res = await preflight(path, origin, method);
      expect({ origin, path, cors: corsHeaders(res.headers) }).toEqual({ origin, path, cors: [] });
      expect(res.headers.vary).toMatch(/Origin/);
    }
  }
});

test('a stranger origin: actual requests (a 401, a 400, a 404) carry no CORS headers; ours can read the same errors', async () => {
  const calls = [
    () => request(app).get('/api/me'),
    () => request(app).post('/api/auth/sign-in').send({}),
    () => request(app).get('/api/nothing-here'),
  ];
  for (const call of calls) {
    for (const origin of STRANGERS) {
      const res = await call().set('Origin', origin);
      expect({ origin, cors: corsHeaders(res.headers) }).toEqual({ origin, cors: [] });
      expect(res.headers.vary).toMatch(/Origin/);
    }
    const ours = await call().set('Origin', OURS[1]);
    expect(ours.headers['access-control-allow-origin']).toBe(OURS[1]);
    expect(ours.headers['access-control-allow-credentials']).toBeUndefined();
    expect(ours.headers['access-control-expose-headers']).toMatch(/X-Request-Id/);
  }
});

test('no Access-Control-Allow-Origin: * ever, and none at all without CORS_ORIGINS', async () => {
  const plain = testApp(noDb, url);
  for (const origin of [...OURS, 'http://evil.example']) {
    const pre = await request(plain)
      .options('/api/auth/sign-in')
      .set('Origin', origin)
      .set('Access-Control-Request-Method', 'POST');
    expect(corsHeaders(pre.headers)).toEqual([]);
    expect(corsHeaders((await request(plain).get('/api/me').set('Origin', origin)).headers)).toEqual([]);
  }
  const res = await request(app).get('/api/me').set('Origin', OURS[0]);
  expect(res.headers['access-control-allow-origin']).not.toBe('*');
});
