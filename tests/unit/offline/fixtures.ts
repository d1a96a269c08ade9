/**
 * Test fixtures of the offline core: deterministic ids and clock, a store over sql.js, a small
 * pull of reference data (one unit, four instruments, one route), and a fake sync server that
 * behaves like the wire contract in shared/api/sync.ts says (idempotent by client id, refuses a
 * whole batch on validation, wants the bytes of photos it does not have).
 */
import { createHash } from 'node:crypto';
import {
  PullResponse,
  PushRequest,
  type PushCounts,
  type PushRequestV2,
  type SyncInstrument,
  type SyncRoute,
  type SyncUnit,
} from '@/shared/api/sync';
import { createActions, type Actions } from '@/offline/actions';
import { uuidV4FromBytes, type Clock, type IdSource } from '@/offline/ids';
import { openStore, type Store } from '@/offline/store';
import { SyncClient, type SyncClientOptions, type SyncTransport, type TransportFailure } from '@/offline/sync';
import { openSqlJsDb, type SqlJsDb } from './sqljs-db';

/** UUID v4 (RFC 9562 §5.4) from a counter: distinct, valid, and the same on every run. */
export function counterIds(prefix = 0xa0): IdSource & { count: number } {
  const src = {
    count: 0,
    uuid() {
      const b = new Uint8Array(16);
      b[0] = prefix;
      const n = ++src.count;
      for (let i = 0; i < 6; i++) b[15 - i] = Math.floor(n / 256 ** i) % 256;
      return uuidV4FromBytes(b);
    },
  };
  return src;
}

export function manualClock(start = Date.UTC(2025, 10, 30, 7, 0, 0)): Clock & { t: number; advance(ms: number): void } {
  const c = {
    t: start,
    now: () => c.t,
    advance(ms: number) {
      c.t += ms;
    },
  };
  return c;
}

export const SITE = '5e0f6a64-1b7a-4d49-9a65-3f7d7b1c0001';
export const UNIT = '5e0f6a64-1b7a-4d49-9a65-3f7d7b1c0002';
export const ROUTE = '5e0f6a64-1b7a-4d49-9a65-3f7d7b1c0003';
export const RV1 = '5e0f6a64-1b7a-4d49-9a65-3f7d7b1c0004';
export const RV2 = '5e0f6a64-1b7a-4d49-9a65-3f7d7b1c0005';
export const INSTRUMENTS = {
  'PI-101': '5e0f6a64-1b7a-4d49-9a65-3f7d7b1c0101',
  'TI-101': '5e0f6a64-1b7a-4d49-9a65-3f7d7b1c0102',
  'PI-102': '5e0f6a64-1b7a-4d49-9a65-3f7d7b1c0103',
  'PI-BARO': '5e0f6a64-1b7a-4d49-9a65-3f7d7b1c0104',
} as const;

export function unit(syncVersion = 1, name = 'Unit 1 (back-pressure set)'): SyncUnit {
  return { id: UNIT, siteId: SITE, name, model: { id: 'bp-set-1', points: [] }, modelVersion: 'c0ffee01', syncVersion };
}

export function instrument(
  tag: keyof typeof INSTRUMENTS,
  syncVersion = 1,
  status: SyncInstrument['status'] = 'ok',
): SyncInstrument {
  const pressure = tag.startsWith('PI');
  return {
    id: INSTRUMENTS[tag],
    unitId: UNIT,
    tag,
    quantity: pressure ? 'pressure' : 'temperature',
    pointRef: tag === 'PI-BARO' ? null : 'p1',
    equipmentRef: null,
    reference: pressure ? (tag === 'PI-BARO' ? 'absolute' : 'gauge') : null,
    // SI, in the instrument's own reference: 0–16 bar(g) = 0–1.6 MPa gauge; 0–300 °C = 273.15–573.15 K
    range: pressure ? { min: 0, max: 1.6e6 } : { min: 273.15, max: 573.15 },
    accuracy: { kind: 'class', percentOfSpan: 1 },
    gaugeUnit: pressure ? 'bar' : '°C',
    calibrationDate: '2025-06-01',
    calibrationIntervalDays: 365,
    status,
    isBarometer: tag === 'PI-BARO',
    updatedAt: '2025-11-01T00:00:00.000Z',
    rowVersion: 1,
    syncVersion,
  };
}

export function route(versionId = RV1, number = 1, syncVersion = 1): SyncRoute {
  return {
    id: ROUTE,
    siteId: SITE,
    unitId: UNIT,
    name: 'Boiler house morning round',
    syncVersion,
    version: {
      id: versionId,
      number,
      publishedAt: '2025-11-01T00:00:00.000Z',
      template: {
        id: 'boiler-house',
        name: 'Boiler house morning round',
        unitId: 'bp-set-1',
        stops: [
          {
            id: 'drum',
            name: 'Steam drum',
            area: 'Boiler house, level 3',
            readings: [
              { tag: 'PI-101', unit: 'bar', reference: 'gauge', band: { min: 9, max: 11 }, required: true },
              { tag: 'TI-101', unit: '°C', band: { min: 180, max: 190 }, required: true },
              { tag: 'PI-102', unit: 'bar', reference: 'gauge', band: { min: 9, max: 11 }, required: false },
            ],
            checks: [
              {
                id: 'gauge-glass-clear',
                kind: 'yes-no',
                prompt: 'Is the gauge glass clear?',
                photoRequired: false,
                expected: true,
              },
              {
                id: 'trap-state',
                kind: 'choice',
                prompt: 'Steam trap',
                photoRequired: false,
                options: ['working', 'blowing', 'cold'],
              },
            ],
          },
        ],
      },
    },
  };
}

export function pull(cursor = 3, extra: Partial<PullResponse> = {}): PullResponse {
  return PullResponse.parse({
    cursor,
    units: [unit()],
    instruments: [instrument('PI-101'), instrument('TI-101'), instrument('PI-102'), instrument('PI-BARO')],
    routes: [route()],
    serverTime: '2025-11-30T07:00:00.000Z',
    ...extra,
  });
}

export interface Harness {
  db: SqlJsDb;
  store: Store;
  actions: Actions;
  ids: ReturnType<typeof counterIds>;
  clock: ReturnType<typeof manualClock>;
}

export function sha256Hex(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

export async function harness(opts: { seed?: boolean; db?: SqlJsDb } = {}): Promise<Harness> {
  const db = opts.db ?? (await openSqlJsDb());
  const clock = manualClock();
  const ids = counterIds();
  const store = await openStore(db, { clock });
  if (opts.seed !== false) await store.applyPull(SITE, pull());
  const actions = createActions({ store, ids, clock, sha256: async (b) => sha256Hex(b) });
  return { db, store, actions, ids, clock };
}

/** A failure as the app's transport throws it (hooks/api-client ApiError shape). */
export function failure(status: number, message: string, details?: unknown): TransportFailure & Error {
  return Object.assign(new Error(message), { status, code: status === 0 ? 'network' : `http_${status}`, details });
}

type Op = 'push' | 'uploadPhoto' | 'pull';

/** An in-memory server keeping to the wire contract. */
export class FakeServer implements SyncTransport {
  rounds = new Map<string, { status: string; dismissals: number; finishedAt: string | null | undefined }>();
  readings = new Map<string, unknown>();
  answers = new Map<string, unknown>();
  photos = new Map<string, { sha256: string; mime: string; bytes: number }>();
  photoBytes = new Map<string, Uint8Array>();
  pushes: PushRequestV2[] = [];
  uploads: string[] = [];
  pulls: { cursor: number; siteId: string }[] = [];
  private faults: { op: Op; error: Error; keepGoing?: boolean }[] = [];
  /** Records the server refuses on validation (by id), with the message. */
  refuse = new Map<string, string>();
  pullData: PullResponse = pull();
  /** When set, the server applies the push and then the answer is lost (network drop). */
  loseNextAnswer = false;

  failNext(op: Op, error: Error, times = 1): void {
    for (let i = 0; i < times; i++) this.faults.push({ op, error });
  }

  private fault(op: Op) {
    const i = this.faults.findIndex((f) => f.op === op);
    if (i >= 0) throw this.faults.splice(i, 1)[0].error;
  }

  async push(body: PushRequestV2): Promise<unknown> {
    this.pushes.push(JSON.parse(JSON.stringify(body)) as PushRequestV2);
    this.fault('push');
    const parsed = PushRequest.safeParse(body);
    if (!parsed.success) {
      throw failure(
        400,
        'Invalid push',
        parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message })),
      );
    }
    const b = parsed.data;
    const issues: { path: string; message: string }[] = [];
    b.readings.forEach((r, i) => {
      if (!this.rounds.has(r.roundId) && !b.rounds.some((x) => x.id === r.roundId))
        issues.push({ path: `readings.${i}.roundId`, message: 'Unknown round' });
    });
    for (const [kind, list] of [
      ['rounds', b.rounds],
      ['readings', b.readings],
      ['checkAnswers', b.checkAnswers],
      ['photos', b.photos],
    ] as const) {
      list.forEach((x: { id: string }, i: number) => {
        const why = this.refuse.get(x.id);
        if (why) issues.push({ path: `${kind}.${i}`, message: why });
      });
    }
    if (issues.length) throw failure(400, `Invalid push: ${issues[0].path}: ${issues[0].message}`, issues);
    // One transaction: nothing above failed, apply all.
    const applied: PushCounts = { rounds: 0, readings: 0, checkAnswers: 0, photos: 0 };
    const duplicates: PushCounts = { rounds: 0, readings: 0, checkAnswers: 0, photos: 0 };
    for (const r of b.rounds) {
      const had = this.rounds.get(r.id);
      const next = { status: r.status, dismissals: r.dismissals.length, finishedAt: r.finishedAt };
      if (!had || (had.status !== 'finished' && r.status === 'finished') || next.dismissals > had.dismissals) {
        this.rounds.set(r.id, next);
        applied.rounds++;
      } else duplicates.rounds++;
    }
    for (const [map, list, key] of [
      [this.readings, b.readings, 'readings'],
      [this.answers, b.checkAnswers, 'checkAnswers'],
    ] as const) {
      for (const x of list) {
        if (map.has(x.id)) duplicates[key]++;
        else {
          map.set(x.id, x);
          applied[key]++;
        }
      }
    }
    for (const p of b.photos) {
      if (this.photos.has(p.id)) duplicates.photos++;
      else {
        this.photos.set(p.id, { sha256: p.sha256, mime: p.mime, bytes: p.bytes });
        applied.photos++;
      }
    }
    const photosWanted = b.photos.filter((p) => !this.photoBytes.has(p.id)).map((p) => p.id);
    if (this.loseNextAnswer) {
      this.loseNextAnswer = false;
      throw failure(0, 'No connection to the Trueround server.');
    }
    return { applied, duplicates, serverTime: '2025-11-30T08:00:00.000Z', photosWanted };
  }

  async uploadPhoto(id: string, bytes: Uint8Array, mime: string, sha256: string): Promise<unknown> {
    this.uploads.push(id);
    this.fault('uploadPhoto');
    const meta = this.photos.get(id);
    if (!meta) throw failure(404, `No photo ${id}`);
    if (sha256 !== meta.sha256 || sha256Hex(bytes) !== meta.sha256)
      throw failure(400, 'The bytes do not match the announced SHA-256');
    if (mime !== meta.mime) throw failure(415, `Expected ${meta.mime}`);
    const created = !this.photoBytes.has(id);
    this.photoBytes.set(id, bytes);
    return { id, stored: true, created, mime, width: 640, height: 480, thumbWidth: 160, thumbHeight: 120 };
  }

  async pull(cursor: number, siteId: string): Promise<unknown> {
    this.pulls.push({ cursor, siteId });
    this.fault('pull');
    const d = this.pullData;
    return {
      cursor: Math.max(cursor, d.cursor),
      units: d.units.filter((u) => u.syncVersion > cursor),
      instruments: d.instruments.filter((i) => i.syncVersion > cursor),
      routes: d.routes.filter((r) => r.syncVersion > cursor),
      serverTime: d.serverTime,
    };
  }
}

export function client(h: Harness, server: SyncTransport, extra: Partial<SyncClientOptions> = {}): SyncClient {
  return new SyncClient({
    store: h.store,
    transport: server,
    ids: counterIds(0xd0),
    clock: h.clock,
    random: () => 0.5,
    siteId: () => SITE,
    ...extra,
  });
}

/** Every user table's rows, for "same state" comparisons. */
export async function dump(db: SqlJsDb, tables: string[]): Promise<Record<string, unknown[]>> {
  const out: Record<string, unknown[]> = {};
  for (const t of tables) out[t] = await db.all(`SELECT * FROM ${t} ORDER BY rowid`);
  return out;
}
