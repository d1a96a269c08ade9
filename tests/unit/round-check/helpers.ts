/**
 * Shared helpers of the round-check tests (not a test file): a device store over sql.js holding
 * the Fernhallow demo unit and its three routes, walking a route through the device actions with
 * what each gauge face shows, and the server-side inputs rebuilt from what the device pushes.
 *
 * The demo unit's design point closes every balance with IAPWS-IF97 (shared/cycle/demo-unit.ts,
 * checked against python3-iapws in tests/unit/cycle/demo-design.test.ts); Fernhallow Works stands
 * at 112 m, so the barometer's design value is the ICAO standard atmosphere there.
 */
import { PullResponse, type PushReading, type PushRound, type SyncInstrument, type SyncRoute } from '@/shared/api/sync';
import { fernhallowBarometer, fernhallowRoutes } from '@/demo/routes';
import type { RouteTemplate } from '@/shared/route/template';
import { effectiveModel, type Instrument } from '@/shared/cycle';
import { demoDesignReadings, demoUnit } from '@/demo/unit';
import { checkRound, roundsFromRows, type ReadingRow, type RoundCheckInput, type RoundRow } from '@/shared/round-check';
import { barometricFromElevation, siteBarometricPa, toSI, type Quantity } from '@/shared/units';
import { createActions, type Actions } from '@/offline/actions';
import { uuidV4FromBytes } from '@/offline/ids';
import { openStore, type Store } from '@/offline/store';
import { SITE_ELEVATION_META } from '@/offline/round';
import { counterIds, manualClock, sha256Hex } from '../offline/fixtures';
import { openSqlJsDb } from '../offline/sqljs-db';

export const ELEVATION_M = 112;
export const BARO_PA = barometricFromElevation(ELEVATION_M);

const uuid = (kind: number, n: number) => {
  const b = new Uint8Array(16);
  b[0] = 0x5e;
  b[1] = kind;
  b[14] = Math.floor(n / 256);
  b[15] = n % 256;
  return uuidV4FromBytes(b);
};

export const SITE = uuid(1, 1);
export const UNIT = uuid(2, 1);
const allInstruments: Instrument[] = [...demoUnit.instruments, fernhallowBarometer];
export const INSTRUMENT_ID: Record<string, string> = Object.fromEntries(
  allInstruments.map((i, k) => [i.tag, uuid(3, k + 1)]),
);
export const ROUTE_ID: Record<string, string> = Object.fromEntries(
  fernhallowRoutes.map((r, k) => [r.id, uuid(4, k + 1)]),
);
export const VERSION_ID: Record<string, string> = Object.fromEntries(
  fernhallowRoutes.map((r, k) => [r.id, uuid(5, k + 1)]),
);
export const TEMPLATE: Record<string, RouteTemplate> = Object.fromEntries(fernhallowRoutes.map((r) => [r.id, r]));
export const ROUTE_NAME: Record<string, string> = Object.fromEntries(fernhallowRoutes.map((r) => [r.id, r.name]));

/** The reference data a pull brings: the demo unit, its instruments and the barometer, the three routes. */
export function demoPull(): PullResponse {
  const instruments: SyncInstrument[] = allInstruments.map((i) => ({
    id: INSTRUMENT_ID[i.tag],
    unitId: UNIT,
    tag: i.tag,
    quantity: i.quantity,
    pointRef: i.point ?? null,
    equipmentRef: i.equipment ?? null,
    reference: i.pressureReference ?? null,
    range: { min: i.range.min, max: i.range.max },
    accuracy: i.accuracy,
    gaugeUnit: i.unit,
    calibrationDate: '2025-06-01',
    calibrationIntervalDays: 365,
    status: 'ok',
    isBarometer: i.tag === fernhallowBarometer.tag,
    updatedAt: '2025-11-01T00:00:00.000Z',
    rowVersion: 1,
    syncVersion: 1,
  }));
  const routes: SyncRoute[] = fernhallowRoutes.map((t) => ({
    id: ROUTE_ID[t.id],
    siteId: SITE,
    unitId: UNIT,
    name: t.name,
    syncVersion: 1,
    version: { id: VERSION_ID[t.id], number: 1, publishedAt: '2025-11-01T00:00:00.000Z', template: t },
  }));
  return PullResponse.parse({
    cursor: 1,
    units: [
      { id: UNIT, siteId: SITE, name: demoUnit.name, model: demoUnit, modelVersion: demoUnit.version, syncVersion: 1 },
    ],
    instruments,
    routes,
    serverTime: '2025-11-30T06:00:00.000Z',
  });
}

export interface Device {
  store: Store;
  actions: Actions;
  clock: ReturnType<typeof manualClock>;
}

/** A device with the demo reference data, the site's elevation known, the clock at 06:30 UTC. */
export async function demoDevice(): Promise<Device> {
  const db = await openSqlJsDb();
  const clock = manualClock(Date.UTC(2025, 10, 30, 6, 30, 0));
  const store = await openStore(db, { clock });
  await store.applyPull(SITE, demoPull());
  await store.setMeta(SITE_ELEVATION_META(SITE), String(ELEVATION_M));
  const actions = createActions({ store, ids: counterIds(0xb0), clock, sha256: async (b) => sha256Hex(b) });
  return { store, actions, clock };
}

/** What each gauge face shows at design, as a technician types it (two decimals). */
export function designTyped(): Record<string, number> {
  const out: Record<string, number> = Object.fromEntries(
    demoDesignReadings(BARO_PA).map((r) => [r.instrumentTag, Number(r.shown.value.toFixed(2))]),
  );
  out['PI-001'] = Number((BARO_PA / 100).toFixed(2)); // mbar
  return out;
}

export interface Walked {
  roundId: string;
  readingIds: Record<string, string>;
}

/**
 * Walks a route on the device: one reading a minute, in walking order, with `typed[tag]` in the
 * route's unit; `skip` tags are skipped with a reason. Leaves the round in progress unless `finish`.
 */
export async function walk(
  d: Device,
  routeKey: string,
  typed: Record<string, number>,
  opts: { skip?: string[]; finish?: boolean } = {},
): Promise<Walked> {
  const t = TEMPLATE[routeKey];
  const round = await d.actions.startRound(VERSION_ID[routeKey]);
  const readingIds: Record<string, string> = {};
  for (const stop of t.stops) {
    for (const r of stop.readings) {
      d.clock.advance(60_000);
      const skip = opts.skip?.includes(r.tag);
      const rec = await d.actions.recordReading({
        roundId: round.id,
        instrumentTag: r.tag,
        valueTyped: skip ? null : typed[r.tag],
        unit: r.unit,
        reference: r.reference ?? null,
        skipReason: skip ? 'Gauge not reachable' : null,
      });
      readingIds[r.tag] = rec.id;
    }
  }
  if (opts.finish) {
    d.clock.advance(60_000);
    await d.actions.finishRound(round.id);
  }
  return { roundId: round.id, readingIds };
}

/** The rounds and readings the device has queued for the server (the last payload of each round). */
export async function pushed(d: Device): Promise<{ rounds: PushRound[]; readings: PushReading[] }> {
  const rows = await d.store.db.all<{ kind: string; payload: string }>('SELECT kind, payload FROM outbox ORDER BY seq');
  const rounds = new Map<string, PushRound>();
  const readings: PushReading[] = [];
  for (const r of rows) {
    const p = JSON.parse(r.payload);
    if (r.kind === 'round') rounds.set(p.id, p);
    if (r.kind === 'reading') readings.push(p);
  }
  return { rounds: [...rounds.values()], readings };
}

const tagOfId = Object.fromEntries(Object.entries(INSTRUMENT_ID).map(([t, id]) => [id, t]));
const quantityOf = Object.fromEntries(allInstruments.map((i) => [i.tag, i.quantity])) as Record<string, Quantity>;
const routeKeyOfVersion = Object.fromEntries(Object.entries(VERSION_ID).map(([k, v]) => [v, k]));

/**
 * The server's side: the pushed records stored as the server's push stores them (server/sync/push.ts:
 * value_si from what was typed, gauge and vacuum readings against the round's latest barometer
 * reading, else the site's elevation through the ICAO standard atmosphere), then the check run on
 * those rows through shared/round-check's row adapter.
 */
/**
 * The server side of a round check. `instruments` are the server's instrument rows (the instrument
 * master, shared/cycle/instrument-master): the pulled rows unless a test changed them.
 */
export async function serverSideInput(
  d: Device,
  roundId: string,
  at: number,
  instruments: readonly SyncInstrument[] = demoPull().instruments,
): Promise<RoundCheckInput> {
  const { rounds, readings } = await pushed(d);
  const baro = new Map<string, number>();
  const superseded = new Set(readings.map((r) => r.supersedes).filter(Boolean));
  for (const r of readings) {
    if (tagOfId[r.instrumentId] !== 'PI-001' || r.valueTyped === null || superseded.has(r.id)) continue;
    baro.set(
      r.roundId,
      siteBarometricPa({
        barometricPa: toSI({ quantity: 'pressure', value: r.valueTyped, unit: r.unit, reference: 'absolute' }),
      })!,
    );
  }
  const rows: ReadingRow[] = readings.map((r, k) => {
    const tag = tagOfId[r.instrumentId];
    const b = baro.get(r.roundId) ?? BARO_PA;
    return {
      id: r.id,
      roundId: r.roundId,
      tag,
      valueSi:
        r.valueTyped === null
          ? null
          : toSI(
              { quantity: quantityOf[tag], value: r.valueTyped, unit: r.unit, reference: r.reference ?? undefined },
              { barometricPa: b },
            ),
      deviceTime: r.deviceTime,
      supersedes: r.supersedes ?? null,
      isBarometer: tag === 'PI-001',
      order: k + 1,
    };
  });
  const roundRows: RoundRow[] = rounds.map((r) => {
    const key = routeKeyOfVersion[r.routeVersionId];
    return {
      id: r.id,
      routeId: ROUTE_ID[key],
      routeName: ROUTE_NAME[key],
      template: TEMPLATE[key],
      startedAt: r.startedAt,
      finishedAt: r.finishedAt ?? null,
      status: r.status,
    };
  });
  const all = roundsFromRows(roundRows, rows, ELEVATION_M);
  const round = all.find((r) => r.id === roundId)!;
  const dismissals = rounds.find((r) => r.id === roundId)!.dismissals;
  return {
    model: effectiveModel(demoUnit, instruments).model,
    round,
    others: all.filter((r) => r.id !== roundId),
    at,
    dismissals: dismissals
      .filter((x) => x.tag)
      .map((x) => ({ tag: x.tag!, note: x.note ?? '', ...(x.readingId ? { readingId: x.readingId } : {}) })),
    routes: fernhallowRoutes.map((t) => ({
      id: ROUTE_ID[t.id],
      name: t.name,
      stops: t.stops.map((s) => ({ name: s.name, tags: s.readings.map((x) => x.tag) })),
    })),
  };
}

export { checkRound };

/**
 * Paths where two values differ: numbers by more than `rel` relative (absolute below 1e-300),
 * everything else exactly.
 */
export function differences(a: unknown, b: unknown, rel = 1e-9, path = '$', out: string[] = []): string[] {
  if (typeof a === 'number' && typeof b === 'number') {
    const scale = Math.max(Math.abs(a), Math.abs(b));
    if (!(a === b || Math.abs(a - b) <= rel * scale || scale < 1e-300)) out.push(`${path}: ${a} vs ${b}`);
  } else if (Array.isArray(a) && Array.isArray(b)) {
    if (a.length !== b.length) out.push(`${path}: length ${a.length} vs ${b.length}`);
    else a.forEach((x, i) => differences(x, b[i], rel, `${path}[${i}]`, out));
  } else if (a && b && typeof a === 'object' && typeof b === 'object') {
    const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
    for (const k of keys)
      differences((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], rel, `${path}.${k}`, out);
  } else if (a !== b) out.push(`${path}: ${JSON.stringify(a)} vs ${JSON.stringify(b)}`);
  return out;
}
