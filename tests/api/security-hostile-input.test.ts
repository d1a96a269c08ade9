/**
 * Hostile input in every free-text field a user sends (OWASP Input Validation / SQL Injection
 * Prevention / XSS Prevention Cheat Sheets): SQL, markup, bidirectional overrides and NUL
 * characters are data. Each is stored verbatim as text and comes back unchanged in JSON (the
 * app renders text, never HTML), the tables stay as they were; a NUL, which PostgreSQL text cannot
 * hold, is refused with a 400 naming the field (never a 500). Path traversal in photo ids and
 * upload file names → 400/404 and nothing written outside the photo folder. JSON bodies over the
 * limit → 413 in the error shape. CSV: tests/api/exports-csv.test.ts covers notes and an "="
 * cancel reason; here skip reasons and a "+" cancel reason.
 */
import { createHash } from 'node:crypto';
import { mkdirSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { Express } from 'express';
import sharp from 'sharp';
import request from 'supertest';
import { runAnalysisJob } from '../../server/analysis/job';
import { hashPassword } from '../../server/auth/passwords';
import { UserEntity } from '../../server/entities';
import { createApp, JSON_BODY_LIMIT } from '../../server/app';
import { memoryLogger, testConfig } from './helpers/app';
import { designRound, makeWorld, parseCsv, pushRound, type World } from './analysis-helpers';

const HOSTILE = [
  `'; drop table readings; --`,
  `Robert'); DROP TABLE users; --`,
  `1' OR '1'='1`,
  `<script>alert(1)</script>`,
  `"><img src=x onerror=alert(1)>`,
  `\u202Egnp.exe\u202C right-to-left override`, // U+202E RIGHT-TO-LEFT OVERRIDE (Unicode Bidirectional Algorithm, UAX #9)
  `\u05e9\u05dc\u05d5\u05dd \u0645\u0631\u062d\u0628\u0627 mixed RTL`,
  `\${7*7} {{7*7}} %s %n \\ \\\\ \` $1`,
  `emoji 🔥 and combining e\u0301`,
];
const NUL = 'before\u0000after';

/**
 * PostgreSQL text and jsonb cannot hold U+0000 (SQLSTATE 22021 / 22P05): a NUL is refused at the
 * edge (server/http/text-guard.ts, after express.json) with a 400 naming the field — it was a 500.
 */

let w: World;
let app: Express;
let photoDir: string;
let woIds: string[];
const auth = (who: keyof World['tokens']) => ({ Authorization: `Bearer ${w.tokens[who]}` });
const base = () => `/api/sites/${w.fernId}`;

async function schema(): Promise<string> {
  const rows = (await w.db.dataSource.query(
    `SELECT table_name, count(*)::int AS cols FROM information_schema.columns WHERE table_schema = 'public' GROUP BY table_name ORDER BY table_name`,
  )) as { table_name: string; cols: number }[];
  return JSON.stringify(rows);
}
const count = async (table: string) =>
  ((await w.db.dataSource.query(`SELECT count(*)::int AS n FROM "${table}"`)) as { n: number }[])[0].n;

let schemaBefore: string;
let usersBefore: number;

beforeAll(async () => {
  w = await makeWorld();
  photoDir = path.join(mkdtempSync(path.join(tmpdir(), 'tr-hostile-')), 'photos');
  mkdirSync(photoDir);
  // the per-address sign-in limiter out of the way: the hostile passwords below are many failures
  app = createApp({
    config: testConfig(w.db.url, { PHOTO_DIR: photoDir, SIGN_IN_RATE_LIMIT: '100000' }),
    dataSource: w.db.dataSource,
  });
  // a user of this file for the failed sign-ins (the demo users are never locked out)
  await w.db.dataSource.getRepository(UserEntity).save({
    email: 'hostile.target@fernhallow.example',
    name: 'Target',
    passwordHash: await hashPassword('not one of the hostile strings'),
    disabled: false,
  });
  const deps = { dataSource: w.db.dataSource, logger: memoryLogger('silent').logger };
  // work orders to comment on and cancel: gross errors on two thermometers, in two rounds
  for (const tag of ['TI-102A', 'TI-201']) {
    const r = await pushRound(w, { bias: { [tag]: 12 } });
    await runAnalysisJob(deps, r.roundId);
  }
  woIds = (
    (await w.db.dataSource.query(`SELECT "id" FROM "work_orders" WHERE "site_id" = $1 ORDER BY "number"`, [
      w.fernId,
    ])) as { id: string }[]
  ).map((r) => r.id);
  expect(woIds.length).toBeGreaterThanOrEqual(2);
  schemaBefore = await schema();
  usersBefore = await count('users');
});
afterAll(async () => {
  await w?.db.drop();
  if (photoDir) rmSync(path.dirname(photoDir), { recursive: true, force: true });
});

afterEach(async () => {
  // whatever a test sent, every table and column is still there
  expect(await schema()).toBe(schemaBefore);
  expect(await count('readings')).toBeGreaterThan(0);
});

describe('work orders', () => {
  test('comments: each hostile string stored verbatim and returned unchanged in the detail JSON', async () => {
    for (const s of HOSTILE) {
      const res = await request(app)
        .post(`${base()}/work-orders/${woIds[0]}/comment`)
        .set(auth('planner'))
        .send({ comment: s });
      expect({ s, status: res.status }).toEqual({ s, status: 200 });
    }
    const detail = await request(app).get(`${base()}/work-orders/${woIds[0]}`).set(auth('engineer'));
    const comments = (detail.body.events as { comment: string | null }[])
      .map((e) => e.comment)
      .filter((c) => c !== null);
    for (const s of HOSTILE) expect(comments).toContain(s);
    expect(detail.headers['content-type']).toMatch(/^application\/json/);
    const stored = (await w.db.dataSource.query(`SELECT "comment" FROM "work_order_events" WHERE "comment" = $1`, [
      HOSTILE[0],
    ])) as unknown[];
    expect(stored).toHaveLength(1);
  });

  test('a comment with a NUL → 400 naming comment, nothing stored', async () => {
    const before = await count('work_order_events');
    const res = await request(app)
      .post(`${base()}/work-orders/${woIds[0]}/comment`)
      .set(auth('planner'))
      .send({ comment: NUL });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/comment/);
    expect(await count('work_order_events')).toBe(before);
  });

  test('a comment with a lone UTF-16 surrogate (valid JSON, no UTF-8 form) → 400 naming comment, not stored as U+FFFD', async () => {
    const before = await count('work_order_events');
    const body = '{"comment":"gauge \\ud800 face"}'; // JSON text with the escape, as a client could send it
    const res = await request(app)
      .post(`${base()}/work-orders/${woIds[0]}/comment`)
      .set(auth('planner'))
      .set('content-type', 'application/json')
      .send(body);
    expect(res.status).toBe(400);
    expect(res.body.error.message).toBe(
      'Invalid request body: comment: must be well-formed Unicode (a lone surrogate such as \\ud800 cannot be stored)',
    );
    expect(await count('work_order_events')).toBe(before);
  });

  test('cancel reason: every hostile string in one reason, verbatim in JSON; the CSV export quotes off its leading "+"', async () => {
    const reason = `+${HOSTILE.join(' | ')}`;
    const res = await request(app).post(`${base()}/work-orders/${woIds[1]}/cancel`).set(auth('admin')).send({ reason });
    expect(res.status).toBe(200);
    expect(res.body.cancelReason ?? res.body.workOrder?.cancelReason).toBe(reason);
    const list = await request(app).get(`${base()}/work-orders?status=cancelled`).set(auth('planner'));
    expect(list.body.items.find((i: { id: string }) => i.id === woIds[1]).cancelReason).toBe(reason);
    // OWASP "CSV Injection": a text cell starting with + gets a leading single quote
    const csv = await request(app).get(`${base()}/exports/work-orders.csv`).set(auth('planner'));
    const rows = parseCsv(csv.text);
    const col = rows[0].indexOf('cancel_reason');
    expect(rows.map((r) => r[col])).toContain(`'${reason}`);
  });

  test('text search and filters: SQL and LIKE wildcards are text ("%" and "_" match themselves), bad filter values → 400 naming them', async () => {
    const all = await request(app).get(`${base()}/work-orders`).set(auth('planner'));
    expect(all.body.total).toBeGreaterThan(0);
    for (const q of [...HOSTILE, '%', '_', `%' OR 1=1 --`]) {
      const res = await request(app).get(`${base()}/work-orders`).query({ q }).set(auth('planner'));
      expect({ q, status: res.status, total: res.body.total }).toEqual({ q, status: 200, total: 0 });
    }
    const tag = await request(app).get(`${base()}/work-orders`).query({ tag: `TI' OR '1'='1` }).set(auth('planner'));
    expect(tag.status).toBe(200);
    expect(tag.body.total).toBe(0);
    for (const [field, value] of [
      ['status', `open'; --`],
      ['sort', 'number; drop table readings'],
      ['unitId', `' OR 1=1`],
      ['priority', '1 OR 1=1'],
      ['limit', '1;'],
    ]) {
      const res = await request(app)
        .get(`${base()}/work-orders`)
        .query({ [field]: value })
        .set(auth('planner'));
      expect({ field, status: res.status }).toEqual({ field, status: 400 });
      expect(res.body.error.details.map((d: { path: string }) => d.path.split('.')[0])).toContain(field);
    }
    const inst = await request(app).get(`${base()}/instruments`).query({ q: `%' OR '1'='1` }).set(auth('planner'));
    expect(inst.status).toBe(200);
  });

  test('a search or filter with a NUL → 400 naming it, not a 500', async () => {
    for (const field of ['q', 'tag']) {
      const res = await request(app)
        .get(`${base()}/work-orders`)
        .query({ [field]: NUL })
        .set(auth('planner'));
      expect({ field, status: res.status }).toEqual({ field, status: 400 });
      expect(res.body.error.message).toContain(field);
    }
  });
});

describe('rounds pushed from the phone', () => {
  test('skip reasons, reading notes and dismissal notes: stored verbatim; skip reasons quoted off in readings.csv', async () => {
    const r = designRound(w, {});
    const [a, b, c] = r.body.readings;
    const skipped = new Map<string, string>();
    // one skip reason per hostile string, on as many readings; those starting like a formula test the CSV
    const reasons = [...HOSTILE, '@SUM(1+1)*cmd|" /C calc"!A0', '-2+3', '+1'];
    reasons.forEach((s, i) => {
      const reading = r.body.readings[3 + i];
      reading.valueTyped = null;
      reading.skipReason = s;
      skipped.set(reading.id, s);
    });
    a.note = HOSTILE[0];
    b.note = HOSTILE[3];
    c.note = HOSTILE[5];
    r.body.rounds[0].dismissals = HOSTILE.map((note) => ({
      flag: 'out-of-range',
      tag: 'PI-101',
      note,
      deviceTime: r.body.sentAt,
    }));
    const res = await request(app).post('/api/sync/push').set(auth('tech')).send(r.body);
    expect(res.status).toBe(200);
    const rows = (await w.db.dataSource.query(
      `SELECT "id", "note", "skip_reason" FROM "readings" WHERE "round_id" = $1`,
      [r.roundId],
    )) as {
      id: string;
      note: string | null;
      skip_reason: string | null;
    }[];
    for (const [id, s] of skipped) expect(rows.find((x) => x.id === id)!.skip_reason).toBe(s);
    expect(rows.find((x) => x.id === a.id)!.note).toBe(HOSTILE[0]);
    expect(rows.find((x) => x.id === c.id)!.note).toBe(HOSTILE[5]);
    const [round] = (await w.db.dataSource.query(`SELECT "dismissals" FROM "rounds" WHERE "id" = $1`, [r.roundId])) as {
      dismissals: { note: string }[];
    }[];
    expect(round.dismissals.map((d) => d.note)).toEqual(HOSTILE);

    const csv = await request(app).get(`${base()}/exports/readings.csv`).set(auth('engineer'));
    const table = parseCsv(csv.text);
    const col = table[0].indexOf('skip_reason');
    const cells = table.map((row) => row[col]);
    expect(cells).toContain(`'@SUM(1+1)*cmd|" /C calc"!A0`);
    expect(cells).toContain(`'-2+3`);
    expect(cells).toContain(`'+1`);
    expect(cells).toContain(HOSTILE[3]); // markup is not a formula: left as it is
  });

  test('a NUL in a skip reason, a note or a dismissal note → 400 naming the field; nothing of the batch stored', async () => {
    const cases: [string, (r: ReturnType<typeof designRound>) => void, RegExp][] = [
      [
        'skipReason',
        (r) => Object.assign(r.body.readings[0], { valueTyped: null, skipReason: NUL }),
        /readings\.0\.skipReason/,
      ],
      ['note', (r) => Object.assign(r.body.readings[1], { note: NUL }), /readings\.1\.note/],
      [
        'dismissal note',
        (r) => (r.body.rounds[0].dismissals = [{ flag: 'out-of-range', note: NUL, deviceTime: r.body.sentAt }]),
        /rounds\.0\.dismissals\.0\.note/,
      ],
    ];
    for (const [what, mutate, where] of cases) {
      const r = designRound(w, {});
      mutate(r);
      const res = await request(app).post('/api/sync/push').set(auth('tech')).send(r.body);
      expect({ what, status: res.status }).toEqual({ what, status: 400 });
      expect(res.body.error.message).toMatch(where);
      expect(await w.db.dataSource.query(`SELECT 1 FROM "rounds" WHERE "id" = $1`, [r.roundId])).toEqual([]);
    }
  });
});

describe('invitations and sign-in', () => {
  test('invitation names: each hostile string verbatim in the answer and in the members list', async () => {
    const names = HOSTILE.map((s, i) => [`hostile-${i}@fernhallow.example`, s] as const);
    for (const [email, name] of names) {
      const res = await request(app)
        .post(`${base()}/invitations`)
        .set(auth('admin'))
        .send({ email, name, role: 'technician' });
      expect({ name, status: res.status, back: res.body.name }).toEqual({ name, status: 201, back: name });
    }
    const members = await request(app).get(`${base()}/members`).set(auth('admin'));
    for (const [email, name] of names)
      expect(members.body.members.find((m: { email: string }) => m.email === email).name).toBe(name);
    expect(await count('users')).toBe(usersBefore + names.length);
  });

  test('an invitation name with a NUL → 400 naming name', async () => {
    const res = await request(app)
      .post(`${base()}/invitations`)
      .set(auth('admin'))
      .send({ email: 'nul-name@fernhallow.example', name: NUL, role: 'technician' });
    expect(res.status).toBe(400);
    expect(res.body.error.details.map((d: { path: string }) => d.path)).toContain('name');
  });

  test('sign-in e-mail: SQL or markup → 400 naming email (not an e-mail address); a hostile password → 401; a NUL → 400 or 401, never 500', async () => {
    for (const email of [
      `' OR 1=1 --`,
      `admin@fernhallow.example' --`,
      `<script>alert(1)</script>@x.example`,
      `"><img src=x onerror=alert(1)>`,
    ]) {
      const res = await request(app).post('/api/auth/sign-in').send({ email, password: 'x' });
      expect({ email, status: res.status, path: res.body.error.details?.[0]?.path }).toEqual({
        email,
        status: 400,
        path: 'email',
      });
    }
    for (const password of HOSTILE) {
      const res = await request(app)
        .post('/api/auth/sign-in')
        .send({ email: 'hostile.target@fernhallow.example', password });
      expect(res.status).toBe(401);
    }
    expect(await count('users')).toBe(usersBefore + HOSTILE.length); // the invitations above, nothing more, nothing less
    // nine failures so far: forget them, so the next one is not the lockout's tenth (server/auth/lockout.ts)
    await w.db.dataSource
      .getRepository(UserEntity)
      .update({ email: 'hostile.target@fernhallow.example' }, { failedSignIns: 0, failedSignInsSince: null });
    for (const body of [
      { email: `hostile.target@fernhallow.example${'\u0000'}`, password: 'x' },
      { email: 'hostile.target@fernhallow.example', password: NUL },
    ]) {
      const res = await request(app).post('/api/auth/sign-in').send(body);
      expect([400, 401]).toContain(res.status);
    }
  });
});

describe('path traversal', () => {
  test('photo ids that are paths → 400 naming id (or 404 when they do not reach the route), never a file', async () => {
    for (const id of [
      '..%2F..%2Fetc%2Fpasswd',
      '%2Fetc%2Fpasswd',
      '..%5C..%5Cwindows',
      '%2e%2e%2f%2e%2e%2fetc%2fpasswd',
      'C:%5Cboot.ini',
      '..',
    ]) {
      for (const suffix of ['', '/thumb']) {
        const res = await request(app).get(`/api/photos/${id}${suffix}`).set(auth('tech'));
        expect({ id, status: res.status }).toEqual({ id, status: 400 });
        expect(res.body.error.details).toEqual([{ path: 'id', message: 'Must be a photo UUID' }]);
      }
      const up = await request(app)
        .post(`/api/photos/${id}`)
        .set(auth('tech'))
        .attach('photo', Buffer.from('x'), 'x.jpg');
      expect({ id, status: up.status }).toEqual({ id, status: 400 });
    }
    // unencoded ../ segments never reach the photo route: a 404 in the error shape, no file
    const raw = await request(app).get('/api/photos/../../etc/passwd').set(auth('tech'));
    expect([400, 404]).toContain(raw.status);
    expect(raw.text).not.toMatch(/root:/);
  });

  test('an upload whose file name is a path is stored under the photo id inside the photo folder only', async () => {
    const jpeg = await sharp({ create: { width: 64, height: 48, channels: 3, background: '#336699' } })
      .jpeg()
      .toBuffer();
    const parent = path.dirname(photoDir);
    const names = ['../../evil.jpg', '/tmp/evil-absolute.jpg', '..\\..\\evil-win.jpg'];
    const r = designRound(w, { photos: ['PI-101', 'TI-102A', 'TI-102B'] });
    for (const p of r.body.photos)
      Object.assign(p, { sha256: createHash('sha256').update(jpeg).digest('hex'), bytes: jpeg.length });
    expect((await request(app).post('/api/sync/push').set(auth('tech')).send(r.body)).status).toBe(200);
    const before = readdirSync(parent);
    for (const [i, p] of r.body.photos.entries()) {
      const res = await request(app)
        .post(`/api/photos/${p.id}`)
        .set(auth('tech'))
        .attach('photo', jpeg, { filename: names[i], contentType: 'image/jpeg' });
      expect({ name: names[i], status: res.status }).toEqual({ name: names[i], status: 201 });
    }
    expect(readdirSync(parent)).toEqual(before);
    const all = (readdirSync(photoDir, { recursive: true }) as string[]).map(String);
    expect(all.some((f) => /evil/.test(f))).toBe(false);
    expect(readdirSync(tmpdir()).some((f) => f === 'evil-absolute.jpg')).toBe(false);
    // each photo is served back by its id
    expect((await request(app).get(`/api/photos/${r.body.photos[0].id}`).set(auth('planner'))).status).toBe(200);
  });
});

describe(`JSON bodies over the limit (${JSON_BODY_LIMIT})`, () => {
  test('413 too_large in the error shape, on sign-in, push and a work-order comment; the limit is in details', async () => {
    const big = 'x'.repeat(1024 * 1024 + 10);
    const calls = [
      request(app).post('/api/auth/sign-in').send({ email: 'tech@fernhallow.example', password: big }),
      request(app).post('/api/sync/push').set(auth('tech')).send({ payloadVersion: 2, pad: big }),
      request(app).post(`${base()}/work-orders/${woIds[0]}/comment`).set(auth('planner')).send({ comment: big }),
    ];
    for (const res of await Promise.all(calls)) {
      expect(res.status).toBe(413);
      expect(res.body).toEqual({
        error: {
          code: 'too_large',
          message: expect.stringMatching(/limit of 1048576 bytes/),
          details: { limit: 1048576 },
        },
      });
    }
  });
});
