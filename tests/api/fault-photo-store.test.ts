/**
 * Fault: the photo store cannot take the bytes — a disk that is full (ENOSPC, POSIX errno) and a
 * photo folder that cannot be made (PHOTO_DIR below a regular file: ENOTDIR). The upload answers
 * with the error shape, 507 Insufficient Storage for a full store (RFC 4918 §11.5) and 503 for one
 * that cannot be written (RFC 9110 §15.6.4, with Retry-After), naming the photo; the round and its
 * readings pushed before stay stored; once the store works again the same upload succeeds and the
 * photo is there once (row stored, one photo file, one thumbnail, no temporary file left).
 */
import { createHash, randomUUID } from 'node:crypto';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { Express } from 'express';
import sharp from 'sharp';
import request from 'supertest';
import { ApiError } from '../../shared/api/errors';
import type { PushRequestV2 } from '../../shared/api/sync';
import { createApp } from '../../server/app';
import { demoUser } from '../../server/seed/demo-users';
import { LocalPhotoStore } from '../../server/uploads/local-store';
import type { PhotoStore } from '../../server/uploads/store';
import { bearer, signIn, testConfig } from './helpers/app';
import { createTestDatabase, type TestDb } from './helpers/db';
import { buildRound, roundMaker } from './fault-helpers';

jest.setTimeout(60_000);

let db: TestDb;
let dir: string;
let token: string;
let m: Awaited<ReturnType<typeof roundMaker>>;

beforeAll(async () => {
  db = await createTestDatabase();
  dir = mkdtempSync(path.join(tmpdir(), 'tr-fault-photos-'));
  m = await roundMaker(db.dataSource);
});
afterAll(async () => {
  await db?.drop();
  if (dir) rmSync(dir, { recursive: true, force: true });
});

const jpeg = (seed: number) =>
  sharp({ create: { width: 64, height: 48, channels: 3, background: { r: seed % 255, g: 90, b: 30 } } })
    .jpeg()
    .toBuffer();

/** Pushes a 41-reading round whose first reading carries a photo of `bytes`; returns the ids. */
async function pushWithPhoto(app: Express, bytes: Buffer) {
  const r = buildRound(m);
  const photoId = randomUUID();
  const first = r.body.readings[0];
  const body: PushRequestV2 = {
    ...r.body,
    photos: [
      {
        id: photoId,
        roundId: r.roundId,
        readingId: first.id,
        checkId: null,
        sha256: createHash('sha256').update(bytes).digest('hex'),
        mime: 'image/jpeg',
        bytes: bytes.length,
      },
    ],
  };
  const res = await request(app).post('/api/sync/push').set(bearer(token)).send(body);
  expect(res.status).toBe(200);
  expect(res.body.photosWanted).toEqual([photoId]);
  return { roundId: r.roundId, photoId, readings: body.readings.length };
}

const upload = (app: Express, id: string, bytes: Buffer) =>
  request(app)
    .post(`/api/photos/${id}`)
    .set(bearer(token))
    .attach('photo', bytes, { filename: 'gauge.jpg', contentType: 'image/jpeg' });

async function dbState(roundId: string, photoId: string) {
  const [round] = (await db.dataSource.query(`SELECT count(*)::int AS n FROM rounds WHERE id = $1`, [roundId])) as {
    n: number;
  }[];
  const [readings] = (await db.dataSource.query(`SELECT count(*)::int AS n FROM readings WHERE round_id = $1`, [
    roundId,
  ])) as { n: number }[];
  const photos = (await db.dataSource.query(
    `SELECT status::text AS status, storage_key, thumb_key FROM photos WHERE id = $1`,
    [photoId],
  )) as {
    status: string;
    storage_key: string | null;
    thumb_key: string | null;
  }[];
  return { rounds: round.n, readings: readings.n, photos };
}

/** Every file under `root` whose name holds `id`, relative. */
function filesOf(root: string, id: string): string[] {
  if (!existsSync(root)) return [];
  return (readdirSync(root, { recursive: true }) as string[]).filter((f) => f.includes(id)).sort();
}

test('a full photo store (ENOSPC): 507 naming the photo, round and readings kept; after space is freed the retry stores it once', async () => {
  const root = path.join(dir, 'full');
  const disk = new LocalPhotoStore(root);
  let full = true;
  const store: PhotoStore = {
    put: async (key, bytes, mime) => {
      if (full)
        throw Object.assign(new Error(`ENOSPC: no space left on device, write '${key}'`), {
          code: 'ENOSPC',
          errno: -28,
        });
      return disk.put(key, bytes, mime);
    },
    get: (key) => disk.get(key),
    has: (key) => disk.has(key),
  };
  const app = createApp({
    config: testConfig(db.url, { PHOTO_DIR: root }),
    dataSource: db.dataSource,
    photoStore: store,
  });
  token = (await signIn(app, demoUser('technician', 'fernhallow').email)).accessToken;
  const bytes = await jpeg(1);
  const p = await pushWithPhoto(app, bytes);

  const res = await upload(app, p.photoId, bytes);
  expect(res.status).toBe(507);
  const err = ApiError.parse(res.body).error;
  expect(err.code).toBe('storage_unavailable');
  expect(err.message).toContain(`Photo ${p.photoId}`);
  expect(err.message).toMatch(/full/);
  expect(err.details).toEqual({ photoId: p.photoId, reason: 'ENOSPC' });
  expect(await dbState(p.roundId, p.photoId)).toEqual({
    rounds: 1,
    readings: p.readings,
    photos: [{ status: 'pending', storage_key: null, thumb_key: null }],
  });
  expect(filesOf(root, p.photoId)).toEqual([]);

  full = false;
  const ok = await upload(app, p.photoId, bytes);
  expect(ok.status).toBe(201);
  expect(ok.body.created).toBe(true);
  const again = await upload(app, p.photoId, bytes);
  expect(again.status).toBe(200);
  expect(again.body.created).toBe(false);
  expect(await dbState(p.roundId, p.photoId)).toEqual({
    rounds: 1,
    readings: p.readings,
    photos: [{ status: 'stored', storage_key: `photos/${p.photoId}.jpg`, thumb_key: `thumbs/${p.photoId}.jpg` }],
  });
  expect(filesOf(root, p.photoId)).toEqual([`photos/${p.photoId}.jpg`, `thumbs/${p.photoId}.jpg`]);
});

test('a photo folder that cannot be written (PHOTO_DIR below a regular file, ENOTDIR): 503 with Retry-After; once it is a folder the retry succeeds', async () => {
  const parent = path.join(dir, 'not-a-folder');
  writeFileSync(parent, 'a file where the photo folder should be');
  const root = path.join(parent, 'photos');
  const app = createApp({ config: testConfig(db.url, { PHOTO_DIR: root }), dataSource: db.dataSource });
  const bytes = await jpeg(2);
  const p = await pushWithPhoto(app, bytes);

  const res = await upload(app, p.photoId, bytes);
  expect(res.status).toBe(503);
  expect(res.headers['retry-after']).toBe('5');
  const err = ApiError.parse(res.body).error;
  expect(err.code).toBe('storage_unavailable');
  expect(err.message).toContain(`Photo ${p.photoId} was not stored: the photo store cannot be written (ENOTDIR)`);
  expect(await dbState(p.roundId, p.photoId)).toEqual({
    rounds: 1,
    readings: p.readings,
    photos: [{ status: 'pending', storage_key: null, thumb_key: null }],
  });

  rmSync(parent);
  mkdirSync(parent);
  const ok = await upload(app, p.photoId, bytes);
  expect(ok.status).toBe(201);
  expect((await dbState(p.roundId, p.photoId)).photos).toEqual([
    { status: 'stored', storage_key: `photos/${p.photoId}.jpg`, thumb_key: `thumbs/${p.photoId}.jpg` },
  ]);
  expect(filesOf(root, p.photoId)).toEqual([`photos/${p.photoId}.jpg`, `thumbs/${p.photoId}.jpg`]);
  expect(readdirSync(root, { recursive: true }).filter((f) => String(f).endsWith('.tmp'))).toEqual([]);
});
