/**
 * Everything the round screens need about one round, read from the device store (no network):
 * the round, its route version's template, the unit's cycle model, the instruments by tag, the
 * current readings, answers and photos, the barometric pressure, and the on-the-spot flags.
 */
import { checkInstrumentReading, checkReading, type SpotFlag } from '@/shared/checks';
import { parseAccuracySpec, sigmaFor } from '@/shared/uncertainty';
import type { CycleModel } from '@/shared/cycle/model';
import { effectiveModel, validateModel } from '@/shared/cycle';
import { barometricFromElevation, toSI, type PressureRef, type Quantity, type Unit } from '@/shared/units';
import type { RouteReading, RouteTemplate } from '@/shared/route/template';
import type { LocalCheckAnswer, LocalInstrument, LocalPhoto, LocalReading, LocalRound, Store } from '@/offline/store';

export const SITE_ELEVATION_META = (siteId: string) => `site-elevation:${siteId}`;

export interface RoundData {
  round: LocalRound;
  template: RouteTemplate;
  routeName: string;
  /** the unit's model as the instrument master has it (shared/cycle/instrument-master): out-of-service instruments left out */
  model: CycleModel | null;
  /** each model instrument's label, by tag (out-of-service ones included) */
  labels: Record<string, string>;
  instruments: Record<string, LocalInstrument>;
  readings: Record<string, LocalReading>;
  answers: Record<string, LocalCheckAnswer>;
  photos: LocalPhoto[];
  barometricPa: number | undefined;
  /** SI absolute value of each current reading, by tag. */
  values: Record<string, number>;
  previous: Record<string, { valueSI: number; hoursAgo: number }>;
}

export const flagCodes: Record<SpotFlag['kind'], string> = {
  band: 'out-of-band',
  range: 'out-of-range',
  saturation: 'saturation',
  twin: 'twin',
  jump: 'last-round',
  if97: 'outside-if97',
};

export function siOf(
  quantity: Quantity,
  value: number,
  unit: string,
  reference: PressureRef | null | undefined,
  barometricPa: number | undefined,
): number {
  return toSI({ quantity, value, unit, reference: reference ?? undefined }, { barometricPa });
}

export async function loadRound(store: Store, roundId: string, siteId: string | null): Promise<RoundData | null> {
  const round = await store.getRound(roundId);
  if (!round) return null;
  const version = await store.getRouteVersion(round.routeVersionId);
  if (!version) return null;
  const route = await store.getRoute(version.routeId);
  const unit = route ? await store.getUnit(route.unitId) : null;
  const parsed = unit ? validateModel(unit.model) : null;
  const list = unit ? await store.listInstruments(unit.id) : [];
  // the model as the instrument master has it: an out-of-service instrument is not in it
  const model = parsed && parsed.ok ? effectiveModel(parsed.model, list).model : null;
  const instruments = Object.fromEntries(list.map((i) => [i.tag, i]));
  const current = await store.roundReadings(roundId);
  const readings = Object.fromEntries(current.map((r) => [r.tag, r]));
  const answers = Object.fromEntries((await store.roundCheckAnswers(roundId)).map((a) => [a.checkId, a]));
  const photos = await store.roundPhotos(roundId);

  // Barometric pressure: a barometer read on this round, else the site's elevation (ICAO atmosphere).
  let barometricPa: number | undefined;
  const baro = current.find((r) => instruments[r.tag]?.isBarometer && r.valueTyped !== null);
  if (baro) {
    try {
      const b = siOf('pressure', baro.valueTyped!, baro.unit, 'absolute', undefined);
      // A barometer value outside 50–110 kPa is a misreading (project choice: sites up to about
      // 5 500 m); the site's elevation stands in until it is corrected.
      if (b >= 50_000 && b <= 110_000) barometricPa = b;
    } catch {
      barometricPa = undefined;
    }
  }
  if (barometricPa === undefined && siteId) {
    const elev = await store.getMeta(SITE_ELEVATION_META(siteId));
    if (elev !== null && Number.isFinite(Number(elev))) barometricPa = barometricFromElevation(Number(elev));
  }

  const values: Record<string, number> = {};
  for (const r of current) {
    const inst = instruments[r.tag];
    if (!inst || r.valueTyped === null) continue;
    try {
      values[r.tag] = siOf(inst.quantity, r.valueTyped, r.unit, r.reference, barometricPa);
    } catch {
      /* unconvertible (no barometric pressure yet): no checks against it */
    }
  }
  const previous: RoundData['previous'] = {};
  const now = Date.now();
  for (const inst of list) {
    const p = await store.previousReading(inst.id, roundId);
    if (!p || p.valueTyped === null) continue;
    try {
      previous[inst.tag] = {
        valueSI: siOf(inst.quantity, p.valueTyped, p.unit, p.reference, barometricPa),
        hoursAgo: (now - Date.parse(p.deviceTime)) / 3.6e6,
      };
    } catch {
      /* skip */
    }
  }
  return {
    round,
    template: version.template,
    routeName: route?.name ?? version.template.name,
    model,
    labels: Object.fromEntries(
      (parsed && parsed.ok ? parsed.model.instruments : []).flatMap((i) => (i.label ? [[i.tag, i.label]] : [])),
    ),
    instruments,
    readings,
    answers,
    photos,
    barometricPa,
    values,
    previous,
  };
}

/** The band of a route reading in SI absolute, or undefined when it cannot be converted yet. */
export function bandSI(
  spec: RouteReading,
  quantity: Quantity,
  barometricPa: number | undefined,
): { min: number; max: number } | undefined {
  try {
    const a = siOf(quantity, spec.band.min, spec.unit, spec.reference, barometricPa);
    const b = siOf(quantity, spec.band.max, spec.unit, spec.reference, barometricPa);
    return { min: Math.min(a, b), max: Math.max(a, b) };
  } catch {
    return undefined;
  }
}

/** The on-the-spot flags of a value of `spec` against the round as it stands. */
export function flagsFor(data: RoundData, spec: RouteReading, valueSI: number): SpotFlag[] {
  const inst = data.instruments[spec.tag];
  if (!inst) return [];
  const band = bandSI(spec, inst.quantity, data.barometricPa);
  if (!data.model || !data.model.instruments.some((i) => i.tag === spec.tag)) {
    // An instrument outside the cycle model (the site barometer): its scale and band only.
    try {
      const spec0 = parseAccuracySpec(inst.accuracy);
      const range = inst.range && (inst.reference ?? 'absolute') === 'absolute' ? inst.range : undefined;
      return checkReading(
        {
          tag: spec.tag,
          quantity: inst.quantity,
          valueSI,
          sigma: sigmaFor(spec0, valueSI),
          display: { unit: spec.unit as Unit, reference: spec.reference },
          range,
          band,
        },
        { barometricPa: data.barometricPa, previous: data.previous[spec.tag] },
      );
    } catch {
      return [];
    }
  }
  try {
    return checkInstrumentReading(data.model, spec.tag, valueSI, {
      roundValues: { ...data.values, [spec.tag]: valueSI },
      barometricPa: data.barometricPa,
      band,
      previous: data.previous[spec.tag],
    });
  } catch {
    return [];
  }
}

/** What is still missing before the round is complete: required readings, checks, required photos. */
export function missingOf(data: RoundData): {
  readings: { stop: string; tag: string }[];
  checks: { stop: string; id: string; prompt: string }[];
  photos: { stop: string; id: string; prompt: string }[];
} {
  const readings: { stop: string; tag: string }[] = [];
  const checks: { stop: string; id: string; prompt: string }[] = [];
  const photos: { stop: string; id: string; prompt: string }[] = [];
  for (const stop of data.template.stops) {
    for (const r of stop.readings)
      if (r.required && !data.readings[r.tag]) readings.push({ stop: stop.name, tag: r.tag });
    for (const c of stop.checks) {
      if (!data.answers[c.id]) checks.push({ stop: stop.name, id: c.id, prompt: c.prompt });
      if (c.photoRequired && !data.photos.some((p) => p.checkId === c.id))
        photos.push({ stop: stop.name, id: c.id, prompt: c.prompt });
    }
  }
  return { readings, checks, photos };
}

/** The device-meta key holding the stop a technician was last on in a round. */
export const ROUND_STOP_META = (roundId: string) => `round-stop:${roundId}`;

/** The stop to open a round at: the one last shown on this device, else the first. */
export async function lastStopOf(store: Store, roundId: string): Promise<number> {
  const v = Number(await store.getMeta(ROUND_STOP_META(roundId)));
  return Number.isInteger(v) && v >= 0 ? v : 0;
}

/** Where a round's records stand on their way to the server, counted from the outbox. */
export interface RoundSendState {
  waiting: number;
  sent: number;
  refused: number;
}

export async function roundSendState(store: Store, roundId: string): Promise<RoundSendState> {
  // the round's own row, and every reading, answer and photo row whose payload names the round
  const rows = await store.db.all<{ state: string; n: number }>(
    `SELECT state, COUNT(*) AS n FROM outbox WHERE record_id = ? OR payload LIKE ? GROUP BY state`,
    [roundId, `%"roundId":"${roundId}"%`],
  );
  const out: RoundSendState = { waiting: 0, sent: 0, refused: 0 };
  for (const r of rows) {
    if (r.state === 'sent') out.sent += Number(r.n);
    else if (r.state === 'refused') out.refused += Number(r.n);
    else out.waiting += Number(r.n);
  }
  return out;
}
