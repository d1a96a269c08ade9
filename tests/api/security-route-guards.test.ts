/**
 * Every route of the app and who may call it, checked against the running app's router stack:
 * a route missing from GUARDS (a new route nobody thought to guard) or a GUARDS line whose route
 * is gone fails the first test. Then, for each route: no token → 401 (RFC 6750 §3.1); each
 * Fernhallow demo role gets past the guard or gets 403 (RFC 9110 §15.5.4) / 404 as designed; the
 * Brackenmoor planner with Fernhallow ids gets 404 (RFC 9110 §15.5.5: a resource of another site
 * does not exist for them), so nothing of one site leaks to another.
 *
 * "Gets past the guard" means: no 401, no 403, no 5xx and not the 404 the guards give outsiders
 * (GUARD_404). A body of `{}` is sent to every POST, so a caller who passes the guard gets a 400 or
 * 415 from validation and nothing is written.
 *
 * Outside ids answer like unknown ones: for every route, an admin of Brackenmoor (who gets past
 * every role guard on their own site) calls it with Fernhallow's ids and with ids that exist
 * nowhere — once with every id so, once with their own site id and the inner ids so — and the two
 * answers must be equal byte for byte (status and body). A line's `body` is a valid request body,
 * so the call gets past validation to the look-up. Routes without ids (and the public ones but
 * sign-in, whose e-mail is the id) make the two calls alike and pass as such.
 *
 * Adding a route = one line in GUARDS: `'METHOD /api/path/:param': site(ROLES)` (or `{ public: true }`,
 * `signedIn()`…); path parameters take the fixture of the same name (FIXTURE_OF), `params` maps others.
 */
import { randomUUID } from 'node:crypto';
import type { Express } from 'express';
import request from 'supertest';
import { runAnalysisJob } from '../../server/analysis/job';
import { createApp } from '../../server/app';
import { addMember, memoryLogger, signIn, testConfig } from './helpers/app';
import { makeWorld, pushRound, type World } from './analysis-helpers';

type Who = 'tech' | 'planner' | 'engineer' | 'admin';
const ALL: readonly Who[] = ['tech', 'planner', 'engineer', 'admin'];
const READ: readonly Who[] = ['planner', 'engineer', 'admin'];
const ACT: readonly Who[] = ['planner', 'admin'];
const PUSH: readonly Who[] = ['tech', 'engineer', 'admin'];
const ADMIN: readonly Who[] = ['admin'];

interface Fixtures {
  siteId: string;
  workOrderId: string;
  roundId: string;
  routeId: string;
  photoId: string;
  instrumentId: string;
  tag: string;
  action: string;
  routeVersionId: string;
  email: string;
}

interface Guard {
  /** No token needed (and none checked). */
  public?: true;
  /** The Fernhallow demo roles that get past the guard; the other Fernhallow roles get `denied`. */
  allow?: readonly Who[];
  /** What a Fernhallow member without one of the roles gets; default 403. */
  denied?: 403 | 404;
  /** What the Brackenmoor planner gets with Fernhallow ids; default 404; 'allowed' for routes about oneself. */
  outsider?: 403 | 404 | 'allowed';
  /** Path parameter → the fixture to put there, where the parameter's name does not say it. */
  params?: Record<string, keyof Fixtures>;
  /** Query string; `:name` is replaced like a path parameter. */
  query?: string;
  /** A valid body for the fixtures (default `{}`), so the outside/unknown comparison reaches the look-up. */
  body?: (f: Fixtures) => object;
}

/** A push of one new round on the fixture's route version (the round id is the same in every call). */
const PUSH_ROUND_ID = '6f1d3c2a-5b4e-4f70-9a18-2c3d4e5f6a7b';
const pushBody = (f: Fixtures) => ({
  payloadVersion: 2,
  deviceId: 'guard-table',
  sentAt: '2026-12-01T06:00:00Z',
  rounds: [
    {
      id: PUSH_ROUND_ID,
      routeVersionId: f.routeVersionId,
      startedAt: '2026-12-01T06:00:00Z',
      finishedAt: null,
      status: 'in-progress',
      dismissals: [],
    },
  ],
  readings: [],
  checkAnswers: [],
  photos: [],
});

const site = (allow: readonly Who[], more: Partial<Guard> = {}): Guard => ({ allow, ...more });
const signedIn = (more: Partial<Guard> = {}): Guard => ({ allow: ALL, outsider: 'allowed', ...more });
const PUBLIC: Guard = { public: true };

/** Every route, method + path as mounted. */
const GUARDS: Record<string, Guard> = {
  'GET /api/health': PUBLIC,
  // the e-mail is the id here: an account that exists and one that does not answer alike
  'POST /api/auth/sign-in': { public: true, body: (f) => ({ email: f.email, password: 'not the password at all' }) },
  'POST /api/auth/refresh': PUBLIC,
  'POST /api/auth/sign-out': signedIn(),
  'POST /api/auth/password': signedIn(),
  'GET /api/me': signedIn(),
  'GET /api/sites/:siteId': site(ALL),
  'GET /api/sites/:siteId/members': site(ADMIN),
  'GET /api/sites/:siteId/assignees': site(READ),
  'GET /api/sites/:siteId/work-orders': site(READ),
  'GET /api/sites/:siteId/work-orders/:id': site(READ, { params: { id: 'workOrderId' } }),
  'GET /api/sites/:siteId/work-orders/:id/evidence': site(READ, { params: { id: 'workOrderId' } }),
  'POST /api/sites/:siteId/work-orders/:id/:action': site(ACT, {
    params: { id: 'workOrderId' },
    body: () => ({ comment: 'seen on the round' }),
  }),
  'GET /api/sites/:siteId/instruments': site(READ),
  'GET /api/sites/:siteId/instruments/:tag/history': site(READ),
  'PATCH /api/sites/:siteId/instruments/:instrumentId': site(ADMIN, { body: () => ({ status: 'suspect' }) }),
  'GET /api/sites/:siteId/detectability': site(['engineer', 'admin']),
  'GET /api/sites/:siteId/rounds': site(['planner', 'engineer']),
  'GET /api/sites/:siteId/rounds/:roundId/analysis': site(READ),
  'GET /api/sites/:siteId/analysis-jobs': site(['engineer', 'admin']),
  'GET /api/sites/:siteId/exports/readings.csv': site(READ),
  'GET /api/sites/:siteId/exports/work-orders.csv': site(READ),
  'POST /api/sites/:siteId/invitations': site(ADMIN),
  'POST /api/sites/:siteId/routes/:routeId/versions': site(ADMIN, { body: () => ({ template: { id: 'x' } }) }),
  // planners walk no rounds: no push role on any site, so 403 for them wherever they are
  'POST /api/sync/push': site(PUSH, { outsider: 403, body: pushBody }),
  'GET /api/sync/pull': site(ALL, { query: 'siteId=:siteId' }),
  // uploads: the round's own technician or a site admin (server/sync/access.ts mayWriteRound)
  'POST /api/photos/:id': site(['tech', 'admin'], { params: { id: 'photoId' } }),
  'GET /api/photos/:id': site(ALL, { params: { id: 'photoId' } }),
  'GET /api/photos/:id/thumb': site(ALL, { params: { id: 'photoId' } }),
  // dev-only (404 unless the mail fake runs, checked below); the site's admins, its mail only
  'GET /api/dev/mailbox': site(ADMIN, { query: 'siteId=:siteId' }),
};

/** The 404 bodies' messages the guards give a caller who may not know the thing exists. */
const GUARD_404 = new Set([
  'Site not found',
  'Photo not found',
  'No photo with this id was announced on your sites: push its round with the photo first',
]);

/** Default fixture of a path parameter by its name. */
const FIXTURE_OF: Record<string, keyof Fixtures> = {
  siteId: 'siteId',
  roundId: 'roundId',
  routeId: 'routeId',
  tag: 'tag',
  action: 'action',
  workOrderId: 'workOrderId',
  photoId: 'photoId',
  instrumentId: 'instrumentId',
};

// ---------------------------------------------------------------------------------------------

interface StackLayer {
  route?: { path: string | string[]; methods: Record<string, boolean> };
  handle?: { stack?: StackLayer[] };
  rawPath?: string | string[] | RegExp;
}

/** `METHOD /path` of every route in an Express 5 app, nested routers included (router 2.x layers). */
function routesOf(app: Express): string[] {
  const out: string[] = [];
  const norm = (p: string) => (p.length > 1 ? p.replace(/\/+$/, '') : p);
  const walk = (stack: StackLayer[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        const paths = Array.isArray(layer.route.path) ? layer.route.path : [layer.route.path];
        for (const p of paths)
          for (const m of Object.keys(layer.route.methods)) out.push(`${m.toUpperCase()} ${norm(prefix + p)}`);
      } else if (layer.handle?.stack) {
        if (typeof layer.rawPath !== 'string')
          throw new Error(`a router mounted at ${String(layer.rawPath)}: only string mount paths are understood here`);
        walk(layer.handle.stack, layer.rawPath === '/' ? prefix : prefix + layer.rawPath);
      }
    }
  };
  walk((app as unknown as { router: { stack: StackLayer[] } }).router.stack, '');
  return out;
}

let w: World;
let app: Express;
let f: Fixtures;
/** Ids that exist nowhere, in the same shapes as f's. */
let unknown: Fixtures;
const tokens = {} as Record<Who | 'brack' | 'brackAdmin', string>;

beforeAll(async () => {
  w = await makeWorld();
  // the mail fake's mailbox on, as `npm run dev` has it
  app = createApp({ config: testConfig(w.db.url), dataSource: w.db.dataSource, devMailbox: true });
  Object.assign(tokens, {
    tech: w.tokens.tech,
    planner: w.tokens.planner,
    engineer: w.tokens.engineer,
    admin: w.tokens.admin,
    brack: w.tokens.brackPlanner,
  });
  // a round with a photo announced, and a thermometer biased far enough to open a work order
  const r = await pushRound(w, { bias: { 'TI-102A': 10 }, photos: ['PI-101'] });
  await runAnalysisJob({ dataSource: w.db.dataSource, logger: memoryLogger('silent').logger }, r.roundId);
  const [wo] = (await w.db.dataSource.query(`SELECT "id" FROM "work_orders" WHERE "site_id" = $1 LIMIT 1`, [
    w.fernId,
  ])) as { id: string }[];
  const [route] = (await w.db.dataSource.query(`SELECT "id" FROM "routes" WHERE "site_id" = $1 LIMIT 1`, [
    w.fernId,
  ])) as { id: string }[];
  expect(wo).toBeDefined();
  f = {
    siteId: w.fernId,
    workOrderId: wo.id,
    roundId: r.roundId,
    routeId: route.id,
    photoId: r.photoIds['PI-101'],
    instrumentId: w.inst['TI-102A'],
    tag: 'TI-102A',
    action: 'comment',
    routeVersionId: w.version['boiler-house'],
    email: 'tech@fernhallow.example',
  };
  unknown = {
    siteId: randomUUID(),
    workOrderId: randomUUID(),
    roundId: randomUUID(),
    routeId: randomUUID(),
    photoId: randomUUID(),
    instrumentId: randomUUID(),
    tag: 'TI-909',
    action: 'comment',
    routeVersionId: randomUUID(),
    email: 'nobody.here@fernhallow.example',
  };
  // an admin of Brackenmoor: past every role guard on their own site, a member of no Fernhallow thing
  await addMember(w.db.dataSource, 'brackenmoor', 'admin@brackenmoor.example', 'Lee Harrow', 'admin');
  tokens.brackAdmin = (await signIn(app, 'admin@brackenmoor.example')).accessToken;
});
afterAll(() => w?.db.drop());

function urlOf(key: string, g: Guard, fx: Fixtures = f): { method: string; url: string } {
  const [method, path] = key.split(' ');
  const fill = (s: string) =>
    s.replace(/:(\w+)/g, (_m, name: string) => {
      const which = g.params?.[name] ?? FIXTURE_OF[name];
      if (!which) throw new Error(`${key}: no fixture for :${name}; add it to FIXTURE_OF or to the line's params`);
      return encodeURIComponent(fx[which]);
    });
  return { method, url: fill(path) + (g.query ? `?${fill(g.query)}` : '') };
}

/** The route called with the fixtures `fx` (default Fernhallow's) and, with `withBody`, the line's valid body. */
function call(key: string, g: Guard, token?: string, fx: Fixtures = f, withBody = false) {
  const { method, url } = urlOf(key, g, fx);
  let req = request(app)[method.toLowerCase() as 'get' | 'post' | 'put' | 'patch' | 'delete'](url);
  if (token) req = req.set('Authorization', `Bearer ${token}`);
  if (method !== 'GET' && method !== 'HEAD') req = req.send(withBody && g.body ? g.body(fx) : {});
  return req;
}

function expectPastGuard(key: string, who: string, res: request.Response) {
  const why = `${key} as ${who}: ${res.status} ${JSON.stringify(res.body?.error ?? '')}`;
  if (
    [401, 403].includes(res.status) ||
    res.status >= 500 ||
    (res.status === 404 && GUARD_404.has(res.body?.error?.message))
  ) {
    throw new Error(`expected to get past the guard: ${why}`);
  }
}

test('GUARDS lists exactly the routes the app has (a new route needs its line here)', () => {
  const actual = routesOf(app).sort();
  const listed = Object.keys(GUARDS).sort();
  expect(actual.length).toBeGreaterThan(20);
  expect({
    missingFromTable: actual.filter((r) => !(r in GUARDS)),
    goneFromApp: listed.filter((r) => !actual.includes(r)),
  }).toEqual({
    missingFromTable: [],
    goneFromApp: [],
  });
  // every table line says who may call it
  for (const [k, g] of Object.entries(GUARDS))
    expect({ k, ok: !!g.public || (g.allow?.length ?? 0) > 0 }).toEqual({ k, ok: true });
});

test('the route walker sees a route added later (so the check above can fail)', () => {
  const extra = createApp({ config: testConfig(w.db.url), dataSource: w.db.dataSource });
  const before = routesOf(extra).length;
  // not reachable (after the catch-all); only its presence in the stack matters here
  extra.patch('/api/sites/:siteId/instruments/:id', (_req, res) => void res.end());
  expect(routesOf(extra)).toHaveLength(before + 1);
  expect(routesOf(extra)).toContain('PATCH /api/sites/:siteId/instruments/:id');
});

describe.each(Object.entries(GUARDS))('%s', (key, g) => {
  if (g.public) {
    test('public: answers without a token', async () => {
      const res = await call(key, g);
      expect(res.status).not.toBe(401);
      expect(res.status).toBeLessThan(500);
    });
    test('an id that exists and one that exists nowhere answer byte for byte alike', async () => {
      const known = await call(key, g, undefined, f, true);
      const none = await call(key, g, undefined, unknown, true);
      expect({ status: known.status, body: known.text }).toEqual({ status: none.status, body: none.text });
    });
    return;
  }

  test("Brackenmoor's admin: Fernhallow ids and ids that exist nowhere answer byte for byte alike (all ids, and under their own site id)", async () => {
    const own = (fx: Fixtures): Fixtures => ({ ...fx, siteId: w.brackId });
    for (const [outside, none] of [
      [f, unknown],
      [own(f), own(unknown)],
    ]) {
      // under their own site a route without inner ids makes the same request twice: nothing to compare (its clock fields differ)
      const sameRequest = (x: Fixtures) => JSON.stringify([urlOf(key, g, x), g.body?.(x) ?? null]);
      if (sameRequest(outside) === sameRequest(none)) continue;
      const a = await call(key, g, tokens.brackAdmin, outside, true);
      const b = await call(key, g, tokens.brackAdmin, none, true);
      expect({ key, status: a.status, body: a.text }).toEqual({ key, status: b.status, body: b.text });
      expect(a.status).toBeLessThan(500);
    }
  });

  test('no token or a garbage one → 401 unauthorized', async () => {
    for (const t of [undefined, 'not-a-jwt']) {
      const res = await call(key, g, t);
      expect({ key, status: res.status, code: res.body?.error?.code }).toEqual({
        key,
        status: 401,
        code: 'unauthorized',
      });
    }
  });

  test(`Fernhallow roles: ${g.allow!.join(', ')} get past the guard, the others ${g.denied ?? 403}`, async () => {
    for (const who of ALL) {
      const res = await call(key, g, tokens[who]);
      if (g.allow!.includes(who)) expectPastGuard(key, who, res);
      else {
        const denied = g.denied ?? 403;
        expect({ who, status: res.status, code: res.body?.error?.code }).toEqual({
          who,
          status: denied,
          code: denied === 403 ? 'forbidden' : 'not_found',
        });
      }
    }
  });

  test(`the Brackenmoor planner with Fernhallow ids → ${g.outsider ?? 404}`, async () => {
    const res = await call(key, g, tokens.brack);
    const outsider = g.outsider ?? 404;
    if (outsider === 'allowed') return expectPastGuard(key, 'planner@brackenmoor', res);
    expect(res.status).toBe(outsider);
    if (outsider === 404) {
      // the guard's own 404, not "your work order does not exist" (which would say the site does)
      expect(GUARD_404.has(res.body.error.message)).toBe(true);
    } else expect(res.body.error.code).toBe('forbidden');
  });
});

test('dev-only: without the mail fake GET /api/dev/mailbox is 404 even for an admin', async () => {
  const prod = createApp({ config: testConfig(w.db.url), dataSource: w.db.dataSource, devMailbox: false });
  const res = await request(prod).get('/api/dev/mailbox').set('Authorization', `Bearer ${tokens.admin}`);
  expect(res.status).toBe(404);
  expect(res.body.error.code).toBe('not_found');
});

test('a Fernhallow work order asked for under the Brackenmoor site id → 404 for the Brackenmoor planner too', async () => {
  const res = await request(app)
    .get(`/api/sites/${w.brackId}/work-orders/${f.workOrderId}`)
    .set('Authorization', `Bearer ${tokens.brack}`);
  expect(res.status).toBe(404);
  const round = await request(app)
    .get(`/api/sites/${w.brackId}/rounds/${f.roundId}/analysis`)
    .set('Authorization', `Bearer ${tokens.brack}`);
  expect(round.status).toBe(404);
});
