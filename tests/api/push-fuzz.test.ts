/**
 * POST /api/sync/push under random malformed payloads (fast-check), on a real PostgreSQL.
 *
 * Each run takes a valid batch (one round, two readings, a check answer, a photo; fresh ids) and
 * breaks one thing: a field of the wrong type, a missing field, a string over its limit (up to
 * 200 000 characters), a deep nesting (up to 3000 levels) where a field should be, an
 * out-of-range or non-JSON number (1e400), a value outside its enum, an array over its limit, a
 * body that is not an object, or a body over the 1 MB JSON limit. Expected, as shared/api/sync.ts
 * and server/errors.ts specify (the wire contract, not an outside source):
 *  - 400 `validation` with a detail whose path is the broken field (or below it) and a message
 *    that names that path; 400 `bad_json` for text that is not a JSON object or array;
 *    413 `too_large` over the body limit;
 *  - nothing stored: the row counts of rounds, readings, check_answers and photos are unchanged;
 *  - the server still answers GET /api/health with 200.
 * A second property sends valid batches whose free-text fields hold arbitrary Unicode (control
 * characters, NUL, lone surrogates): 200 or a 400 naming the field, never a 500.
 */
import { randomUUID } from 'node:crypto';
import type { Express } from 'express';
import fc from 'fast-check';
import { fixPropertySeed } from '../helpers/property-seed';
import request from 'supertest';
import { InstrumentEntity, RouteEntity, SiteEntity } from '../../server/entities';
import { demoUser } from '../../server/seed/demo-users';
import { MAX_ANNOUNCED_PHOTO_BYTES, MAX_BATCH_ITEMS } from '../../shared/api/sync';
import { bearer, signIn, testApp } from './helpers/app';
import { createTestDatabase, type TestDb } from './helpers/db';

fixPropertySeed();

jest.setTimeout(120_000);

let db: TestDb;
let app: Express;
let token: string;
let versionId: string;
const inst: Record<string, string> = {};

beforeAll(async () => {
  db = await createTestDatabase();
  app = testApp(db.dataSource, db.url);
  token = (await signIn(app, demoUser('technician', 'fernhallow').email)).accessToken;
  const route = await db.dataSource.getRepository(RouteEntity).findOneByOrFail({ key: 'boiler-house' });
  versionId = route.currentVersionId!;
  const fern = await db.dataSource.getRepository(SiteEntity).findOneByOrFail({ slug: 'fernhallow' });
  for (const i of await db.dataSource.getRepository(InstrumentEntity).find({ relations: { unit: true } })) {
    if (i.unit!.siteId === fern.id) inst[i.tag] = i.id;
  }
});
afterAll(() => db?.drop());

type Json = null | boolean | number | string | Json[] | { [k: string]: Json };
type Batch = { [k: string]: Json };

const now = () => new Date().toISOString();

/** A valid version-2 batch with fresh ids. */
function baseBatch(): Batch {
  const roundId = randomUUID();
  const readingId = randomUUID();
  return {
    payloadVersion: 2,
    deviceId: 'fuzz-phone',
    sentAt: now(),
    rounds: [
      {
        id: roundId,
        routeVersionId: versionId,
        startedAt: now(),
        finishedAt: null,
        status: 'in-progress',
        dismissals: [],
        modelVersion: 'fnv1a64:0123456789abcdef',
      },
    ],
    readings: [
      {
        id: readingId,
        roundId,
        instrumentId: inst['TI-101'],
        valueTyped: 284,
        unit: '°C',
        reference: null,
        deviceTime: now(),
        note: null,
        skipReason: null,
        supersedes: null,
        confirmedAfterFlag: false,
        flags: [],
      },
      {
        id: randomUUID(),
        roundId,
        instrumentId: inst['PI-101'],
        valueTyped: 67,
        unit: 'bar',
        reference: 'gauge',
        deviceTime: now(),
        note: 'steady',
        skipReason: null,
        supersedes: null,
        confirmedAfterFlag: false,
        flags: [],
      },
    ],
    checkAnswers: [
      {
        id: randomUUID(),
        roundId,
        checkId: 'drum-glass-clear',
        answer: { kind: 'yes-no', value: true },
        note: null,
        deviceTime: now(),
      },
    ],
    photos: [
      { id: randomUUID(), roundId, readingId, checkId: null, sha256: 'a'.repeat(64), mime: 'image/jpeg', bytes: 1234 },
    ],
  };
}

const validDismissal: Json = { tag: 'TI-101', flag: 'suspect', note: null, deviceTime: '2025-11-30T07:42:10Z' };
const validFlag: Json = { code: 'out-of-range', message: 'above the gauge range' };

// ---------------------------------------------------------------- mutations

type Expect =
  | { status: 400; code: 'validation'; path: string }
  | { status: 400; code: 'bad_json' }
  | { status: 413; code: 'too_large' };

interface Mutation {
  /** what was done, for the counterexample */
  what: string;
  apply: (b: Batch) => Batch | Json;
  /** a raw JSON token spliced in for the placeholder (numbers JSON.stringify cannot write) */
  raw?: string;
  /** a raw body instead of JSON.stringify of the batch */
  rawBody?: string;
  expect: Expect;
}

const PLACEHOLDER = '__raw_json_token__';
const path = (p: readonly (string | number)[]) => p.join('.');

function setAt(b: Batch, p: readonly (string | number)[], value: Json | undefined): Batch {
  let o = b as unknown as Record<string | number, unknown>;
  for (const k of p.slice(0, -1)) o = o[k] as Record<string | number, unknown>;
  const last = p[p.length - 1];
  if (value === undefined) delete o[last];
  else o[last] = value;
  return b;
}

function nested(depth: number, asArray: boolean): Json {
  let v: Json = 'bottom';
  for (let i = 0; i < depth; i++) v = asArray ? [v] : { a: v };
  return v;
}

const deep = fc.tuple(fc.integer({ min: 20, max: 3000 }), fc.boolean()).map(([d, a]) => nested(d, a));
const jsonNumber = fc.double({ noNaN: true, noDefaultInfinity: true });
const someString = fc.string({ maxLength: 20 });
const someObject = fc.dictionary(
  fc.string({ minLength: 1, maxLength: 5 }),
  fc.oneof(fc.integer(), fc.string({ maxLength: 5 })),
  { maxKeys: 3 },
);
const someArray = fc.array(fc.oneof(fc.integer(), fc.string({ maxLength: 5 })), { maxLength: 3 });

type JsonType = 'string' | 'number' | 'boolean' | 'object' | 'array' | 'null';
/** Values of every JSON type but those listed, and deep nestings (of a type not listed). */
function wrongType(ok: JsonType[]): fc.Arbitrary<Json> {
  const all: [JsonType, fc.Arbitrary<Json>][] = [
    ['string', someString],
    ['number', jsonNumber],
    ['boolean', fc.boolean()],
    ['object', someObject],
    ['array', someArray],
    ['null', fc.constant(null)],
  ];
  const arbs = all.filter(([t]) => !ok.includes(t)).map(([, a]) => a);
  if (!ok.includes('object') && !ok.includes('array')) arbs.push(deep);
  else if (!ok.includes('object')) arbs.push(fc.integer({ min: 20, max: 3000 }).map((d) => nested(d, false)));
  return fc.oneof(...arbs);
}

interface Field {
  at: (string | number)[];
  /** JSON types the field takes (its wrong-type values are the others) */
  types: JsonType[];
  required: boolean;
  /** further invalid values of the right JSON type */
  bad?: fc.Arbitrary<Json>;
  /** a raw token that is not valid for the field (numbers beyond double range) */
  raw?: boolean;
}

const UUID_RE = /^[0-9a-f]{8}-[0-9a-f]{4}-[1-8][0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/i;
const notUuid = fc
  .oneof(
    someString,
    fc.uuid().map((u) => u.slice(0, -1) + 'g'),
    fc.uuid().map((u) => u.replace(/-/g, '')),
  )
  .filter((s) => !UUID_RE.test(s));
const notDateTime = fc.oneof(
  fc.stringMatching(/^[a-zA-Z ]{0,20}$/),
  fc.constantFrom(
    '2025-11-30',
    '2025-11-30T07:42:10',
    '30/11/2025 07:42',
    '2025-13-01T00:00:00Z',
    'yesterday',
    '1732952530',
  ),
);
const tooLong = (max: number) =>
  fc.integer({ min: max + 1, max: Math.max(max + 50, 200_000) }).map((n) => 'x'.repeat(n));
const notIn = (values: string[]) => someString.filter((s) => !values.includes(s));
const copies = (item: Json, min: number, max: number) =>
  fc.integer({ min, max }).map((n) => Array.from({ length: n }, () => item));

const str = (
  at: Field['at'],
  max: number,
  opts: { min1?: boolean; nullable?: boolean; required?: boolean } = {},
): Field => ({
  at,
  types: opts.nullable ? ['string', 'null'] : ['string'],
  required: opts.required ?? true,
  bad: opts.min1 ? fc.oneof(tooLong(max), fc.constant('')) : tooLong(max),
});
const uuid = (at: Field['at'], opts: { nullable?: boolean; required?: boolean } = {}): Field => ({
  at,
  types: opts.nullable ? ['string', 'null'] : ['string'],
  required: opts.required ?? true,
  bad: notUuid,
});
const dateTime = (at: Field['at'], opts: { nullable?: boolean; required?: boolean } = {}): Field => ({
  at,
  types: opts.nullable ? ['string', 'null'] : ['string'],
  required: opts.required ?? true,
  bad: notDateTime,
});

const FIELDS: Field[] = [
  {
    at: ['payloadVersion'],
    types: ['number'],
    required: true,
    bad: fc.oneof(
      fc.integer().filter((n) => n !== 1 && n !== 2),
      jsonNumber.filter((x) => x !== 1 && x !== 2),
      fc.constant('2'),
    ),
  },
  str(['deviceId'], 128, { min1: true }),
  dateTime(['sentAt']),
  // rounds
  { at: ['rounds'], types: ['array'], required: true },
  uuid(['rounds', 0, 'id']),
  uuid(['rounds', 0, 'routeVersionId']),
  dateTime(['rounds', 0, 'startedAt']),
  dateTime(['rounds', 0, 'finishedAt'], { nullable: true, required: false }),
  { at: ['rounds', 0, 'status'], types: ['string'], required: true, bad: notIn(['in-progress', 'finished']) },
  { at: ['rounds', 0, 'dismissals'], types: ['array'], required: true, bad: copies(validDismissal, 501, 600) },
  str(['rounds', 0, 'modelVersion'], 64, { required: false }),
  // readings
  { at: ['readings'], types: ['array'], required: true },
  uuid(['readings', 1, 'id']),
  uuid(['readings', 1, 'roundId']),
  uuid(['readings', 1, 'instrumentId']),
  {
    at: ['readings', 1, 'valueTyped'],
    types: ['number', 'null'],
    required: true,
    raw: true,
    bad: fc.oneof(
      fc.double({ min: 1e12, max: 1e300, minExcluded: true, noNaN: true }),
      fc.double({ min: -1e300, max: -1e12, maxExcluded: true, noNaN: true }),
    ),
  },
  str(['readings', 1, 'unit'], 16, { min1: true }),
  {
    at: ['readings', 1, 'reference'],
    types: ['string', 'null'],
    required: false,
    bad: notIn(['absolute', 'gauge', 'vacuum']),
  },
  dateTime(['readings', 1, 'deviceTime']),
  str(['readings', 1, 'note'], 2000, { nullable: true, required: false }),
  // with a value, any non-empty skip reason is refused (a reading is skipped or read, not both)
  {
    at: ['readings', 1, 'skipReason'],
    types: ['string', 'null'],
    required: false,
    bad: fc.string({ minLength: 1, maxLength: 500 }),
  },
  uuid(['readings', 1, 'supersedes'], { nullable: true, required: false }),
  { at: ['readings', 1, 'confirmedAfterFlag'], types: ['boolean'], required: true },
  { at: ['readings', 1, 'flags'], types: ['array'], required: true, bad: copies(validFlag, 21, 40) },
  // check answers
  { at: ['checkAnswers'], types: ['array'], required: true },
  uuid(['checkAnswers', 0, 'id']),
  uuid(['checkAnswers', 0, 'roundId']),
  str(['checkAnswers', 0, 'checkId'], 64, { min1: true }),
  {
    at: ['checkAnswers', 0, 'answer'],
    types: ['object'],
    required: true,
    bad: fc.oneof(
      notIn(['yes-no', 'choice', 'text']).map((kind): Json => ({ kind, value: true })),
      wrongType(['boolean']).map((value): Json => ({ kind: 'yes-no', value })),
      fc.constant<Json>({ kind: 'choice', value: '' }),
      tooLong(2000).map((value): Json => ({ kind: 'text', value })),
      fc.constant<Json>({ value: true }),
    ),
  },
  str(['checkAnswers', 0, 'note'], 2000, { nullable: true, required: false }),
  dateTime(['checkAnswers', 0, 'deviceTime']),
  // photos
  { at: ['photos'], types: ['array'], required: true },
  uuid(['photos', 0, 'id']),
  uuid(['photos', 0, 'roundId']),
  uuid(['photos', 0, 'readingId'], { nullable: true, required: false }),
  // the photo has a reading: a check id as well is refused
  {
    at: ['photos', 0, 'checkId'],
    types: ['string', 'null'],
    required: false,
    bad: fc.string({ minLength: 1, maxLength: 64 }),
  },
  {
    at: ['photos', 0, 'sha256'],
    types: ['string'],
    required: true,
    bad: fc
      .oneof(someString, fc.constant('A'.repeat(64)), fc.constant('a'.repeat(63)), fc.constant('a'.repeat(65)))
      .filter((s) => !/^[0-9a-f]{64}$/.test(s)),
  },
  {
    at: ['photos', 0, 'mime'],
    types: ['string'],
    required: true,
    bad: notIn(['image/jpeg', 'image/png', 'image/webp', 'image/heic', 'image/heif']),
  },
  {
    at: ['photos', 0, 'bytes'],
    types: ['number'],
    required: true,
    raw: true,
    bad: fc.oneof(
      fc.integer({ max: 0 }),
      fc.double({ min: 1, max: 1e6, noNaN: true }).filter((x) => !Number.isInteger(x)),
      fc.integer({ min: MAX_ANNOUNCED_PHOTO_BYTES + 1, max: 2 ** 53 - 1 }),
    ),
  },
];

function fieldMutation(f: Field): fc.Arbitrary<Mutation> {
  const p = path(f.at);
  const expect: Expect = { status: 400, code: 'validation', path: p };
  const options: fc.Arbitrary<Mutation>[] = [
    wrongType(f.types).map((v) => ({
      what: `${p} = ${JSON.stringify(v).slice(0, 80)}`,
      apply: (b: Batch) => setAt(b, f.at, v),
      expect,
    })),
  ];
  if (f.required)
    options.push(fc.constant({ what: `${p} missing`, apply: (b: Batch) => setAt(b, f.at, undefined), expect }));
  if (f.bad)
    options.push(
      f.bad.map((v) => ({
        what: `${p} = ${JSON.stringify(v).slice(0, 80)}`,
        apply: (b: Batch) => setAt(b, f.at, v),
        expect,
      })),
    );
  if (f.raw) {
    options.push(
      fc
        .constantFrom('1e400', '-1e400', '1e999999')
        .map((raw) => ({ what: `${p} = ${raw}`, apply: (b: Batch) => setAt(b, f.at, PLACEHOLDER), raw, expect })),
    );
  }
  return fc.oneof(...options);
}

const ARRAYS = ['rounds', 'readings', 'checkAnswers', 'photos'] as const;

const mutation: fc.Arbitrary<Mutation> = fc.oneof(
  { weight: 12, arbitrary: fc.constantFrom(...FIELDS).chain(fieldMutation) },
  // a reading with neither a value nor a skip reason
  {
    weight: 1,
    arbitrary: fc.constantFrom<Json>(null, '').map((skip) => ({
      what: `readings.1.valueTyped = null, skipReason = ${JSON.stringify(skip)}`,
      apply: (b: Batch) => setAt(setAt(b, ['readings', 1, 'valueTyped'], null), ['readings', 1, 'skipReason'], skip),
      expect: { status: 400, code: 'validation', path: 'readings.1.skipReason' } as Expect,
    })),
  },
  // one array over the batch limit
  {
    weight: 1,
    arbitrary: fc
      .tuple(fc.constantFrom(...ARRAYS), fc.integer({ min: MAX_BATCH_ITEMS + 1, max: MAX_BATCH_ITEMS + 100 }))
      .map(([key, n]) => ({
        what: `${key} × ${n}`,
        apply: (b: Batch) => ({ ...b, [key]: Array.from({ length: n }, () => (b[key] as Json[])[0]) }),
        expect: { status: 400, code: 'validation', path: key } as Expect,
      })),
  },
  // all arrays together over the limit, each under it
  {
    weight: 1,
    arbitrary: fc.integer({ min: 1, max: 50 }).map((extra) => ({
      what: `readings + check answers = ${MAX_BATCH_ITEMS + extra}`,
      apply: (b: Batch) => ({
        ...b,
        readings: Array.from({ length: 1000 }, () => (b.readings as Json[])[0]),
        checkAnswers: Array.from({ length: MAX_BATCH_ITEMS - 1000 + extra - 2 }, () => (b.checkAnswers as Json[])[0]),
      }),
      expect: { status: 400, code: 'validation', path: '(body)' } as Expect,
    })),
  },
  // a body that is not an object
  {
    weight: 1,
    arbitrary: fc
      .oneof(
        someArray,
        deep.map((d) => [d]),
      )
      .map((body) => ({
        what: `body ${JSON.stringify(body).slice(0, 40)}`,
        apply: () => body as Json,
        expect: { status: 400, code: 'validation', path: '(body)' } as Expect,
      })),
  },
  {
    weight: 1,
    arbitrary: fc
      .oneof(
        jsonNumber.map(String),
        someString.map((s) => JSON.stringify(s)),
        fc.constantFrom('null', 'true', '{"payloadVersion": 2,', '{]', "{'a': 1}"),
      )
      .map((rawBody) => ({
        what: `raw body ${rawBody.slice(0, 40)}`,
        apply: (b: Batch) => b,
        rawBody,
        expect: { status: 400, code: 'bad_json' } as Expect,
      })),
  },
  // over the 1 MB body limit
  {
    weight: 1,
    arbitrary: fc.integer({ min: 1_100_000, max: 1_500_000 }).map((n) => ({
      what: `note of ${n} characters`,
      apply: (b: Batch) => setAt(b, ['readings', 0, 'note'], 'x'.repeat(n)),
      expect: { status: 413, code: 'too_large' } as Expect,
    })),
  },
);

// ---------------------------------------------------------------- checks

async function storedCounts(): Promise<Record<string, number>> {
  const [row] = (await db.dataSource.query(
    `SELECT (SELECT count(*) FROM rounds)::int AS rounds, (SELECT count(*) FROM readings)::int AS readings,
            (SELECT count(*) FROM check_answers)::int AS "checkAnswers", (SELECT count(*) FROM photos)::int AS photos`,
  )) as Record<string, number>[];
  return row;
}

function bodyOf(m: Mutation): string {
  if (m.rawBody !== undefined) return m.rawBody;
  const text = JSON.stringify(m.apply(baseBatch()));
  return m.raw ? text.replace(`"${PLACEHOLDER}"`, m.raw) : text;
}

const post = (body: string) =>
  request(app).post('/api/sync/push').set(bearer(token)).set('Content-Type', 'application/json').send(body);

test('the unbroken batch is accepted (200), so each refusal below is the mutation’s doing', async () => {
  const res = await post(JSON.stringify(baseBatch()));
  expect(res.status).toBe(200);
  expect(res.body.applied).toEqual({ rounds: 1, readings: 2, checkAnswers: 1, photos: 1 });
});

test('malformed pushes: 400 naming the field (413 over the body limit), nothing stored, the server stays healthy', async () => {
  await fc.assert(
    fc.asyncProperty(mutation, async (m) => {
      const before = await storedCounts();
      const res = await post(bodyOf(m));
      const e = m.expect;
      expect({ what: m.what, status: res.status, code: res.body?.error?.code }).toEqual({
        what: m.what,
        status: e.status,
        code: e.code,
      });
      if (e.code === 'validation') {
        const details = res.body.error.details as { path: string; message: string }[];
        const hit = details.find((d) => d.path === e.path || d.path.startsWith(`${e.path}.`));
        expect({ what: m.what, hit: hit !== undefined, details: hit ? [] : details.slice(0, 3) }).toEqual({
          what: m.what,
          hit: true,
          details: [],
        });
        expect(res.body.error.message).toContain(`${hit!.path}: `);
      }
      expect(await storedCounts()).toEqual(before);
      expect((await request(app).get('/api/health')).status).toBe(200);
    }),
    { numRuns: 60 },
  );
});

/** Arbitrary Unicode, with control characters, NUL and lone surrogates made likely. */
const anyText = (max: number) =>
  fc.oneof(
    fc.string({ unit: 'binary', maxLength: max }),
    fc
      .array(
        fc.constantFrom(
          '\u0000',
          '\u0001',
          '\u001f',
          '\u007f',
          '\ud800',
          '\udfff',
          '\ufeff',
          '\u2028',
          'é',
          '🔥',
          ' ',
          'a',
        ),
        { maxLength: 12 },
      )
      .map((a) => a.join('')),
  );

/** Where each free-text field is stored: table, column, and the id of its row in the batch. */
const STORED: Record<string, { sql: string; id: (b: Batch) => string }> = {
  deviceId: { sql: 'SELECT device_id AS v FROM rounds WHERE id = $1', id: (b) => (b.rounds as { id: string }[])[0].id },
  'rounds.0.modelVersion': {
    sql: 'SELECT device_model_version AS v FROM rounds WHERE id = $1',
    id: (b) => (b.rounds as { id: string }[])[0].id,
  },
  'readings.1.note': {
    sql: 'SELECT note AS v FROM readings WHERE id = $1',
    id: (b) => (b.readings as { id: string }[])[1].id,
  },
  'checkAnswers.0.note': {
    sql: 'SELECT note AS v FROM check_answers WHERE id = $1',
    id: (b) => (b.checkAnswers as { id: string }[])[0].id,
  },
};
/** A lone UTF-16 surrogate (in u-mode a pair is one code point and does not match). */
const LONE_SURROGATE = /[\ud800-\udfff]/u;

test('free text with arbitrary Unicode (NUL, control characters, lone surrogates): stored as sent, or 400 naming the field; never 500', async () => {
  await fc.assert(
    fc.asyncProperty(
      fc.constantFrom(
        ['deviceId'],
        ['readings', 1, 'note'],
        ['checkAnswers', 0, 'note'],
        ['rounds', 0, 'modelVersion'],
      ),
      anyText(40),
      async (at, text) => {
        const value = at[0] === 'deviceId' ? `x${text}` : text;
        const b = setAt(baseBatch(), at, value);
        const before = await storedCounts();
        const res = await post(JSON.stringify(b));
        expect({ at: path(at), text, status: res.status === 200 || res.status === 400 ? 'ok' : res.status }).toEqual({
          at: path(at),
          text,
          status: 'ok',
        });
        if (res.status === 400) {
          expect((res.body.error.details as { path: string }[]).map((d) => d.path)).toContain(path(at));
          expect(await storedCounts()).toEqual(before);
        } else {
          // a lone surrogate has no UTF-8 form: it is refused (server/http/text-guard.ts), never
          // stored as U+FFFD; anything accepted comes back as sent
          expect({ at: path(at), text, lone: LONE_SURROGATE.test(value) }).toEqual({ at: path(at), text, lone: false });
          const s = STORED[path(at)];
          const [row] = (await db.dataSource.query(s.sql, [s.id(b)])) as { v: string }[];
          expect({ at: path(at), stored: row.v }).toEqual({ at: path(at), stored: value });
        }
        expect((await request(app).get('/api/health')).status).toBe(200);
      },
    ),
    { numRuns: 60 },
  );
});
