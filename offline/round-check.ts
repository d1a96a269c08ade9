/**
 * The round check's inputs from the device store, no network: the round, its current readings in
 * SI absolute (converted as the round screen converts them, hooks/use-round.ts), the unit's cycle
 * model, the other rounds of the same unit kept on the device, the dismissals made on the round.
 * The assembly and the analysis are in shared/round-check (the server runs the same).
 */
import { effectiveModel, validateModel, type CycleModel } from '@/shared/cycle';
import { stopsOf, type RoundCheckInput, type CheckedRound, type RoundCheckRouteInfo } from '@/shared/round-check';
import { BAROMETER_MAX_PA, BAROMETER_MIN_PA } from '@/shared/round-check/rows';
import { HISTORY_ROUNDS, ROUND_CHECK_WINDOW_HOURS } from '@/shared/round-check/assemble';
import { barometricFromElevation } from '@/shared/units';
import { SITE_ELEVATION_META, siOf } from '@/offline/round';
import type { LocalInstrument, LocalRound, LocalRoute, LocalRouteVersion, Store } from './store';

export type DeviceRoundCheckLoad =
  | {
      ok: true;
      input: RoundCheckInput & { model: CycleModel };
      round: LocalRound;
      routeName: string;
      /** the content version of the model the check uses: the published model with the pulled instrument rows (shared/cycle/instrument-master) */
      unitModelVersion: string;
    }
  | { ok: false; problem: string; round: LocalRound | null };

/** meta key under which the device keeps what its last check of a round used and found */
// the stored key keeps the name it had on devices before the round check was called so in code
export const ROUND_CHECK_META = (roundId: string) => `round-review:${roundId}`;

export interface RoundCheckRecord {
  modelVersion: string;
  fingerprint: string;
  /** device time of the check, ISO 8601 */
  checkedAt: string;
  /** the readings it used, tag → reading id */
  readings: Record<string, string>;
  retakes: string[];
  ms: number;
}

const ms = (iso: string | null): number | null => {
  if (!iso) return null;
  const t = Date.parse(iso);
  return Number.isFinite(t) ? t : null;
};

/** Reads everything the check of `roundId` needs from the device store. `now` stands in for the clock while the round is under way. */
export async function loadRoundCheckInput(
  store: Store,
  roundId: string,
  opts: { now?: number; windowHours?: number } = {},
): Promise<DeviceRoundCheckLoad> {
  const round = await store.getRound(roundId);
  if (!round) return { ok: false, problem: 'This round is not on this device.', round: null };
  const versions = new Map<string, LocalRouteVersion | null>();
  const routes = new Map<string, LocalRoute | null>();
  const versionOf = async (id: string) => {
    if (!versions.has(id)) versions.set(id, await store.getRouteVersion(id));
    return versions.get(id)!;
  };
  const routeOf = async (id: string) => {
    if (!routes.has(id)) routes.set(id, await store.getRoute(id));
    return routes.get(id)!;
  };
  const version = await versionOf(round.routeVersionId);
  const route = version ? await routeOf(version.routeId) : null;
  if (!version || !route)
    return { ok: false, problem: "The round's route is not on this device; sync once, then check again.", round };
  const unit = await store.getUnit(route.unitId);
  if (!unit)
    return { ok: false, problem: "The unit's cycle model is not on this device; sync once, then check again.", round };
  const parsed = validateModel(unit.model);
  if (!parsed.ok)
    return {
      ok: false,
      problem: `The unit's cycle model on this device is damaged (${parsed.errors[0]?.path}: ${parsed.errors[0]?.message}); sync again.`,
      round,
    };
  const rows = await store.listInstruments(unit.id);
  // the model as the instrument master has it (shared/cycle/instrument-master), as the server's analysis reads it
  const effective = effectiveModel(parsed.model, rows);
  const model = effective.model;
  const instruments = Object.fromEntries(rows.map((i) => [i.tag, i])) as Record<string, LocalInstrument>;
  const elev = await store.getMeta(SITE_ELEVATION_META(route.siteId));
  const elevationPa =
    elev !== null && Number.isFinite(Number(elev)) ? barometricFromElevation(Number(elev)) : undefined;

  const windowHours = opts.windowHours ?? ROUND_CHECK_WINDOW_HOURS;
  const now = opts.now ?? Date.now();
  const at = round.status === 'finished' ? (ms(round.finishedAt) ?? now) : now;

  /** a round as the check sees it: current readings in SI with the round's own barometric pressure */
  const asRoundCheck = async (r: LocalRound, v: LocalRouteVersion, rt: LocalRoute): Promise<CheckedRound | null> => {
    const current = await store.roundReadings(r.id);
    // the barometric rule of hooks/use-round.ts: this round's barometer (50–110 kPa), else the site's elevation
    let b: number | undefined;
    const baro = current.find((x) => instruments[x.tag]?.isBarometer && x.valueTyped !== null);
    if (baro) {
      try {
        const pa = siOf('pressure', baro.valueTyped!, baro.unit, 'absolute', undefined);
        if (pa >= BAROMETER_MIN_PA && pa <= BAROMETER_MAX_PA) b = pa;
      } catch {
        b = undefined;
      }
    }
    b ??= elevationPa;
    if (b === undefined) return null;
    const readings: CheckedRound['readings'] = [];
    for (const x of current) {
      const inst = instruments[x.tag];
      const time = ms(x.deviceTime);
      if (!inst || time === null) continue;
      let valueSI: number | null = null;
      if (x.valueTyped !== null) {
        try {
          valueSI = siOf(inst.quantity, x.valueTyped, x.unit, x.reference, b);
        } catch {
          continue; // cannot be converted: the check treats it as not read
        }
      }
      readings.push({ id: x.id, tag: x.tag, valueSI, time, order: x.seq });
    }
    return {
      id: r.id,
      routeId: rt.id,
      routeName: rt.name,
      stops: stopsOf(v.template),
      startedAt: ms(r.startedAt) ?? 0,
      finishedAt: ms(r.finishedAt),
      status: r.status,
      barometricPa: b,
      readings,
    };
  };

  const mine = await asRoundCheck(round, version, route);
  if (!mine) {
    return {
      ok: false,
      problem:
        'No barometric pressure for this round: read the site barometer, or connect once so the device knows the site’s elevation.',
      round,
    };
  }

  const from = at - windowHours * 3.6e6;
  const others: CheckedRound[] = [];
  let history = 0;
  for (const o of await store.listRounds({ siteId: route.siteId })) {
    if (o.id === round.id) continue;
    const ov = await versionOf(o.routeVersionId);
    const ort = ov ? await routeOf(ov.routeId) : null;
    if (!ov || !ort || ort.unitId !== route.unitId) continue;
    const sameRoute = ort.id === route.id && (ms(o.startedAt) ?? 0) < mine.startedAt;
    const inWindow = (ms(o.finishedAt) ?? now) >= from && (ms(o.startedAt) ?? 0) <= at;
    if (!inWindow && !(sameRoute && history < HISTORY_ROUNDS)) continue;
    if (sameRoute) history++;
    const rr = await asRoundCheck(o, ov, ort);
    if (rr) others.push(rr);
  }

  const unitRoutes: RoundCheckRouteInfo[] = (await store.listRoutes(route.siteId))
    .filter((r) => r.unitId === route.unitId)
    .map((r) => ({ id: r.id, name: r.name, stops: stopsOf(r.version.template) }));

  return {
    ok: true,
    round,
    routeName: route.name,
    unitModelVersion: effective.model.version,
    input: {
      model,
      round: mine,
      others,
      at,
      windowHours,
      dismissals: round.dismissals
        .filter((d) => d.tag)
        .map((d) => ({ tag: d.tag!, note: d.note ?? '', ...(d.readingId ? { readingId: d.readingId } : {}) })),
      routes: unitRoutes,
    },
  };
}
