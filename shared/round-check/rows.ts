/**
 * The round check's inputs from rows shaped like the server's tables (rounds, readings with their
 * stored value_si, route versions), so the server runs the same assembly as the phone.
 *
 * A round's barometric pressure is its current barometer reading (the same plausibility band the
 * phone applies, 50–110 kPa) else the site's elevation through the ICAO standard atmosphere:
 * the rule the phone's round screen and the server's push both use to convert gauge and vacuum
 * readings.
 */
import type { RouteTemplate } from '../route/template';
import { barometricFromElevation } from '../units';
import type { CheckedRound } from './assemble';

export interface RoundRow {
  id: string;
  routeId: string;
  routeName: string;
  template: RouteTemplate;
  /** ISO 8601 device times */
  startedAt: string;
  finishedAt: string | null;
  status: 'in-progress' | 'finished';
}

export interface ReadingRow {
  id: string;
  roundId: string;
  tag: string;
  /** SI absolute as stored; null for a skipped reading */
  valueSi: number | null;
  /** ISO 8601 device time */
  deviceTime: string;
  supersedes: string | null;
  isBarometer: boolean;
  /** a stable order (the device's seq, the server's insertion order); 0 when there is none */
  order?: number;
}

/** The plausible band of a barometer reading the phone accepts (offline/round.ts), Pa. */
export const BAROMETER_MIN_PA = 50_000;
export const BAROMETER_MAX_PA = 110_000;

const ms = (iso: string, field: string): number => {
  const t = Date.parse(iso);
  if (!Number.isFinite(t)) throw new Error(`${field}: "${iso}" is not an ISO 8601 time`);
  return t;
};

/** The template's stops as the roundCheck needs them: names and tags in walking order. */
export function stopsOf(template: RouteTemplate): CheckedRound['stops'] {
  return template.stops.map((s) => ({ name: s.name, tags: s.readings.map((r) => r.tag) }));
}

/** Rounds with their current readings (superseded rows left out) and barometric pressure. */
export function roundsFromRows(rounds: RoundRow[], readings: ReadingRow[], siteElevationM: number): CheckedRound[] {
  const superseded = new Set(readings.map((r) => r.supersedes).filter((x): x is string => !!x));
  const byRound = new Map<string, ReadingRow[]>();
  for (const r of readings) {
    if (superseded.has(r.id)) continue;
    byRound.set(r.roundId, [...(byRound.get(r.roundId) ?? []), r]);
  }
  const elevationPa = barometricFromElevation(siteElevationM);
  return rounds.map((rd) => {
    const list = byRound.get(rd.id) ?? [];
    const baro = list
      .filter((r) => r.isBarometer && r.valueSi !== null)
      .sort((a, b) => ms(b.deviceTime, 'deviceTime') - ms(a.deviceTime, 'deviceTime'))[0];
    const b =
      baro && baro.valueSi! >= BAROMETER_MIN_PA && baro.valueSi! <= BAROMETER_MAX_PA ? baro.valueSi! : elevationPa;
    return {
      id: rd.id,
      routeId: rd.routeId,
      routeName: rd.routeName,
      stops: stopsOf(rd.template),
      startedAt: ms(rd.startedAt, `rounds.${rd.id}.startedAt`),
      finishedAt: rd.finishedAt ? ms(rd.finishedAt, `rounds.${rd.id}.finishedAt`) : null,
      status: rd.status,
      barometricPa: b,
      readings: list.map((r) => ({
        id: r.id,
        tag: r.tag,
        valueSI: r.valueSi,
        time: ms(r.deviceTime, `readings.${r.id}.deviceTime`),
        order: r.order ?? 0,
      })),
    };
  });
}
