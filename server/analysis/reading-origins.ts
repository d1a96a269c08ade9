/**
 * Where each reading of a stored analysis came from. The analysis is unit-level: the round's own
 * readings, plus, for instruments its route does not read, the latest reading of the unit's other
 * rounds within ROUND_CHECK_WINDOW_HOURS before the round (shared/round-check assembleRoundCheck). The analysis
 * stores the readings it used (`instruments`) and per-instrument rows for its own readings only
 * (`analysis_instruments`); the round a borrowed reading came from is found again here by the same
 * rule, and named only when its value is the one the analysis used.
 */
import type { DataSource } from 'typeorm';
import type { ReadingOrigin } from '../../shared/api/analysis';
import type { InstrumentResult } from '../../shared/cycle/types';
import { ROUND_CHECK_WINDOW_HOURS } from '../../shared/round-check';

/** Relative agreement for "the same value" (both sides are the same double, stored and read back). */
const SAME = 1e-9;

export async function readingOrigins(
  ds: DataSource,
  a: { id: string; roundId: string; unitId: string; instruments: InstrumentResult[] },
): Promise<ReadingOrigin[]> {
  const used = a.instruments.filter((i) => i.reading !== null);
  if (!used.length) return [];
  const ownRows = (await ds.query(
    `SELECT i."tag", ai."measured_at" FROM "analysis_instruments" ai JOIN "instruments" i ON i."id" = ai."instrument_id" WHERE ai."analysis_id" = $1`,
    [a.id],
  )) as { tag: string; measured_at: Date | null }[];
  const own = new Map(ownRows.map((r) => [r.tag, r.measured_at]));
  const borrowedTags = used.filter((i) => !own.has(i.tag)).map((i) => i.tag);
  const found = new Map<string, { round_id: string; route_name: string; device_time: Date; value_si: number }>();
  if (borrowedTags.length) {
    const rows = (await ds.query(
      `SELECT DISTINCT ON (i."tag") i."tag", rd."round_id", rt."name" AS "route_name", rd."device_time", rd."value_si"
         FROM "rounds" me
         JOIN "readings" rd ON rd."round_id" <> me."id"
         JOIN "instruments" i ON i."id" = rd."instrument_id"
         JOIN "rounds" r ON r."id" = rd."round_id"
         JOIN "route_versions" v ON v."id" = r."route_version_id"
         JOIN "routes" rt ON rt."id" = v."route_id"
        WHERE me."id" = $1 AND i."unit_id" = $2 AND rt."unit_id" = $2 AND i."tag" = ANY($3::text[])
          AND rd."value_si" IS NOT NULL
          AND r."started_at_device" <= me."started_at_device"
          AND r."started_at_device" >= me."started_at_device" - interval '7 days'
          AND rd."device_time" <= coalesce(me."finished_at_device", me."started_at_device")
          AND rd."device_time" >= coalesce(me."finished_at_device", me."started_at_device") - make_interval(hours => $4)
          AND NOT EXISTS (SELECT 1 FROM "readings" s WHERE s."supersedes" = rd."id")
        ORDER BY i."tag", rd."device_time" DESC, rd."id" DESC`,
      [a.roundId, a.unitId, borrowedTags, ROUND_CHECK_WINDOW_HOURS],
    )) as { tag: string; round_id: string; route_name: string; device_time: Date; value_si: number }[];
    for (const r of rows) found.set(r.tag, r);
  }
  const same = (x: number, y: number) => Math.abs(x - y) <= SAME * Math.max(1, Math.abs(x), Math.abs(y));
  return used.map((i): ReadingOrigin => {
    const base = { tag: i.tag, pointId: i.pointId ?? null, equipmentId: i.equipmentId ?? null };
    if (own.has(i.tag)) {
      const t = own.get(i.tag);
      return {
        ...base,
        own: true,
        roundId: a.roundId,
        routeName: null,
        measuredAt: t ? new Date(t).toISOString() : null,
      };
    }
    const f = found.get(i.tag);
    if (f && same(Number(f.value_si), i.reading!)) {
      return {
        ...base,
        own: false,
        roundId: f.round_id,
        routeName: f.route_name,
        measuredAt: new Date(f.device_time).toISOString(),
      };
    }
    return { ...base, own: false, roundId: null, routeName: null, measuredAt: null };
  });
}
