/**
 * One device, two people (offline/actions.ts, offline/store.ts, offline/sync.ts): every outbox
 * row, round and photo carries who made it; a sync run sends only the signed-in person's, so
 * technician A's records never go up under technician B's token (the server would store them as
 * B's work). They wait, listed as "waiting for A", and go when A signs in again.
 */
import { createActions, type Author } from '@/offline/actions';
import { client, FakeServer, harness, RV1, sha256Hex, type Harness } from './fixtures';

const A: Author = { id: 'user-a', name: 'Robin Aske' };
const B: Author = { id: 'user-b', name: 'Ash Renner' };

/** The harness with actions that stamp whoever `who.current` is. */
async function sharedDevice() {
  const h = await harness();
  const who: { current: Author | null } = { current: A };
  const actions = createActions({
    store: h.store,
    ids: h.ids,
    clock: h.clock,
    sha256: async (b) => sha256Hex(b),
    author: () => who.current,
  });
  return { h: { ...h, actions } as Harness, who };
}

test("A's records wait while B is signed in, B's go; when A signs in again A's go, with A's token", async () => {
  const { h, who } = await sharedDevice();
  const roundA = await h.actions.startRound(RV1);
  const readingA = await h.actions.recordReading({
    roundId: roundA.id,
    instrumentTag: 'TI-101',
    valueTyped: 180.4,
    unit: '°C',
  });
  await h.actions.attachPhoto({
    roundId: roundA.id,
    readingId: readingA.id,
    bytes: new Uint8Array([1, 2, 3]),
    mime: 'image/jpeg',
  });
  await h.actions.finishRound(roundA.id);

  // A signs out (offline); B signs in on the same device
  who.current = B;
  const roundB = await h.actions.startRound(RV1);
  await h.actions.recordReading({ roundId: roundB.id, instrumentTag: 'TI-101', valueTyped: 181, unit: '°C' });

  const server = new FakeServer();
  const pushedAs: string[] = [];
  const signedIn = { id: B.id };
  const transport = {
    push: (body: Parameters<FakeServer['push']>[0]) => (pushedAs.push(signedIn.id), server.push(body)),
    uploadPhoto: (...a: Parameters<FakeServer['uploadPhoto']>) => (
      pushedAs.push(`photo:${signedIn.id}`),
      server.uploadPhoto(...a)
    ),
    pull: (...a: Parameters<FakeServer['pull']>) => server.pull(...a),
  };
  const sync = client(h, transport, { author: () => signedIn.id });
  expect((await sync.syncNow()).ok).toBe(true);
  expect([...server.rounds.keys()]).toEqual([roundB.id]);
  expect(server.readings.size).toBe(1);
  expect(server.readings.has(readingA.id)).toBe(false);
  expect(server.photos.size).toBe(0);
  const status = await sync.status();
  expect(status.waiting).toBe(0);
  expect(status.othersWaiting).toEqual([{ authorId: A.id, authorName: 'Robin Aske', records: 4 }]); // the round started and finished, the reading, the photo

  // B may not add to A's round on this device
  await expect(
    h.actions.recordReading({ roundId: roundA.id, instrumentTag: 'TI-101', valueTyped: 1, unit: '°C' }),
  ).rejects.toThrow('this round was started by Robin Aske on this device; only they add to it');

  // A signs in again: A's round, reading and photo go, under A
  signedIn.id = A.id;
  who.current = A;
  expect((await sync.syncNow()).ok).toBe(true);
  expect(server.rounds.get(roundA.id)?.status).toBe('finished');
  expect(server.readings.has(readingA.id)).toBe(true);
  expect(server.photoBytes.size).toBe(1);
  expect(pushedAs).toEqual([B.id, A.id, `photo:${A.id}`]);
  expect((await sync.status()).othersWaiting).toEqual([]);
});

test('nobody signed in: the actions refuse and nothing is sent', async () => {
  const { h, who } = await sharedDevice();
  await h.actions.startRound(RV1);
  who.current = null;
  await expect(h.actions.startRound(RV1)).rejects.toThrow(
    'author: nobody is signed in on this device; sign in to record',
  );
  const server = new FakeServer();
  await client(h, server, { author: () => null }).syncNow();
  expect(server.pushes).toEqual([]);
});

test('rows from before authors were kept go with whoever signs in (as they did)', async () => {
  const { h } = await sharedDevice();
  const round = await h.actions.startRound(RV1);
  await h.db.run('UPDATE outbox SET author_id = NULL, author_name = NULL');
  const server = new FakeServer();
  await client(h, server, { author: () => B.id }).syncNow();
  expect([...server.rounds.keys()]).toEqual([round.id]);
});
