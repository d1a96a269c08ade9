/**
 * Pushing the outbox against a fake server that keeps to shared/api/sync.ts: batches of at most
 * 500, idempotent replays, a refused batch set aside and pushed item by item, retry with backoff
 * on network errors and 5xx (RFC 9110 §15.6: 5xx = the server failed a possibly valid request),
 * "signed out" on a 401 that the session's refresh could not cure.
 */
import { PushRequest } from '@/shared/api/sync';
import { backoffCeiling, DEFAULT_BACKOFF } from '@/offline/backoff';
import { buildPushBody, classifyFailure, SyncClient } from '@/offline/sync';
import { client, failure, FakeServer, harness, RV1, type Harness } from './fixtures';

async function roundWithReadings(h: Harness, n: number) {
  const round = await h.actions.startRound(RV1);
  for (let i = 0; i < n; i++) {
    h.clock.advance(1000);
    await h.actions.recordReading({
      roundId: round.id,
      instrumentTag: 'TI-101',
      valueTyped: 180 + (i % 10) / 10,
      unit: '°C',
    });
  }
  return round;
}

/** Insert many outbox rows quickly (one transaction), the way many actions would have left them. */
async function manyReadings(h: Harness, n: number) {
  const round = await h.actions.startRound(RV1);
  const template = await h.actions.recordReading({
    roundId: round.id,
    instrumentTag: 'TI-101',
    valueTyped: 180,
    unit: '°C',
  });
  const row = await h.db.first<{ payload: string }>(`SELECT payload FROM outbox WHERE record_id = ?`, [template.id]);
  await h.db.transaction(async (tx) => {
    for (let i = 0; i < n - 1; i++) {
      const id = h.ids.uuid();
      const p = { ...JSON.parse(row!.payload), id };
      await tx.run(
        `INSERT INTO outbox (kind, record_id, payload, created_at) VALUES ('reading', ?, ?, '2025-11-30T07:00:00.000Z')`,
        [id, JSON.stringify(p)],
      );
    }
  });
  return round;
}

describe('push batching', () => {
  test('1 + 1200 outbox rows go as batches of 500, 500, 201, each a valid PushRequest of payload version 2', async () => {
    const h = await harness();
    await manyReadings(h, 1200);
    const server = new FakeServer();
    const r = await client(h, server).syncNow();
    expect(r.ok).toBe(true);
    const sizes = server.pushes.map(
      (b) => b.rounds.length + b.readings.length + b.checkAnswers.length + b.photos.length,
    );
    expect(sizes).toEqual([500, 500, 201]);
    for (const b of server.pushes) {
      expect(PushRequest.safeParse(b).success).toBe(true);
      expect(b.payloadVersion).toBe(2);
    }
    expect(server.readings.size).toBe(1200);
    expect(await h.store.outboxCounts()).toMatchObject({ waiting: 0, sent: 1201, refused: 0 });
  });

  test('batch size is configurable below 500 and refused above', async () => {
    const h = await harness();
    await roundWithReadings(h, 7);
    const server = new FakeServer();
    await client(h, server, { batchSize: 3 }).syncNow();
    expect(server.pushes.map((b) => b.rounds.length + b.readings.length)).toEqual([3, 3, 2]);
    expect(() => client(h, server, { batchSize: 501 })).toThrow(
      'batchSize must be a whole number from 1 to 500, got 501',
    );
  });

  test('a round queued several times (started, dismissal, finished) goes once per batch, as its latest state', async () => {
    const h = await harness();
    const round = await roundWithReadings(h, 1);
    await h.actions.dismissSuspect(round.id, 'TI-101', 'Compared with the drum pressure: consistent');
    await h.actions.finishRound(round.id);
    const items = await h.store.waitingBatch(10);
    const body = buildPushBody(items, 'device-1', '2025-11-30T08:00:00.000Z');
    expect(items.length).toBe(4);
    expect(body.rounds.length).toBe(1);
    expect(body.rounds[0].status).toBe('finished');
    expect(body.rounds[0].dismissals.length).toBe(1);
    const server = new FakeServer();
    await client(h, server).syncNow();
    expect(server.rounds.get(round.id)).toEqual({
      status: 'finished',
      dismissals: 1,
      finishedAt: body.rounds[0].finishedAt,
    });
  });

  test('the device id is made once and sent with every push; sentAt is the device clock', async () => {
    const h = await harness();
    await roundWithReadings(h, 2);
    const server = new FakeServer();
    const c = client(h, server, { batchSize: 1 });
    await c.syncNow();
    const ids = new Set(server.pushes.map((b) => b.deviceId));
    expect(ids.size).toBe(1);
    expect(await h.store.getMeta('device_id')).toBe([...ids][0]);
    expect(server.pushes[0].sentAt).toBe(new Date(h.clock.t).toISOString());
  });
});

describe('idempotent replays', () => {
  test('an answer lost after the server applied the push: the retry sends the same ids, the server stores each once and counts duplicates', async () => {
    const h = await harness();
    const round = await roundWithReadings(h, 3);
    const server = new FakeServer();
    server.loseNextAnswer = true;
    const c = client(h, server);
    const first = await c.syncNow();
    expect(first.ok).toBe(false);
    expect(first.problem?.kind).toBe('offline');
    expect(await h.store.outboxCounts()).toMatchObject({ waiting: 4, sent: 0 });
    const second = await c.syncNow({ force: true });
    expect(second.ok).toBe(true);
    expect(server.pushes.length).toBe(2);
    expect(server.pushes[1].readings.map((r) => r.id)).toEqual(server.pushes[0].readings.map((r) => r.id));
    expect(server.readings.size).toBe(3);
    expect(server.rounds.has(round.id)).toBe(true);
    const s = await c.status();
    expect(s.lastPush).toEqual({
      applied: { rounds: 0, readings: 0, checkAnswers: 0, photos: 0 },
      duplicates: { rounds: 1, readings: 3, checkAnswers: 0, photos: 0 },
    });
    expect(s.sent).toBe(4);
  });
});

describe('refused batches', () => {
  test('a 400 refuses the batch; its items are pushed one by one, the bad one is set aside with the server message, the rest sync', async () => {
    const h = await harness();
    await roundWithReadings(h, 5);
    const items = await h.store.waitingBatch(10);
    const bad = items[3]; // the third reading
    const server = new FakeServer();
    server.refuse.set(bad.recordId, 'Instrument TI-101 is out of service on this unit');
    const c = client(h, server);
    const r = await c.syncNow();
    expect(r.ok).toBe(true);
    expect(r.refused).toBe(1);
    // First the whole batch (refused), then each of its 6 items alone.
    expect(server.pushes.map((b) => b.rounds.length + b.readings.length)).toEqual([6, 1, 1, 1, 1, 1, 1]);
    expect(server.readings.size).toBe(4);
    expect(server.readings.has(bad.recordId)).toBe(false);
    const s = await c.status();
    expect(s).toMatchObject({ waiting: 0, sent: 5, refused: 1 });
    expect(s.refusedItems).toEqual([
      {
        seq: bad.seq,
        kind: 'reading',
        recordId: bad.recordId,
        message: 'Invalid push: readings.0: Instrument TI-101 is out of service on this unit',
        details: [{ path: 'readings.0', message: 'Instrument TI-101 is out of service on this unit' }],
        refusedAt: new Date(h.clock.t).toISOString(),
      },
    ]);
    expect(s.lastBatchRefusal).toMatchObject({
      items: 6,
      message: 'Invalid push: readings.2: Instrument TI-101 is out of service on this unit',
    });
  });

  test('a refused record never blocks later records, and retryRefused puts it back in the queue', async () => {
    const h = await harness();
    const round = await roundWithReadings(h, 1);
    const [, only] = await h.store.waitingBatch(10);
    const server = new FakeServer();
    server.refuse.set(only.recordId, 'Value is not plausible');
    const c = client(h, server);
    await c.syncNow();
    await h.actions.recordReading({
      roundId: round.id,
      instrumentTag: 'PI-101',
      valueTyped: 10.1,
      unit: 'bar',
      reference: 'gauge',
    });
    await c.syncNow();
    expect(await h.store.outboxCounts()).toMatchObject({ waiting: 0, sent: 2, refused: 1 });
    server.refuse.clear(); // e.g. the server was fixed
    expect(await c.retryRefused()).toBe(1);
    await c.syncNow();
    expect(await h.store.outboxCounts()).toMatchObject({ waiting: 0, sent: 3, refused: 0 });
    expect(server.readings.has(only.recordId)).toBe(true);
  });

  test('classification: 400/403/404/409/413/415/422 refuse; 0, 408, 429 and 5xx retry; 401 is signed out', () => {
    const kinds = [400, 403, 404, 409, 413, 415, 422, 0, 408, 429, 500, 502, 503, 401].map((s) =>
      classifyFailure(failure(s, 'x')),
    );
    expect(kinds).toEqual([
      'refused',
      'refused',
      'refused',
      'refused',
      'refused',
      'refused',
      'refused',
      'retry',
      'retry',
      'retry',
      'retry',
      'retry',
      'retry',
      'signed-out',
    ]);
    expect(classifyFailure(new TypeError('Failed to fetch'))).toBe('retry');
  });
});

describe('retry with backoff', () => {
  test('network errors and 5xx back off exponentially with full jitter (random() = 0.5 → half the ceiling: 0.5, 1, 2, 4 … s, capped at 5 min)', async () => {
    const h = await harness();
    await roundWithReadings(h, 1);
    const server = new FakeServer();
    server.failNext('push', failure(0, 'No connection'), 5);
    server.failNext('push', failure(503, 'Service Unavailable'), 5);
    const c = client(h, server);
    const waits: number[] = [];
    for (let i = 0; i < 10; i++) {
      const r = await c.syncNow();
      expect(r.ok).toBe(false);
      expect(r.problem?.kind).toBe(i < 5 ? 'offline' : 'server');
      waits.push(c.nextAttemptAt()! - h.clock.t);
      // Before the next attempt time, a run is skipped and nothing is sent.
      const pushes = server.pushes.length;
      h.clock.advance(waits[i] - 1);
      expect((await c.syncNow()).skipped).toBe(true);
      expect(server.pushes.length).toBe(pushes);
      h.clock.advance(1);
    }
    expect(waits).toEqual([500, 1000, 2000, 4000, 8000, 16000, 32000, 64000, 128000, 150000]);
    expect(waits.map((w, i) => w / backoffCeiling(i, DEFAULT_BACKOFF))).toEqual(Array(10).fill(0.5));
    const ok = await c.syncNow();
    expect(ok.ok).toBe(true);
    expect(c.nextAttemptAt()).toBeNull();
    expect((await c.status()).problem).toBeNull();
  });

  test('"Sync now" (force) goes at once even while backing off', async () => {
    const h = await harness();
    await roundWithReadings(h, 1);
    const server = new FakeServer();
    server.failNext('push', failure(502, 'Bad Gateway'));
    const c = client(h, server);
    await c.syncNow();
    expect(c.nextAttemptAt()).not.toBeNull();
    expect((await c.syncNow({ force: true })).ok).toBe(true);
  });

  test('an answer that is not a PushResponse is retried, not taken as success', async () => {
    const h = await harness();
    await roundWithReadings(h, 1);
    const server = new FakeServer();
    const real = server.push.bind(server);
    let n = 0;
    server.push = async (b) => (n++ === 0 ? { ok: true } : real(b));
    const c = client(h, server);
    const r = await c.syncNow();
    expect(r.problem?.kind).toBe('bad-response');
    expect(await h.store.outboxCounts()).toMatchObject({ waiting: 2, sent: 0 });
    expect((await c.syncNow({ force: true })).ok).toBe(true);
  });
});

describe('signed out', () => {
  test('a 401 after the session could not refresh stops the run and reports "signed out"; nothing is marked', async () => {
    const h = await harness();
    await roundWithReadings(h, 2);
    const server = new FakeServer();
    server.failNext('push', failure(401, 'Session expired'));
    const c = client(h, server);
    const r = await c.syncNow();
    expect(r.ok).toBe(false);
    const s = await c.status();
    expect(s.signedOut).toBe(true);
    expect(s.problem?.message).toMatch(/^Signed out/);
    expect(s).toMatchObject({ waiting: 3, sent: 0, refused: 0 });
    expect(server.pushes.length).toBe(1);
    expect(server.pulls.length).toBe(0);
  });
});

describe('concurrency', () => {
  test('two syncNow calls at once share one run', async () => {
    const h = await harness();
    await roundWithReadings(h, 2);
    const server = new FakeServer();
    const c: SyncClient = client(h, server);
    const [a, b] = await Promise.all([c.syncNow(), c.syncNow()]);
    expect(a).toBe(b);
    expect(server.pushes.length).toBe(1);
  });
});
