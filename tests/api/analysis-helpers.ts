/**
 * What the analysis, work-order, instrument and export API tests share: a seeded database, the
 * app with the push hook and the notifier recorded, and rounds of the Fernhallow demo unit at its
 * design point (shared/cycle demoDesignReadings: every balance closes by construction, IAPWS-IF97)
 * pushed through POST /api/sync/push on the demo routes' route versions, with chosen instruments
 * biased by a number of their standard uncertainties.
 */
import { randomUUID } from 'node:crypto';
import type { Express } from 'express';
import type { DataSource } from 'typeorm';
import request from 'supertest';
import { createApp } from '../../server/app';
import type { Notifier } from '../../server/notify';
import { demoUser } from '../../server/seed/demo-users';
import { analyseRound } from '../../shared/cycle';
import { mulberry32 } from '../../shared/random';
import { demoDesignReadings, demoUnit } from '../../demo/unit';
import type { PushRequestV2 } from '../../shared/api/sync';
import { barometricFromElevation, fromSI, type Unit } from '../../shared/units';
import { bearer, signIn, testConfig } from './helpers/app';
import { createTestDatabase, type TestDb } from './helpers/db';

export const ROLES = ['tech', 'planner', 'engineer', 'admin', 'brackPlanner'] as const;
export type Who = (typeof ROLES)[number];

export interface NotifierCalls {
  opened: string[];
  assigned: [string, string][];
  findings: string[];
}

export interface World {
  db: TestDb;
  app: Express;
  tokens: Record<Who, string>;
  userIds: Record<Who, string>;
  fernId: string;
  brackId: string;
  /** route key → current route version id */
  version: Record<string, string>;
  /** Fernhallow instrument tag → id */
  inst: Record<string, string>;
  /** rounds the push hook was told about, in order */
  pushed: string[][];
  calls: NotifierCalls;
  /** the notifier the app was given (records into `calls`) */
  notifier: Notifier;
  /** σ of each demo instrument at design (shared/cycle, the instrument's accuracy specification) */
  sigma: Record<string, number>;
}

/** Fernhallow's barometric pressure by its elevation, 112 m (ICAO standard atmosphere). */
export const FERN_BARO = barometricFromElevation(112);

export async function makeWorld(
  options: { hooks?: (ids: string[]) => void | Promise<void>; env?: Record<string, string> } = {},
): Promise<World> {
  const db = await createTestDatabase();
  const pushed: string[][] = [];
  const calls: NotifierCalls = { opened: [], assigned: [], findings: [] };
  const notifier: Notifier = {
    workOrderOpened: (id) => void calls.opened.push(id),
    assigned: (id, user) => void calls.assigned.push([id, user]),
    findingsStored: (roundId) => void calls.findings.push(roundId),
  };
  const app = createApp({
    config: testConfig(db.url, options.env),
    dataSource: db.dataSource,
    notifier,
    syncHooks: {
      onRoundsPushed: async (ids) => {
        pushed.push(ids);
        await options.hooks?.(ids);
      },
    },
  });
  const tokens = {} as Record<Who, string>;
  const userIds = {} as Record<Who, string>;
  const who: Record<Who, [Parameters<typeof demoUser>[0], Parameters<typeof demoUser>[1]]> = {
    tech: ['technician', 'fernhallow'],
    planner: ['planner', 'fernhallow'],
    engineer: ['engineer', 'fernhallow'],
    admin: ['admin', 'fernhallow'],
    brackPlanner: ['planner', 'brackenmoor'],
  };
  for (const k of ROLES) {
    const s = await signIn(app, demoUser(...who[k]).email);
    tokens[k] = s.accessToken;
    userIds[k] = s.user.id;
  }
  const [brack] = (await db.dataSource.query(`SELECT "id" FROM "sites" WHERE "slug" = 'brackenmoor'`)) as {
    id: string;
  }[];
  const { fernId, version, inst, sigma } = await roundMaker(db.dataSource);
  return { db, app, tokens, userIds, fernId, brackId: brack.id, version, inst, pushed, calls, notifier, sigma };
}

/** What designRound needs of a World, read from a seeded demo database. */
export async function roundMaker(ds: DataSource): Promise<Pick<World, 'inst' | 'version' | 'sigma' | 'fernId'>> {
  const [fern] = (await ds.query(`SELECT "id" FROM "sites" WHERE "slug" = 'fernhallow'`)) as { id: string }[];
  const version: Record<string, string> = {};
  for (const r of (await ds.query(`SELECT "key", "current_version_id" FROM "routes"`)) as {
    key: string;
    current_version_id: string;
  }[]) {
    version[r.key] = r.current_version_id;
  }
  const inst: Record<string, string> = {};
  for (const r of (await ds.query(
    `SELECT i."tag", i."id" FROM "instruments" i JOIN "units" u ON u."id" = i."unit_id" WHERE u."site_id" = $1`,
    [fern.id],
  )) as { tag: string; id: string }[]) {
    inst[r.tag] = r.id;
  }
  const design = analyseRound(demoUnit, demoDesignReadings(FERN_BARO), { barometricPa: FERN_BARO });
  const sigma: Record<string, number> = {};
  for (const i of design.instruments) if (i.sigma !== null) sigma[i.tag] = i.sigma;
  return { fernId: fern.id, version, inst, sigma };
}

export interface RoundOptions {
  /** tag → standard uncertainties to add to the design reading (SI, absolute) */
  bias?: Record<string, number>;
  /**
   * Noise on every reading, in its σ (default 0.2): uniform in ±jitter·σ from a seeded generator.
   * Readings of real gauges never repeat to the last digit; without it, three design rounds in a
   * row would look stuck to the stuck-value check wherever a neighbour moved.
   */
  jitter?: number;
  /** seed of the jitter (default: a counter, so every round differs) */
  seed?: number;
  /** tags whose reading gets a photo of the gauge face announced (metadata only; the bytes are not uploaded) */
  photos?: string[];
  /** tag → the note to type with that reading */
  notes?: Record<string, string>;
  /** tag → the value to type instead (in its face unit) */
  typed?: Record<string, number>;
  routeKey?: string;
  status?: 'finished' | 'in-progress';
  roundId?: string;
  /** add the site barometer PI-001, reading this (mbar) */
  barometerMbar?: number;
  deviceTime?: string;
}

export interface BuiltRound {
  roundId: string;
  body: PushRequestV2;
  /** reading id by tag */
  readingIds: Record<string, string>;
  /** photo id by tag */
  photoIds: Record<string, string>;
}

let seedCounter = 1;

/** A round of every demo instrument at design (as its face shows it), with noise, some biased. */
export function designRound(w: World, o: RoundOptions = {}): BuiltRound {
  const roundId = o.roundId ?? randomUUID();
  const t = o.deviceTime ?? new Date().toISOString();
  const baro = o.barometerMbar !== undefined ? o.barometerMbar * 100 : FERN_BARO;
  const readingIds: Record<string, string> = {};
  const rnd = mulberry32(o.seed ?? seedCounter++);
  const jitter = o.jitter ?? 0.2;
  const readings: PushRequestV2['readings'] = demoDesignReadings(baro).map((r) => {
    const i = demoUnit.instruments.find((x) => x.tag === r.instrumentTag)!;
    const s = w.sigma[r.instrumentTag];
    const si = r.valueSI + (o.bias?.[r.instrumentTag] ?? 0) * s + jitter * (2 * rnd() - 1) * s;
    let value = fromSI(i.quantity, si, r.shown.unit as Unit, r.shown.reference, { barometricPa: baro });
    if (o.typed?.[r.instrumentTag] !== undefined) value = o.typed[r.instrumentTag];
    const id = randomUUID();
    readingIds[r.instrumentTag] = id;
    return {
      id,
      roundId,
      instrumentId: w.inst[r.instrumentTag],
      valueTyped: value,
      unit: r.shown.unit,
      reference: r.shown.reference ?? null,
      deviceTime: t,
      note: o.notes?.[r.instrumentTag] ?? null,
      skipReason: null,
      supersedes: null,
      confirmedAfterFlag: false,
      flags: [],
    };
  });
  if (o.barometerMbar !== undefined) {
    const id = randomUUID();
    readingIds['PI-001'] = id;
    readings.push({
      id,
      roundId,
      instrumentId: w.inst['PI-001'],
      valueTyped: o.barometerMbar,
      unit: 'mbar',
      reference: 'absolute',
      deviceTime: t,
      note: null,
      skipReason: null,
      supersedes: null,
      confirmedAfterFlag: false,
      flags: [],
    });
  }
  const photoIds: Record<string, string> = {};
  const photos: PushRequestV2['photos'] = (o.photos ?? []).map((tag) => {
    photoIds[tag] = randomUUID();
    return {
      id: photoIds[tag],
      roundId,
      readingId: readingIds[tag],
      checkId: null,
      sha256: 'a'.repeat(64),
      mime: 'image/jpeg',
      bytes: 1234,
    };
  });
  const status = o.status ?? 'finished';
  const body: PushRequestV2 = {
    payloadVersion: 2,
    deviceId: 'analysis-test-phone',
    sentAt: t,
    rounds: [
      {
        id: roundId,
        routeVersionId: w.version[o.routeKey ?? 'turbine-hall'],
        startedAt: t,
        finishedAt: status === 'finished' ? t : null,
        status,
        dismissals: [],
      },
    ],
    readings,
    checkAnswers: [],
    photos,
  };
  return { roundId, body, readingIds, photoIds };
}

export async function push(w: World, body: object, who: Who = 'tech') {
  const res = await request(w.app).post('/api/sync/push').set(bearer(w.tokens[who])).send(body);
  if (res.status !== 200) throw new Error(`push failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res;
}

/** Pushes a design round (options as designRound) and returns it. */
export async function pushRound(w: World, o: RoundOptions = {}): Promise<BuiltRound> {
  const r = designRound(w, o);
  await push(w, r.body);
  return r;
}

export const api = (w: World, who: Who) => ({
  get: (path: string) => request(w.app).get(path).set(bearer(w.tokens[who])),
  post: (path: string, body: object = {}) => request(w.app).post(path).set(bearer(w.tokens[who])).send(body),
});

/** RFC 4180 CSV to rows (quoted fields, doubled quotes, CRLF or LF). */
export function parseCsv(text: string): string[][] {
  const rows: string[][] = [];
  let row: string[] = [];
  let field = '';
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (quoted) {
      if (c === '"' && text[i + 1] === '"') {
        field += '"';
        i++;
      } else if (c === '"') quoted = false;
      else field += c;
    } else if (c === '"') quoted = true;
    else if (c === ',') {
      row.push(field);
      field = '';
    } else if (c === '\n' || (c === '\r' && text[i + 1] === '\n')) {
      if (c === '\r') i++;
      row.push(field);
      rows.push(row);
      row = [];
      field = '';
    } else field += c;
  }
  if (field !== '' || row.length) {
    row.push(field);
    rows.push(row);
  }
  return rows;
}

export async function until<T>(
  what: string,
  f: () => Promise<T | null | undefined | false>,
  timeoutMs = 15_000,
  everyMs = 100,
): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = await f();
    if (v) return v;
    if (Date.now() > end) throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}`);
    await new Promise((r) => setTimeout(r, everyMs));
  }
}
