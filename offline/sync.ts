/**
 * The sync client: pushes the outbox in batches, uploads photos on their own queue, pulls
 * reference data, and keeps a status for the outbox screen. The transport is injected (the app
 * passes ./http-transport over the session's authed request; tests pass a fake server).
 *
 *  - Push: the oldest waiting outbox rows, at most `batchSize` (≤ 500) per PushRequest. A 2xx
 *    marks them sent. A refusal (400 validation and other 4xx that a retry cannot cure) sets the
 *    batch aside and pushes its rows one by one, so the bad record is found and refused alone
 *    with the server's message while every other record goes through. Network errors, 5xx, 408
 *    and 429 stop the run and retry later with exponential backoff and full jitter. A 401 has
 *    already been through the session's refresh: the client stops and says "signed out".
 *  - Photos: once a push has announced a photo and the server wants its bytes, it is uploaded by
 *    its id (and SHA-256), retried with its own backoff until the server has it. A reading never
 *    waits for its photo.
 *  - Pull: with the server's cursor for the site; applying the same pull twice gives the same state.
 *  - Authors: every outbox row and photo carries the person who made it (./actions.ts). A run
 *    pushes and uploads only the signed-in person's (`author()`); another person's records stay
 *    on the device, listed as waiting for them (`othersWaiting`), and go when they sign in here
 *    again. They are never sent with someone else's token: the server stores what a push brings
 *    as the pusher's work, so that would record them as the wrong person's (or be refused).
 */
import {
  CURRENT_PAYLOAD_VERSION,
  MAX_BATCH_ITEMS,
  PullResponse,
  PushResponse,
  type PushCounts,
  type PushRequestV2,
} from '@/shared/api/sync';
import { backoffDelay, DEFAULT_BACKOFF, type BackoffPolicy } from './backoff';
import type { BadRow } from './errors';
import { isoTime, type Clock, type IdSource } from './ids';
import { describeIssues } from './schemas';
import type { OutboxCounts, OutboxItem, RefusedItem, Store, SyncMeta } from './store';

/** What the client needs from the network. Each call resolves with the parsed JSON body. */
export interface SyncTransport {
  push(body: PushRequestV2): Promise<unknown>;
  uploadPhoto(id: string, bytes: Uint8Array, mime: string, sha256: string): Promise<unknown>;
  pull(cursor: number, siteId: string): Promise<unknown>;
}

/**
 * What a transport throws on failure (hooks/api-client's ApiError has this shape): `status` 0
 * when the server could not be reached.
 */
export interface TransportFailure {
  status: number;
  code?: string;
  message: string;
  details?: unknown;
}

export const MAX_PUSH_BATCH = 500;

export type FailureKind = 'signed-out' | 'refused' | 'retry';

/** Status codes a retry cannot cure: the request itself is refused. */
const REFUSAL_STATUSES = new Set([400, 403, 404, 409, 410, 413, 415, 422]);

/** How the sync client treats a failure of the transport. Anything without a status is retried. */
export function classifyFailure(e: unknown): FailureKind {
  const status = (e as { status?: unknown } | null)?.status;
  if (typeof status !== 'number') return 'retry';
  if (status === 401) return 'signed-out';
  if (REFUSAL_STATUSES.has(status)) return 'refused';
  return 'retry'; // 0 (no network), 408, 425, 429, 5xx, anything else
}

function failureMessage(e: unknown): string {
  if (e && typeof e === 'object' && 'message' in e && typeof (e as { message: unknown }).message === 'string') {
    return (e as { message: string }).message;
  }
  return String(e);
}

export type ProblemKind = 'offline' | 'server' | 'signed-out' | 'bad-response';

export interface SyncProblem {
  kind: ProblemKind;
  message: string;
  /** Device time it happened. */
  at: string;
}

export interface BatchRefusal {
  message: string;
  details: unknown;
  items: number;
  at: string;
}

export interface SyncStatus extends OutboxCounts, SyncMeta {
  running: boolean;
  signedOut: boolean;
  /** Why the last run stopped early, if it did. */
  problem: SyncProblem | null;
  /** The last refused batch (its rows are then pushed alone to find the bad one). */
  lastBatchRefusal: BatchRefusal | null;
  /** Device time (ms) of the next automatic attempt while backing off; null when not backing off. */
  nextAttemptAt: number | null;
  refusedItems: RefusedItem[];
  badRows: BadRow[];
}

export interface SyncResult {
  /** False when the run was skipped (backing off) or stopped early. */
  ok: boolean;
  skipped: boolean;
  /** Outbox rows accepted by the server (applied or already there). */
  sent: number;
  /** Outbox rows refused alone in this run. */
  refused: number;
  photosUploaded: number;
  pulled: boolean;
  problem: SyncProblem | null;
}

export interface Timers {
  setTimeout(fn: () => void, ms: number): unknown;
  clearTimeout(handle: unknown): void;
}

export interface SyncClientOptions {
  store: Store;
  transport: SyncTransport;
  ids: IdSource;
  clock: Clock;
  /** Uniform in [0, 1); the jitter of the backoff. */
  random?: () => number;
  /** The site whose reference data to pull (null: no pull). */
  siteId?: () => string | null;
  /** The signed-in user's id: only their outbox rows and photos are sent. Omitted: every row (a store without authors). */
  author?: () => string | null;
  batchSize?: number;
  backoff?: BackoffPolicy;
  /** For `start()`: timers and the idle poll interval (ms). */
  timers?: Timers;
  pollMs?: number;
}

class Stop extends Error {}

const zeroCounts = (): PushCounts => ({ rounds: 0, readings: 0, checkAnswers: 0, photos: 0 });
const addCounts = (a: PushCounts, b: PushCounts): PushCounts => ({
  rounds: a.rounds + b.rounds,
  readings: a.readings + b.readings,
  checkAnswers: a.checkAnswers + b.checkAnswers,
  photos: a.photos + b.photos,
});

/**
 * The push body of some outbox rows. A round may sit in the outbox several times (started, a
 * dismissal added, finished); each row holds the whole round as it then was, so the latest row
 * stands for all of them.
 */
export function buildPushBody(items: OutboxItem[], deviceId: string, sentAt: string): PushRequestV2 {
  const rounds = new Map<string, OutboxItem<'round'>>();
  const body: PushRequestV2 = {
    payloadVersion: CURRENT_PAYLOAD_VERSION as 2,
    deviceId,
    sentAt,
    rounds: [],
    readings: [],
    checkAnswers: [],
    photos: [],
  };
  for (const it of items) {
    if (it.kind === 'round') {
      const prev = rounds.get(it.recordId);
      if (!prev || prev.seq < it.seq) rounds.set(it.recordId, it as OutboxItem<'round'>);
    }
  }
  const seenRound = new Set<string>();
  for (const it of items) {
    switch (it.kind) {
      case 'round':
        if (!seenRound.has(it.recordId)) {
          seenRound.add(it.recordId);
          body.rounds.push(rounds.get(it.recordId)!.payload);
        }
        break;
      case 'reading':
        body.readings.push((it as OutboxItem<'reading'>).payload);
        break;
      case 'checkAnswer':
        body.checkAnswers.push((it as OutboxItem<'checkAnswer'>).payload);
        break;
      case 'photo':
        body.photos.push((it as OutboxItem<'photo'>).payload);
        break;
    }
  }
  return body;
}

export class SyncClient {
  private readonly store: Store;
  private readonly transport: SyncTransport;
  private readonly ids: IdSource;
  private readonly clock: Clock;
  private readonly random: () => number;
  private readonly siteId: () => string | null;
  private readonly author?: () => string | null;
  private readonly batchSize: number;
  private readonly policy: BackoffPolicy;
  private readonly timers?: Timers;
  private readonly pollMs: number;

  private running: Promise<SyncResult> | null = null;
  private failures = 0;
  private backoffUntil: number | null = null;
  private problem: SyncProblem | null = null;
  private signedOut = false;
  private lastBatchRefusal: BatchRefusal | null = null;
  private listeners = new Set<(s: SyncStatus) => void>();
  private timer: unknown = null;
  private started = false;
  private unsubscribeStore: (() => void) | null = null;

  constructor(opts: SyncClientOptions) {
    this.store = opts.store;
    this.transport = opts.transport;
    this.ids = opts.ids;
    this.clock = opts.clock;
    this.random = opts.random ?? Math.random;
    this.siteId = opts.siteId ?? (() => null);
    this.author = opts.author;
    const size = opts.batchSize ?? MAX_PUSH_BATCH;
    const limit = Math.min(MAX_PUSH_BATCH, MAX_BATCH_ITEMS);
    if (!Number.isInteger(size) || size < 1 || size > limit) {
      throw new RangeError(`batchSize must be a whole number from 1 to ${limit}, got ${size}`);
    }
    this.batchSize = size;
    this.policy = opts.backoff ?? DEFAULT_BACKOFF;
    this.timers = opts.timers;
    this.pollMs = opts.pollMs ?? 60_000;
  }

  /** Device time (ms) of the next attempt while backing off, else null. */
  nextAttemptAt(): number | null {
    return this.backoffUntil;
  }

  /**
   * One sync run: push, photos, pull. Concurrent calls share the run in progress. While backing
   * off, a call before the next attempt time is skipped unless `force` (the "Sync now" button).
   */
  syncNow(opts: { force?: boolean } = {}): Promise<SyncResult> {
    if (this.running) return this.running;
    const now = this.clock.now();
    if (!opts.force && this.backoffUntil !== null && now < this.backoffUntil) {
      return Promise.resolve({
        ok: false,
        skipped: true,
        sent: 0,
        refused: 0,
        photosUploaded: 0,
        pulled: false,
        problem: this.problem,
      });
    }
    this.running = this.run().finally(() => {
      this.running = null;
      void this.emit();
      this.schedule();
    });
    void this.emit();
    return this.running;
  }

  async retryRefused(seqs?: number[]): Promise<number> {
    const n = await this.store.retryRefused(seqs);
    await this.emit();
    return n;
  }

  async status(): Promise<SyncStatus> {
    const scope = this.scope() ?? undefined;
    const [counts, meta, refusedItems] = await Promise.all([
      this.store.outboxCounts(scope),
      this.store.syncMeta(),
      this.store.refusedItems(scope),
    ]);
    return {
      ...counts,
      ...meta,
      running: this.running !== null,
      signedOut: this.signedOut,
      problem: this.problem,
      lastBatchRefusal: this.lastBatchRefusal,
      nextAttemptAt: this.backoffUntil,
      refusedItems,
      badRows: this.store.badRows(),
    };
  }

  /** Listens to status changes (after each phase of a run and after each store write). */
  subscribe(fn: (s: SyncStatus) => void): () => void {
    this.listeners.add(fn);
    return () => this.listeners.delete(fn);
  }

  /**
   * Runs by itself: soon after each store write, at the backoff time after a failure, when a
   * photo is due, and every `pollMs` otherwise. Needs `timers`.
   */
  start(): void {
    if (!this.timers) throw new Error('SyncClient.start needs timers');
    if (this.started) return;
    this.started = true;
    this.unsubscribeStore = this.store.onChange(() => {
      void this.emit();
      if (!this.running && this.backoffUntil === null) this.schedule(1_000);
    });
    this.schedule(0);
  }

  stop(): void {
    this.started = false;
    this.unsubscribeStore?.();
    this.unsubscribeStore = null;
    if (this.timer !== null) this.timers?.clearTimeout(this.timer);
    this.timer = null;
  }

  private schedule(inMs?: number): void {
    if (!this.started || !this.timers) return;
    if (this.timer !== null) this.timers.clearTimeout(this.timer);
    void (async () => {
      let delay = inMs;
      if (delay === undefined) {
        const now = this.clock.now();
        const scope = this.scope();
        const photo = scope === null ? null : await this.store.nextPhotoDue(scope).catch(() => null);
        const candidates = [now + this.pollMs];
        if (this.backoffUntil !== null) candidates.push(this.backoffUntil);
        else if (photo !== null) candidates.push(Math.max(photo, now + 1_000));
        delay = Math.max(0, Math.min(...candidates) - now);
      }
      if (!this.started || !this.timers) return;
      if (this.timer !== null) this.timers.clearTimeout(this.timer);
      this.timer = this.timers.setTimeout(() => {
        this.timer = null;
        if (this.signedOut) return;
        void this.syncNow();
      }, delay);
    })();
  }

  private async emit(): Promise<void> {
    if (this.listeners.size === 0) return;
    try {
      const s = await this.status();
      for (const fn of [...this.listeners]) fn(s);
    } catch {
      // status is best effort (the store may be closing)
    }
  }

  /** Whose rows to send: the signed-in user's (a store without authors: all). Null while nobody is signed in. */
  private scope(): string | undefined | null {
    return this.author ? this.author() : undefined;
  }

  private note(kind: ProblemKind, message: string): SyncProblem {
    this.problem = { kind, message, at: isoTime(this.clock.now()) };
    return this.problem;
  }

  private backOff(kind: ProblemKind, message: string): never {
    const delay = backoffDelay(this.failures, this.random, this.policy);
    this.failures += 1;
    this.backoffUntil = this.clock.now() + delay;
    this.note(kind, message);
    throw new Stop();
  }

  private signOut(): never {
    this.signedOut = true;
    this.note('signed-out', 'Signed out: sign in again to send what is waiting. Nothing on this device is lost.');
    throw new Stop();
  }

  private async run(): Promise<SyncResult> {
    const result: SyncResult = {
      ok: true,
      skipped: false,
      sent: 0,
      refused: 0,
      photosUploaded: 0,
      pulled: false,
      problem: null,
    };
    this.signedOut = false;
    try {
      await this.pushAll(result);
      await this.uploadPhotos(result);
      await this.pull(result);
      this.failures = 0;
      this.backoffUntil = null;
      this.problem = null;
    } catch (e) {
      if (!(e instanceof Stop)) {
        // A fault on the device (the store) rather than the network: report, back off.
        try {
          this.backOff('server', `Sync stopped: ${failureMessage(e)}`);
        } catch {
          /* Stop */
        }
      }
      result.ok = false;
      result.problem = this.problem;
    }
    return result;
  }

  private async pushAll(result: SyncResult): Promise<void> {
    let deviceId: string | null = null;
    const totals = { applied: zeroCounts(), duplicates: zeroCounts() };
    let pushed = false;
    let serverTime: string | null = null;
    const scope = this.scope();
    if (scope === null) return; // nobody signed in: nothing is anybody's to send
    try {
      for (;;) {
        // Rows of a refused batch go first, one by one, in recording order.
        const alone = await this.store.nextIsolated(scope);
        const items = alone ? [alone] : await this.store.waitingBatch(this.batchSize, scope);
        if (items.length === 0) break;
        deviceId ??= await this.store.deviceId(this.ids);
        const body = buildPushBody(items, deviceId, isoTime(this.clock.now()));
        let raw: unknown;
        try {
          raw = await this.transport.push(body);
        } catch (e) {
          const kind = classifyFailure(e);
          if (kind === 'signed-out') this.signOut();
          if (kind === 'retry') {
            const status = (e as { status?: number }).status;
            this.backOff(
              status === 0 ? 'offline' : 'server',
              status === 0
                ? 'No connection to the server; will retry.'
                : `The server could not take the records (${failureMessage(e)}); will retry.`,
            );
          }
          const message = failureMessage(e);
          const details = (e as { details?: unknown }).details ?? null;
          if (items.length > 1) {
            this.lastBatchRefusal = { message, details, items: items.length, at: isoTime(this.clock.now()) };
            await this.store.markIsolating(items.map((i) => i.seq));
          } else {
            await this.store.markRefused([items[0].seq], message, details);
            result.refused += 1;
          }
          void this.emit();
          continue;
        }
        const parsed = PushResponse.safeParse(raw);
        if (!parsed.success)
          this.backOff(
            'bad-response',
            `The server's answer to a push did not make sense (${describeIssues(parsed.error)}); will retry.`,
          );
        const resp = parsed.data!;
        await this.store.markSent(items, resp.photosWanted);
        result.sent += items.length;
        totals.applied = addCounts(totals.applied, resp.applied);
        totals.duplicates = addCounts(totals.duplicates, resp.duplicates);
        pushed = true;
        serverTime = resp.serverTime;
        void this.emit();
      }
    } finally {
      if (pushed && serverTime) await this.store.noteSync(serverTime, totals);
    }
  }

  private async uploadPhotos(result: SyncResult): Promise<void> {
    // Each photo is tried at most once per run (a zero jitter must not spin on a failing one).
    const tried = new Set<string>();
    const scope = this.scope();
    if (scope === null) return;
    for (;;) {
      const due = (await this.store.photosDue(this.clock.now(), tried.size + 10, scope)).filter(
        (p) => !tried.has(p.id),
      );
      if (due.length === 0) return;
      for (const p of due) {
        tried.add(p.id);
        const bytes = await this.store.photoData(p.id);
        if (!bytes) continue;
        try {
          await this.transport.uploadPhoto(p.id, bytes, p.mime, p.sha256);
        } catch (e) {
          const kind = classifyFailure(e);
          if (kind === 'signed-out') this.signOut();
          const status = (e as { status?: number }).status;
          // 404: the server does not know the photo yet (its push not applied): try again later.
          if (kind === 'refused' && status !== 404) {
            await this.store.markPhotoRefused(p.id, failureMessage(e));
            void this.emit();
            continue;
          }
          const next = this.clock.now() + backoffDelay(Math.min(p.attempts, 30), this.random, this.policy);
          await this.store.markPhotoFailed(p.id, failureMessage(e), next);
          void this.emit();
          if (status === 0) {
            this.note('offline', 'No connection to the server; photos will upload later.');
            return; // the others would fail the same way
          }
          continue;
        }
        await this.store.markPhotoStored(p.id);
        result.photosUploaded += 1;
        void this.emit();
      }
    }
  }

  private async pull(result: SyncResult): Promise<void> {
    const siteId = this.siteId();
    if (!siteId) return;
    const cursor = await this.store.pullCursor(siteId);
    let raw: unknown;
    try {
      raw = await this.transport.pull(cursor, siteId);
    } catch (e) {
      const kind = classifyFailure(e);
      if (kind === 'signed-out') this.signOut();
      if (kind === 'retry') {
        const status = (e as { status?: number }).status;
        this.backOff(
          status === 0 ? 'offline' : 'server',
          `Could not fetch routes and instruments (${failureMessage(e)}); will retry.`,
        );
      }
      this.note('server', `The server refused to send routes and instruments: ${failureMessage(e)}`);
      throw new Stop();
    }
    const parsed = PullResponse.safeParse(raw);
    if (!parsed.success)
      this.backOff(
        'bad-response',
        `The server's routes and instruments did not make sense (${describeIssues(parsed.error)}); will retry.`,
      );
    await this.store.applyPull(siteId, parsed.data!);
    await this.store.noteSync(parsed.data!.serverTime);
    this.store.notifyChange();
    result.pulled = true;
  }
}

export function createSyncClient(opts: SyncClientOptions): SyncClient {
  return new SyncClient(opts);
}
