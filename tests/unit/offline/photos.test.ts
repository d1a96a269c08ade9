/**
 * Photos: metadata travels with the push, the bytes upload on their own queue keyed by photo id
 * and SHA-256, retried until the server has them; a reading never waits for its photo.
 */
import { client, failure, FakeServer, harness, RV1 } from './fixtures';

const JPEG = Uint8Array.from([0xff, 0xd8, 0xff, 0xe0, 0x00, 0x10, 0x4a, 0x46, 0x49, 0x46, 0x00, 0x01]);

async function roundWithPhoto() {
  const h = await harness();
  const round = await h.actions.startRound(RV1);
  const reading = await h.actions.recordReading({
    roundId: round.id,
    instrumentTag: 'PI-101',
    valueTyped: 10.2,
    unit: 'bar',
    reference: 'gauge',
  });
  const photo = await h.actions.attachPhoto({
    roundId: round.id,
    readingId: reading.id,
    bytes: JPEG,
    mime: 'image/jpeg',
  });
  return { h, round, reading, photo };
}

test('the push announces the photo, then its bytes are uploaded by id with the SHA-256; the server stores them', async () => {
  const { h, photo, reading } = await roundWithPhoto();
  const server = new FakeServer();
  const r = await client(h, server).syncNow();
  expect(r).toMatchObject({ ok: true, sent: 3, photosUploaded: 1 });
  expect(server.pushes[0].photos).toEqual([
    {
      id: photo.id,
      roundId: photo.roundId,
      readingId: reading.id,
      checkId: null,
      sha256: photo.sha256,
      mime: 'image/jpeg',
      bytes: JPEG.length,
    },
  ]);
  expect(server.uploads).toEqual([photo.id]);
  expect(Array.from(server.photoBytes.get(photo.id)!)).toEqual(Array.from(JPEG));
  expect((await h.store.getPhoto(photo.id))!.uploadState).toBe('stored');
});

test('a reading never waits for its photo: while uploads fail, the reading is already on the server', async () => {
  const { h, photo, reading } = await roundWithPhoto();
  const server = new FakeServer();
  server.failNext('uploadPhoto', failure(503, 'Service Unavailable'), 3);
  const c = client(h, server);
  const r = await c.syncNow();
  expect(server.readings.has(reading.id)).toBe(true);
  expect(r.photosUploaded).toBe(0);
  const p = (await h.store.getPhoto(photo.id))!;
  expect(p).toMatchObject({ uploadState: 'announced', attempts: 1, lastError: 'Service Unavailable' });
  // Its own backoff (full jitter, random() = 0.5, attempt 0: 0.5 × 1 s).
  expect(p.nextAttemptAt - h.clock.t).toBe(500);
  expect((await c.status()).photosWaiting).toBe(1);
});

test('retried until the server has it: 503, 503, network down, then stored; each retry waits for its own due time', async () => {
  const { h, photo } = await roundWithPhoto();
  const server = new FakeServer();
  server.failNext('uploadPhoto', failure(503, 'Service Unavailable'), 2);
  server.failNext('uploadPhoto', failure(0, 'No connection'));
  const c = client(h, server);
  const gaps: number[] = [];
  for (let i = 0; i < 6 && (await h.store.getPhoto(photo.id))!.uploadState !== 'stored'; i++) {
    await c.syncNow({ force: true });
    const p = (await h.store.getPhoto(photo.id))!;
    if (p.uploadState === 'stored') break;
    gaps.push(p.nextAttemptAt - h.clock.t);
    // Not due yet: a run uploads nothing.
    const before = server.uploads.length;
    await c.syncNow({ force: true });
    expect(server.uploads.length).toBe(before);
    h.clock.advance(p.nextAttemptAt - h.clock.t);
  }
  expect(gaps).toEqual([500, 1000, 2000]);
  expect(server.uploads).toEqual([photo.id, photo.id, photo.id, photo.id]);
  expect((await h.store.getPhoto(photo.id))!.uploadState).toBe('stored');
  // The push went once; photos have their own queue.
  expect(server.pushes.length).toBe(1);
});

test('a 404 (the server has not applied the photo row yet) is retried, not refused', async () => {
  const { h, photo } = await roundWithPhoto();
  const server = new FakeServer();
  server.failNext('uploadPhoto', failure(404, 'No such photo'));
  const c = client(h, server);
  await c.syncNow();
  expect((await h.store.getPhoto(photo.id))!.uploadState).toBe('announced');
  h.clock.advance(10_000);
  await c.syncNow();
  expect((await h.store.getPhoto(photo.id))!.uploadState).toBe('stored');
});

test('bytes the server turns down (415) are set aside as refused and shown; retryRefused tries again', async () => {
  const { h, photo } = await roundWithPhoto();
  const server = new FakeServer();
  server.failNext('uploadPhoto', failure(415, 'Not an image the server can read'));
  const c = client(h, server);
  await c.syncNow();
  expect(await h.store.getPhoto(photo.id)).toMatchObject({
    uploadState: 'refused',
    lastError: 'Not an image the server can read',
  });
  expect((await c.status()).photosRefused).toBe(1);
  await c.retryRefused();
  await c.syncNow();
  expect((await h.store.getPhoto(photo.id))!.uploadState).toBe('stored');
});

test('a photo whose bytes the server already has (not in photosWanted) is not uploaded again', async () => {
  const { h, photo } = await roundWithPhoto();
  const server = new FakeServer();
  server.photoBytes.set(photo.id, JPEG); // e.g. uploaded from this device before its store was restored
  await client(h, server).syncNow();
  expect(server.uploads).toEqual([]);
  expect((await h.store.getPhoto(photo.id))!.uploadState).toBe('stored');
});

test('a photo is not uploaded before a push has announced it', async () => {
  const { h, photo } = await roundWithPhoto();
  const server = new FakeServer();
  server.failNext('push', failure(0, 'No connection'));
  await client(h, server).syncNow();
  expect(server.uploads).toEqual([]);
  expect((await h.store.getPhoto(photo.id))!.uploadState).toBe('local');
});

test('with zero jitter and a server that keeps failing, a run tries each photo once and ends', async () => {
  const { h, photo } = await roundWithPhoto();
  const second = await h.actions.attachPhoto({
    roundId: photo.roundId,
    bytes: Uint8Array.from([...JPEG, 9]),
    mime: 'image/jpeg',
  });
  const server = new FakeServer();
  server.failNext('uploadPhoto', failure(500, 'Internal Server Error'), 100);
  const c = client(h, server, { random: () => 0 });
  await c.syncNow();
  expect(server.uploads.sort()).toEqual([photo.id, second.id].sort());
  expect((await h.store.getPhoto(second.id))!.uploadState).toBe('announced');
});
