/**
 * POST/GET /api/photos/:id with the local-disk store: announced by a push, uploaded as multipart
 * field "photo", checked and re-encoded by sharp (libvips), thumbnail ≤ 320 px, metadata gone.
 * EXIF/GPS tags per CIPA DC-008 (Exif 2.3): IFD0 Artist (0x013B), GPS IFD; orientation 6 = the
 * picture is to be turned 90° clockwise to be upright. SHA-256 per FIPS 180-4 (node:crypto).
 * Status codes per RFC 9110 §15.5 (409 Conflict, 413 Content Too Large, 415 Unsupported Media Type).
 */
import { createHash, randomBytes, randomUUID } from 'node:crypto';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { Express } from 'express';
import sharp from 'sharp';
import request from 'supertest';
import { PhotoUploadResponse, type PushRequestV2 } from '../../shared/api/sync';
import { InstrumentEntity, RouteEntity } from '../../server/entities';
import { demoUser } from '../../server/seed/demo-users';
import { LocalPhotoStore } from '../../server/uploads/local-store';
import { UnsafeKeyError } from '../../server/uploads/store';
import { bearer, signIn, testApp } from './helpers/app';
import { createTestDatabase, type TestDb } from './helpers/db';

let db: TestDb;
let app: Express;
let small: Express;
let dir: string;
const tokens: Record<string, string> = {};
let routeVersionId: string;
let pi101: string;

beforeAll(async () => {
  db = await createTestDatabase();
  dir = mkdtempSync(path.join(tmpdir(), 'tr-photos-'));
  app = testApp(db.dataSource, db.url, { PHOTO_DIR: dir });
  small = testApp(db.dataSource, db.url, { PHOTO_DIR: dir, PHOTO_MAX_BYTES: '4096' });
  for (const [k, role, site] of [
    ['tech', 'technician', 'fernhallow'],
    ['engineer', 'engineer', 'fernhallow'],
    ['planner', 'planner', 'fernhallow'],
    ['brack', 'planner', 'brackenmoor'],
  ] as const) {
    tokens[k] = (await signIn(app, demoUser(role, site).email)).accessToken;
  }
  const route = await db.dataSource.getRepository(RouteEntity).findOneByOrFail({ key: 'boiler-house' });
  routeVersionId = route.currentVersionId!;
  pi101 = (await db.dataSource.getRepository(InstrumentEntity).findOneByOrFail({ tag: 'PI-101', unitId: route.unitId }))
    .id;
});
afterAll(async () => {
  await db?.drop();
  if (dir) rmSync(dir, { recursive: true, force: true });
});

/** Whether an EXIF block (TIFF header after "Exif\0\0") holds a GPS IFD pointer, tag 0x8825 (Exif 2.3 §4.6.3). */
function hasGpsIfd(exif: Buffer): boolean {
  const littleEndian = exif.toString('latin1', 6, 8) === 'II';
  return exif.indexOf(Buffer.from(littleEndian ? [0x25, 0x88] : [0x88, 0x25])) >= 0;
}

const sha = (b: Buffer) => createHash('sha256').update(b).digest('hex');

/** Pushes a round with one reading and announces each photo (bytes → its sha256); returns the photo ids. */
async function announce(
  photos: { bytes: Buffer; mime?: PushRequestV2['photos'][number]['mime']; sha?: string }[],
  token = tokens.tech,
) {
  const roundId = randomUUID();
  const readingId = randomUUID();
  const t = new Date().toISOString();
  const ids = photos.map(() => randomUUID());
  const body: PushRequestV2 = {
    payloadVersion: 2,
    deviceId: 'photo-test',
    sentAt: t,
    rounds: [{ id: roundId, routeVersionId, startedAt: t, status: 'in-progress', dismissals: [] }],
    readings: [
      {
        id: readingId,
        roundId,
        instrumentId: pi101,
        valueTyped: 67,
        unit: 'bar',
        reference: 'gauge',
        deviceTime: t,
        confirmedAfterFlag: false,
        flags: [],
      },
    ],
    checkAnswers: [],
    photos: photos.map((p, k) => ({
      id: ids[k],
      roundId,
      readingId,
      sha256: p.sha ?? sha(p.bytes),
      mime: p.mime ?? 'image/jpeg',
      bytes: p.bytes.length,
    })),
  };
  const res = await request(app).post('/api/sync/push').set(bearer(token)).send(body);
  if (res.status !== 200) throw new Error(`push failed: ${res.status} ${JSON.stringify(res.body)}`);
  expect(res.body.photosWanted.sort()).toEqual([...ids].sort());
  return { ids, roundId, body };
}

const upload = (id: string, bytes: Buffer, on: Express = app, token = tokens.tech, filename = 'gauge.jpg') =>
  request(on).post(`/api/photos/${id}`).set(bearer(token)).attach('photo', bytes, filename);

/** GET with the body kept as bytes. */
const getBytes = (url: string, token: string) =>
  request(app)
    .get(url)
    .set(bearer(token))
    .buffer(true)
    .parse((res, cb) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => cb(null, Buffer.concat(chunks)));
    });

async function cameraJpeg(): Promise<Buffer> {
  return sharp({ create: { width: 1200, height: 900, channels: 3, background: '#6a7f93' } })
    .withMetadata({ orientation: 6 })
    .withExif({
      IFD0: { Artist: 'Trueround test camera', Copyright: 'Fernhallow drum platform' },
      IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '51/1 30/1 0/1', GPSLongitudeRef: 'W', GPSLongitude: '1/1 45/1 0/1' },
    })
    .jpeg({ quality: 90 })
    .toBuffer();
}

test('an upload stores the photo and a ≤ 320 px thumbnail, turned upright, with EXIF and GPS gone', async () => {
  const jpeg = await cameraJpeg();
  const before = await sharp(jpeg).metadata();
  expect(before.exif?.toString('latin1')).toContain('Trueround test camera'); // the fixture really carries EXIF…
  expect(hasGpsIfd(before.exif!)).toBe(true); // …and a GPS position
  expect(before.orientation).toBe(6);

  const { ids } = await announce([{ bytes: jpeg }]);
  const res = await upload(ids[0], jpeg);
  expect(res.status).toBe(201);
  expect(PhotoUploadResponse.parse(res.body)).toEqual({
    id: ids[0],
    stored: true,
    created: true,
    mime: 'image/jpeg',
    width: 900,
    height: 1200,
    thumbWidth: 240,
    thumbHeight: 320,
  });

  const photo = await getBytes(`/api/photos/${ids[0]}`, tokens.planner);
  expect(photo.status).toBe(200);
  expect(photo.headers['content-type']).toBe('image/jpeg');
  const m = await sharp(photo.body as Buffer).metadata();
  expect([m.format, m.width, m.height]).toEqual(['jpeg', 900, 1200]);
  expect(m.exif).toBeUndefined();
  expect(m.orientation).toBeUndefined();
  expect((photo.body as Buffer).toString('latin1')).not.toContain('Trueround test camera');

  const thumb = await getBytes(`/api/photos/${ids[0]}/thumb`, tokens.tech);
  expect(thumb.status).toBe(200);
  const t = await sharp(thumb.body as Buffer).metadata();
  expect(t.format).toBe('jpeg');
  expect(Math.max(t.width!, t.height!)).toBeLessThanOrEqual(320);
  expect(t.exif).toBeUndefined();

  const [row] = await db.dataSource.query(
    `SELECT status, storage_key, thumb_key, width, height FROM photos WHERE id = $1`,
    [ids[0]],
  );
  expect(row).toEqual({
    status: 'stored',
    storage_key: `photos/${ids[0]}.jpg`,
    thumb_key: `thumbs/${ids[0]}.jpg`,
    width: 900,
    height: 1200,
  });
  expect(existsSync(path.join(dir, 'photos', `${ids[0]}.jpg`))).toBe(true);
});

test('a second upload of a stored photo → 200 stored:true; a replayed push no longer wants it', async () => {
  const jpeg = await cameraJpeg();
  const { ids, body } = await announce([{ bytes: jpeg }]);
  expect((await upload(ids[0], jpeg)).status).toBe(201);
  const again = await upload(ids[0], jpeg);
  expect(again.status).toBe(200);
  expect(again.body).toMatchObject({ id: ids[0], stored: true, created: false, width: 900, height: 1200 });
  const replay = await request(app).post('/api/sync/push').set(bearer(tokens.tech)).send(body);
  expect(replay.body.photosWanted).toEqual([]);
});

test('PNG stays PNG; an AVIF (HEIF container) photo is decoded and stored as JPEG', async () => {
  const png = await sharp({
    create: { width: 400, height: 100, channels: 4, background: { r: 10, g: 200, b: 10, alpha: 0.5 } },
  })
    .png()
    .toBuffer();
  const avif = await sharp({ create: { width: 640, height: 480, channels: 3, background: '#884422' } })
    .avif()
    .toBuffer();
  const { ids } = await announce([
    { bytes: png, mime: 'image/png' },
    { bytes: avif, mime: 'image/heif' },
  ]);
  const a = await upload(ids[0], png, app, tokens.tech, 'g.png');
  expect(a.status).toBe(201);
  expect(a.body).toMatchObject({ mime: 'image/png', width: 400, height: 100, thumbWidth: 320, thumbHeight: 80 });
  const b = await upload(ids[1], avif, app, tokens.tech, 'g.heic');
  expect(b.status).toBe(201);
  expect(b.body).toMatchObject({ mime: 'image/jpeg', width: 640, height: 480 });
});

test('a non-image upload → 415 unsupported_media_type; a GIF too; nothing stored', async () => {
  const text = Buffer.from('this is a shopping list, not a gauge');
  const gif = await sharp({ create: { width: 8, height: 8, channels: 3, background: '#ff0000' } })
    .gif()
    .toBuffer();
  const { ids } = await announce([{ bytes: text }, { bytes: gif }]);
  const r1 = await upload(ids[0], text, app, tokens.tech, 'list.txt');
  expect(r1.status).toBe(415);
  expect(r1.body.error.code).toBe('unsupported_media_type');
  const r2 = await upload(ids[1], gif, app, tokens.tech, 'x.gif');
  expect(r2.status).toBe(415);
  expect(r2.body.error.message).toContain('gif');
  const rows = await db.dataSource.query(`SELECT status FROM photos WHERE id = ANY($1::uuid[])`, [ids]);
  expect(rows).toEqual([{ status: 'pending' }, { status: 'pending' }]);
});

test('an upload over PHOTO_MAX_BYTES (4096 in this app) → 413 too_large', async () => {
  // random pixels do not compress: a 300 × 300 JPEG of noise is far above 4 KB
  const big = await sharp(randomBytes(300 * 300 * 3), { raw: { width: 300, height: 300, channels: 3 } })
    .jpeg({ quality: 95 })
    .toBuffer();
  expect(big.length).toBeGreaterThan(4096);
  const { ids } = await announce([{ bytes: big }]);
  const res = await upload(ids[0], big, small);
  expect(res.status).toBe(413);
  expect(res.body.error).toMatchObject({ code: 'too_large', details: { limit: 4096 } });
  // the normal app takes it
  expect((await upload(ids[0], big)).status).toBe(201);
});

test('bytes that are not the announced ones → 409 with both hashes', async () => {
  const jpeg = await cameraJpeg();
  const { ids } = await announce([{ bytes: jpeg, sha: 'b'.repeat(64) }]);
  const res = await upload(ids[0], jpeg);
  expect(res.status).toBe(409);
  expect(res.body.error.details).toEqual({ announced: 'b'.repeat(64), received: sha(jpeg) });
});

test('path traversal in the id → 400 or 404, never a file; the disk store refuses unsafe keys itself', async () => {
  const jpeg = await cameraJpeg();
  for (const id of ['..%2F..%2Fetc%2Fpasswd', '..', 'photos%2F..%2F..%2Fsecret', '%2e%2e%2f%2e%2e%2fetc']) {
    const post = await upload(id, jpeg);
    expect([400, 404]).toContain(post.status);
    const get = await request(app).get(`/api/photos/${id}`).set(bearer(tokens.tech));
    expect([400, 404]).toContain(get.status);
    expect(get.headers['content-type']).toMatch(/^application\/json/);
  }
  expect((await request(app).get('/api/photos/not-a-uuid/thumb').set(bearer(tokens.tech))).status).toBe(400);
  const store = new LocalPhotoStore(dir);
  for (const key of ['../x.jpg', 'photos/../../x', '/etc/passwd', 'photos//x.jpg', 'Photos/X.JPG', 'a\\..\\b']) {
    expect(() => store.pathOf(key)).toThrow(UnsafeKeyError);
  }
  await expect(store.get('../../etc/passwd')).rejects.toThrow(UnsafeKeyError);
});

test('who: an unannounced id → 404; another technician’s round → 403; GET is for site members only', async () => {
  const jpeg = await cameraJpeg();
  expect((await upload(randomUUID(), jpeg)).status).toBe(404);
  const { ids } = await announce([{ bytes: jpeg }]);
  const other = await upload(ids[0], jpeg, app, tokens.engineer);
  expect(other.status).toBe(403);
  expect((await request(app).get(`/api/photos/${ids[0]}`).set(bearer(tokens.tech))).status).toBe(404); // not uploaded yet
  expect((await upload(ids[0], jpeg)).status).toBe(201);
  expect((await request(app).get(`/api/photos/${ids[0]}`).set(bearer(tokens.brack))).status).toBe(404);
  expect((await request(app).get(`/api/photos/${ids[0]}`)).status).toBe(401);
  expect((await request(app).get(`/api/photos/${ids[0]}/thumb`).set(bearer(tokens.engineer))).status).toBe(200);
});

test('the photo must come as multipart field "photo"', async () => {
  const jpeg = await cameraJpeg();
  const { ids } = await announce([{ bytes: jpeg }]);
  const wrongField = await request(app)
    .post(`/api/photos/${ids[0]}`)
    .set(bearer(tokens.tech))
    .attach('image', jpeg, 'g.jpg');
  expect(wrongField.status).toBe(400);
  expect(wrongField.body.error.message).toContain('"photo"');
  const raw = await request(app)
    .post(`/api/photos/${ids[0]}`)
    .set(bearer(tokens.tech))
    .set('Content-Type', 'image/jpeg')
    .send(jpeg);
  expect(raw.status).toBe(415);
});
