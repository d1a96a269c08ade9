/**
 * The exported web build served beside the API (WEB_DIST), with headers the Expo web app needs:
 * a CSP that allows it (CSP Level 3: 'wasm-unsafe-eval', hash sources), cross-origin isolation
 * for the SQLite worker (COOP same-origin + COEP require-corp, HTML Standard §7.1.3), .wasm as
 * application/wasm (WebAssembly Web API §3, required by instantiateStreaming), no-cache for the
 * HTML and the service worker (RFC 9111 §5.2.2.4), immutable for hashed assets (RFC 8246).
 */
import { createHash } from 'node:crypto';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import type { Express } from 'express';
import request from 'supertest';
import { makeDataSource } from '../../server/db';
import { memoryLogger, testApp } from './helpers/app';

const INLINE = 'globalThis.__EXPO_ROUTER_HYDRATE__=true;';
const HASH = '0123456789abcdef0123456789abcdef';
const files: Record<string, string | Buffer> = {
  'index.html': `<!DOCTYPE html><html><head><style id="expo-reset">#root{display:flex}</style></head><body><div id="root"></div><script type="module">${INLINE}</script><script src="/_expo/static/js/web/entry-${HASH}.js" defer></script></body></html>`,
  'sign-in.html': '<!DOCTYPE html><html><body>sign-in page</body></html>',
  [`_expo/static/js/web/entry-${HASH}.js`]: 'console.log("app")',
  [`assets/fonts/Inter.${HASH}.ttf`]: Buffer.from([0, 1, 0, 0]),
  // "\0asm" magic and version 1: the smallest valid WebAssembly module.
  'sqlite/wa-sqlite.wasm': Buffer.from([0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00]),
  'sw.js': 'self.addEventListener("fetch", () => {});',
  'favicon.ico': Buffer.from([0, 0, 1, 0]),
};

let dir: string;
let app: Express;
// No database is needed to serve files; an unconnected DataSource stands in.
const noDb = makeDataSource('postgres://trueround@127.0.0.1:1/none');
const url = 'postgres://trueround@127.0.0.1:1/none';

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'tr-web-'));
  for (const [p, body] of Object.entries(files)) {
    mkdirSync(dirname(join(dir, p)), { recursive: true });
    writeFileSync(join(dir, p), body);
  }
  app = testApp(noDb, url, { NODE_ENV: 'production', WEB_DIST: dir });
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function csp(res: request.Response): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const d of String(res.headers['content-security-policy']).split(';')) {
    const [name, ...values] = d.trim().split(/\s+/);
    if (name) out[name] = values;
  }
  return out;
}

test('index.html is served with a CSP that lets the Expo web app run, and cross-origin isolation', async () => {
  const res = await request(app).get('/');
  expect(res.status).toBe(200);
  expect(res.headers['content-type']).toMatch(/^text\/html/);
  expect(res.text).toBe(files['index.html']);
  const p = csp(res);
  // CSP3 §2.3.1: a hash source is 'sha256-' + base64 of the SHA-256 of the inline script text.
  const inlineHash = `'sha256-${createHash('sha256').update(INLINE).digest('base64')}'`;
  expect(p['default-src']).toEqual(["'self'"]);
  expect(p['script-src']).toEqual(["'self'", "'wasm-unsafe-eval'", inlineHash]);
  expect(p['script-src']).not.toContain("'unsafe-inline'");
  expect(p['script-src']).not.toContain("'unsafe-eval'");
  expect(p['worker-src']).toEqual(["'self'", 'blob:']);
  expect(p['img-src']).toEqual(["'self'", 'data:', 'blob:']);
  expect(p['style-src']).toContain("'unsafe-inline'"); // react-native-web writes a <style> at run time
  expect(p['object-src']).toEqual(["'none'"]);
  expect(p['upgrade-insecure-requests']).toBeUndefined(); // the LAN server may be plain HTTP
  expect(res.headers['cross-origin-opener-policy']).toBe('same-origin');
  expect(res.headers['cross-origin-embedder-policy']).toBe('require-corp');
  expect(res.headers['cache-control']).toBe('no-cache');
  expect(res.headers['strict-transport-security']).toMatch(/max-age=\d+/); // production
});

test('SPA: a route path outside /api gets index.html, no-cache', async () => {
  for (const path of ['/tech', '/plan/work-orders/42', '/eng?tab=cycle']) {
    const res = await request(app).get(path);
    expect(res.status).toBe(200);
    expect(res.text).toBe(files['index.html']);
    expect(res.headers['cache-control']).toBe('no-cache');
    expect(res.headers['cross-origin-embedder-policy']).toBe('require-corp');
  }
  const head = await request(app).head('/tech');
  expect(head.status).toBe(200);
  // A statically rendered route (sign-in.html) is served as itself.
  expect((await request(app).get('/sign-in')).text).toContain('sign-in page');
});

test('hashed assets are cached for a year, immutable; other files briefly', async () => {
  const js = await request(app).get(`/_expo/static/js/web/entry-${HASH}.js`);
  expect(js.status).toBe(200);
  expect(js.headers['content-type']).toMatch(/javascript/);
  expect(js.headers['cache-control']).toBe('public, max-age=31536000, immutable');
  expect(js.headers['cross-origin-embedder-policy']).toBe('require-corp');
  const font = await request(app).get(`/assets/fonts/Inter.${HASH}.ttf`);
  expect(font.headers['cache-control']).toBe('public, max-age=31536000, immutable');
  const icon = await request(app).get('/favicon.ico');
  expect(icon.headers['cache-control']).toBe('public, max-age=3600');
});

test('.wasm is application/wasm; the service worker is no-cache', async () => {
  const wasm = await request(app).get('/sqlite/wa-sqlite.wasm');
  expect(wasm.status).toBe(200);
  expect(wasm.headers['content-type']).toBe('application/wasm');
  const sw = await request(app).get('/sw.js');
  expect(sw.status).toBe(200);
  expect(sw.headers['content-type']).toMatch(/javascript/);
  expect(sw.headers['cache-control']).toBe('no-cache');
});

test('a missing file is a 404, not index.html; /api stays JSON; POST outside /api is 404', async () => {
  const missing = await request(app).get('/_expo/static/js/web/gone.js');
  expect(missing.status).toBe(404);
  expect(missing.body.error.code).toBe('not_found');
  const api = await request(app).get('/api/nothing-here');
  expect(api.status).toBe(404);
  expect(api.headers['content-type']).toMatch(/^application\/json/);
  expect(api.body.error.code).toBe('not_found');
  expect((await request(app).post('/tech').send({})).status).toBe(404);
});

test('WEB_DIST that has no index.html is not served, and the server says so in its log', async () => {
  const { logger, lines } = memoryLogger('warn');
  const none = testApp(noDb, url, { WEB_DIST: join(dir, 'not-there') }, logger);
  expect((await request(none).get('/')).status).toBe(404);
  expect(lines.join('')).toContain('WEB_DIST has no index.html');
});

test('CORS only for the listed dev origins (Fetch standard, CORS protocol)', async () => {
  const dev = testApp(noDb, url, { CORS_ORIGINS: 'http://localhost:8081' });
  const pre = await request(dev)
    .options('/api/auth/sign-in')
    .set('Origin', 'http://localhost:8081')
    .set('Access-Control-Request-Method', 'POST')
    .set('Access-Control-Request-Headers', 'content-type');
  expect(pre.status).toBe(204);
  expect(pre.headers['access-control-allow-origin']).toBe('http://localhost:8081');
  expect(pre.headers['access-control-allow-headers']).toMatch(/Authorization/);
  expect(pre.headers['access-control-allow-credentials']).toBeUndefined();
  const stranger = await request(dev).get('/api/me').set('Origin', 'http://evil.example');
  expect(stranger.headers['access-control-allow-origin']).toBeUndefined();
  const plain = await request(app).get('/api/me').set('Origin', 'http://localhost:8081');
  expect(plain.headers['access-control-allow-origin']).toBeUndefined();
});
