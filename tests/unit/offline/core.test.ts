/**
 * The small pieces: the serial LocalDb wrapper, backoff, UUID formatting, lock detection,
 * persistent-storage request, and the self-running sync schedule.
 */
import { backoffCeiling, backoffDelay, DEFAULT_BACKOFF } from '@/offline/backoff';
import { isLockError, StoreLockedError } from '@/offline/errors';
import { uuidV4FromBytes, UUID_PATTERN } from '@/offline/ids';
import { ensurePersistentStorage } from '@/offline/persist';
import type { Timers } from '@/offline/sync';
import { client, failure, FakeServer, harness, RV1 } from './fixtures';
import { openSqlJsDb } from './sqljs-db';

describe('LocalDb (serial queue + transactions)', () => {
  test('a statement issued while a transaction awaits runs after its COMMIT, never inside it', async () => {
    const db = await openSqlJsDb();
    await db.exec('CREATE TABLE t (x INTEGER)');
    let release!: () => void;
    const gate = new Promise<void>((r) => (release = r));
    const tx = db.transaction(async (t) => {
      await t.run('INSERT INTO t VALUES (1)');
      await gate;
      throw new Error('abandon');
    });
    const outside = db.run('INSERT INTO t VALUES (2)');
    release();
    await expect(tx).rejects.toThrow('abandon');
    await outside;
    // The transaction's row is rolled back; the outside statement was not swept into it.
    expect(await db.all('SELECT x FROM t')).toEqual([{ x: 2 }]);
  });

  test('using the transaction handle after it ended is an error', async () => {
    const db = await openSqlJsDb();
    await db.exec('CREATE TABLE t (x INTEGER)');
    let leaked: { run(sql: string): Promise<unknown> } | null = null;
    await db.transaction(async (t) => {
      leaked = t;
    });
    await expect(leaked!.run('INSERT INTO t VALUES (1)')).rejects.toThrow(
      'A statement ran on a transaction that has already ended.',
    );
  });

  test('a closed database says so', async () => {
    const db = await openSqlJsDb();
    await db.close();
    await expect(db.all('SELECT 1')).rejects.toThrow('The local database is closed.');
  });
});

describe('backoff: exponential with full jitter (common practice; AWS Architecture Blog, "Exponential Backoff And Jitter", 2015)', () => {
  test('ceiling min(cap, base·2ⁿ) with base 1 s and cap 5 min', () => {
    expect([0, 1, 2, 3, 8, 9, 10, 2000].map((n) => backoffCeiling(n))).toEqual([
      1000, 2000, 4000, 8000, 256000, 300000, 300000, 300000,
    ]);
  });

  test('the delay is uniform in [0, ceiling): random 0 → 0, random just under 1 → just under the ceiling', () => {
    expect(backoffDelay(3, () => 0)).toBe(0);
    expect(backoffDelay(3, () => 0.999999)).toBe(7999);
    expect(backoffDelay(20, () => 0.25, DEFAULT_BACKOFF)).toBe(75000);
  });

  test('bad inputs name the input and the limit', () => {
    expect(() => backoffCeiling(-1)).toThrow('backoff attempt must be an integer ≥ 0, got -1');
    expect(() => backoffDelay(0, () => 1)).toThrow('random() must return a number in [0, 1), got 1');
    expect(() => backoffCeiling(0, { baseMs: 0, capMs: 10 })).toThrow(
      'backoff needs 0 < baseMs ≤ capMs, got baseMs=0, capMs=10',
    );
  });
});

describe('UUID v4 formatting (RFC 9562 §4.1, §4.2, §5.4)', () => {
  test('sets version 4 and variant 10 on any 16 bytes', () => {
    expect(uuidV4FromBytes(new Uint8Array(16).fill(0xff))).toBe('ffffffff-ffff-4fff-bfff-ffffffffffff');
    expect(uuidV4FromBytes(new Uint8Array(16))).toBe('00000000-0000-4000-8000-000000000000');
    expect(uuidV4FromBytes(new Uint8Array(16))).toMatch(UUID_PATTERN);
    expect(() => uuidV4FromBytes(new Uint8Array(15))).toThrow('a UUID needs 16 bytes, got 15');
  });
});

describe('a second tab holding the store', () => {
  test.each([
    // Chromium's DOMException text for a second createSyncAccessHandle on the same file
    "NoModificationAllowedError: Failed to execute 'createSyncAccessHandle' on 'FileSystemFileHandle': Access Handles cannot be created if there is another open Access Handle or Writable stream associated with the same file.",
    // what expo-sqlite's worker says on the next call after that failure
    'Invalid VFS state',
    // SQLite's own SQLITE_BUSY text
    'database is locked',
  ])('is recognised: %s', (message) => {
    expect(isLockError(new Error(message))).toBe(true);
  });

  test('a DOMException-like error by name is recognised; other errors are not', () => {
    expect(isLockError(Object.assign(new Error('x'), { name: 'NoModificationAllowedError' }))).toBe(true);
    expect(isLockError(new Error('no such table: rounds'))).toBe(false);
  });

  test('StoreLockedError tells the user what to do', () => {
    expect(new StoreLockedError().message).toBe(
      'Trueround is open in another tab or window, which holds the device store. Close the other tab, then reload this one.',
    );
  });
});

describe('persistent storage (Storage Standard: navigator.storage.persist)', () => {
  test('asked once on the first run, remembered after', async () => {
    const h = await harness({ seed: false });
    let asked = 0;
    const storage = { persisted: async () => false, persist: async () => (asked++, false) };
    expect(await ensurePersistentStorage(h.store, storage)).toBe('denied');
    expect(await ensurePersistentStorage(h.store, storage)).toBe('not-persistent');
    expect(asked).toBe(1);
    expect(JSON.parse((await h.store.getMeta('persist_asked'))!)).toEqual({
      at: '2025-11-30T07:00:00.000Z',
      granted: false,
    });
  });

  test('already persistent: not asked; granted: said so; no storage manager: unsupported', async () => {
    const h = await harness({ seed: false });
    let asked = 0;
    expect(
      await ensurePersistentStorage(h.store, { persisted: async () => true, persist: async () => (asked++, true) }),
    ).toBe('persisted');
    expect(asked).toBe(0);
    expect(await ensurePersistentStorage(h.store, { persisted: async () => false, persist: async () => true })).toBe(
      'granted',
    );
    expect(await ensurePersistentStorage(h.store, null)).toBe('unsupported');
  });
});

describe('the self-running schedule', () => {
  function fakeTimers() {
    const pending: { fn: () => void; ms: number; id: number }[] = [];
    let id = 0;
    const timers: Timers = {
      setTimeout: (fn, ms) => (pending.push({ fn, ms, id: ++id }), id),
      clearTimeout: (h) => {
        const i = pending.findIndex((p) => p.id === h);
        if (i >= 0) pending.splice(i, 1);
      },
    };
    return { timers, pending };
  }
  const settle = () => new Promise((r) => setTimeout(r, 20));

  test('runs at start, soon after a write, at the backoff time after a failure, and stops on stop()', async () => {
    const h = await harness();
    const server = new FakeServer();
    const { timers, pending } = fakeTimers();
    const c = client(h, server, { timers, pollMs: 60_000 });
    c.start();
    await settle();
    expect(pending.map((p) => p.ms)).toEqual([0]);
    pending.shift()!.fn();
    await settle();
    expect(server.pulls.length).toBe(1);
    expect(pending.map((p) => p.ms)).toEqual([60_000]); // idle: poll
    server.failNext('push', failure(503, 'Service Unavailable'));
    await h.actions.startRound(RV1);
    await settle();
    expect(pending.map((p) => p.ms)).toEqual([1_000]); // a write: push soon
    pending.shift()!.fn();
    await settle();
    expect(server.pushes.length).toBe(1);
    expect(pending.map((p) => p.ms)).toEqual([500]); // backoff 0.5 × 1 s
    h.clock.advance(500);
    pending.shift()!.fn();
    await settle();
    expect(server.pushes.length).toBe(2);
    expect(await h.store.outboxCounts()).toMatchObject({ waiting: 0, sent: 1 });
    c.stop();
    expect(pending).toEqual([]);
  });
});
