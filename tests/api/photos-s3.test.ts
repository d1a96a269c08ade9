/**
 * The S3-compatible photo store (@aws-sdk/client-s3) against s3rver, a local fake S3 server,
 * started on loopback (port 0) with a temporary folder. Amazon S3 API semantics relied on
 * (PutObject, GetObject → NoSuchKey, HeadObject → 404, path-style addressing): the Amazon S3 API
 * Reference.
 */
import { createHash, randomUUID } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { GetObjectCommand } from '@aws-sdk/client-s3';
import type { Express } from 'express';
import sharp from 'sharp';
import request from 'supertest';
import { ConfigError, loadConfig } from '../../server/config';
import { InstrumentEntity, RouteEntity } from '../../server/entities';
import { demoUser } from '../../server/seed/demo-users';
import { S3PhotoStore } from '../../server/uploads/s3-store';
import { UnsafeKeyError } from '../../server/uploads/store';
import { bearer, signIn, testApp } from './helpers/app';
import { createTestDatabase, type TestDb } from './helpers/db';

interface FakeS3 {
  run(): Promise<{ port: number }>;
  close(): Promise<void>;
}
// s3rver ships no type declarations
const S3rver = require('s3rver') as new (o: {
  address: string;
  port: number;
  silent: boolean;
  directory: string;
  configureBuckets: { name: string }[];
}) => FakeS3;

const BUCKET = 'trueround-photos';
let fake: FakeS3;
let dir: string;
let endpoint: string;
let store: S3PhotoStore;
let db: TestDb;
let app: Express;

beforeAll(async () => {
  dir = mkdtempSync(path.join(tmpdir(), 'tr-s3-'));
  fake = new S3rver({
    address: '127.0.0.1',
    port: 0,
    silent: true,
    directory: dir,
    configureBuckets: [{ name: BUCKET }],
  });
  const { port } = await fake.run();
  endpoint = `http://127.0.0.1:${port}`;
  store = new S3PhotoStore({
    bucket: BUCKET,
    endpoint,
    region: 'us-east-1',
    accessKeyId: 'S3RVER',
    secretAccessKey: 'S3RVER',
    forcePathStyle: true,
  });
  db = await createTestDatabase();
  app = testApp(db.dataSource, db.url, {
    PHOTO_STORE: 's3',
    PHOTO_S3_ENDPOINT: endpoint,
    PHOTO_S3_BUCKET: BUCKET,
    PHOTO_S3_ACCESS_KEY_ID: 'S3RVER',
    PHOTO_S3_SECRET_ACCESS_KEY: 'S3RVER',
  });
});
afterAll(async () => {
  store?.destroy();
  await db?.drop();
  await fake?.close();
  if (dir) rmSync(dir, { recursive: true, force: true });
});

const readAll = async (s: NodeJS.ReadableStream) => {
  const chunks: Buffer[] = [];
  for await (const c of s) chunks.push(Buffer.from(c as Buffer));
  return Buffer.concat(chunks);
};

test('put, has, get round-trip the bytes and type; a missing key is has:false and get:null', async () => {
  const bytes = Buffer.from('not really a photo, but bytes are bytes');
  expect(await store.has('photos/round-trip.jpg')).toBe(false);
  expect(await store.get('photos/round-trip.jpg')).toBeNull();
  await store.put('photos/round-trip.jpg', bytes, 'image/jpeg');
  expect(await store.has('photos/round-trip.jpg')).toBe(true);
  const got = await store.get('photos/round-trip.jpg');
  expect(got).not.toBeNull();
  expect(got!.mime).toBe('image/jpeg');
  expect(got!.bytes).toBe(bytes.length);
  expect(await readAll(got!.body)).toEqual(bytes);
});

test('the S3 driver refuses unsafe keys before any request', async () => {
  await expect(store.put('../escape.jpg', Buffer.from('x'), 'image/jpeg')).rejects.toThrow(UnsafeKeyError);
  await expect(store.get('photos/../../x')).rejects.toThrow(UnsafeKeyError);
  await expect(store.has('/abs')).rejects.toThrow(UnsafeKeyError);
});

test('through the app (PHOTO_STORE=s3): a pushed photo uploads into the bucket with its thumbnail and streams back', async () => {
  const tech = (await signIn(app, demoUser('technician').email)).accessToken;
  const route = await db.dataSource.getRepository(RouteEntity).findOneByOrFail({ key: 'turbine-hall' });
  const ji601 = await db.dataSource
    .getRepository(InstrumentEntity)
    .findOneByOrFail({ tag: 'JI-601', unitId: route.unitId });
  const jpeg = await sharp({ create: { width: 800, height: 600, channels: 3, background: '#223344' } })
    .withExif({ IFD0: { Artist: 'Trueround test camera' } })
    .jpeg()
    .toBuffer();
  const roundId = randomUUID();
  const readingId = randomUUID();
  const photoId = randomUUID();
  const t = new Date().toISOString();
  const push = await request(app)
    .post('/api/sync/push')
    .set(bearer(tech))
    .send({
      payloadVersion: 2,
      deviceId: 's3-test',
      sentAt: t,
      rounds: [
        { id: roundId, routeVersionId: route.currentVersionId, startedAt: t, status: 'in-progress', dismissals: [] },
      ],
      readings: [
        {
          id: readingId,
          roundId,
          instrumentId: ji601.id,
          valueTyped: 21.9,
          unit: 'MW',
          deviceTime: t,
          confirmedAfterFlag: false,
          flags: [],
        },
      ],
      checkAnswers: [],
      photos: [
        {
          id: photoId,
          roundId,
          readingId,
          sha256: createHash('sha256').update(jpeg).digest('hex'),
          mime: 'image/jpeg',
          bytes: jpeg.length,
        },
      ],
    });
  expect(push.status).toBe(200);
  expect(push.body.photosWanted).toEqual([photoId]);

  const up = await request(app).post(`/api/photos/${photoId}`).set(bearer(tech)).attach('photo', jpeg, 'meter.jpg');
  expect(up.status).toBe(201);
  expect(up.body).toMatchObject({ width: 800, height: 600, thumbWidth: 320, thumbHeight: 240 });

  // straight from the bucket, not through our driver
  const obj = await store.client.send(new GetObjectCommand({ Bucket: BUCKET, Key: `photos/${photoId}.jpg` }));
  expect(obj.ContentType).toBe('image/jpeg');
  const inBucket = Buffer.from(await obj.Body!.transformToByteArray());
  expect((await sharp(inBucket).metadata()).exif).toBeUndefined();
  const thumbMeta = await sharp(await readAll((await store.get(`thumbs/${photoId}.jpg`))!.body)).metadata();
  expect([thumbMeta.width, thumbMeta.height]).toEqual([320, 240]);

  const served = await request(app)
    .get(`/api/photos/${photoId}`)
    .set(bearer(tech))
    .buffer(true)
    .parse((res, cb) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => cb(null, Buffer.concat(chunks)));
    });
  expect(served.status).toBe(200);
  expect(served.body as Buffer).toEqual(inBucket);
});

test('config: PHOTO_STORE=s3 without a bucket stops the server naming PHOTO_S3_BUCKET; a bad endpoint is named too', () => {
  const base = { DATABASE_URL: db.url, JWT_SECRET: 'x'.repeat(32) };
  expect(() => loadConfig({ ...base, PHOTO_STORE: 's3' })).toThrow(
    new ConfigError('Config: PHOTO_S3_BUCKET is required when PHOTO_STORE is s3'),
  );
  expect(() =>
    loadConfig({ ...base, PHOTO_STORE: 's3', PHOTO_S3_BUCKET: BUCKET, PHOTO_S3_ENDPOINT: 'localhost:9000' }),
  ).toThrow('Config: PHOTO_S3_ENDPOINT must be an http:// or https:// URL');
  expect(() => loadConfig({ ...base, PHOTO_MAX_BYTES: '10' })).toThrow(
    'Config: PHOTO_MAX_BYTES must be between 1024 and 104857600, got 10',
  );
  expect(() => loadConfig({ ...base, PHOTO_STORE: 'ftp' })).toThrow('Config: PHOTO_STORE must be one of local, s3');
  expect(loadConfig(base)).toMatchObject({
    PHOTO_STORE: 'local',
    PHOTO_DIR: '.data/photos',
    PHOTO_MAX_BYTES: 10 * 1024 * 1024,
    PHOTO_S3_FORCE_PATH_STYLE: true,
  });
});
