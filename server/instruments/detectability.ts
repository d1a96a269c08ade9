/**
 * The detectability map of a site's units (shared/cycle/detectability.ts), at each unit's latest
 * current analysis: its per-instrument rows hold the readings (SI absolute) and the σ the
 * analysis gave them, which are the operating point. The map is a pure function of the analysis
 * and the model as the instrument master has it today (shared/cycle/instrument-master.ts: range,
 * class and status from the instruments table), so it is kept per (analysis, effective model
 * version) in a small in-process cache: the
 * search over candidate measurements reconciles the unit some forty times (about 0.5 s on the demo
 * unit on this machine), and every process may compute it again.
 */
import type { DataSource } from 'typeorm';
import type { DetectabilityResponse, UnitDetectability } from '../../shared/api/detectability';
import { detectabilityMap, type CycleModel, type DetectabilityMap, type InstrumentResult } from '../../shared/cycle';
import { effectiveModel, type MasterInstrumentRow } from '../../shared/cycle/instrument-master';
import { AppError } from '../errors';

const CACHE_SIZE = 16;
const cache = new Map<string, DetectabilityMap>();

function cached(key: string, make: () => DetectabilityMap): DetectabilityMap {
  const hit = cache.get(key);
  if (hit) {
    cache.delete(key);
    cache.set(key, hit);
    return hit;
  }
  const made = make();
  cache.set(key, made);
  while (cache.size > CACHE_SIZE) cache.delete(cache.keys().next().value!);
  return made;
}

export async function siteDetectability(
  ds: DataSource,
  siteId: string,
  unitId?: string,
): Promise<DetectabilityResponse> {
  const params: unknown[] = [siteId];
  let filter = '';
  if (unitId) filter = ` AND u."id" = $${params.push(unitId)}`;
  const rows = (await ds.query(
    `SELECT DISTINCT ON (u."id") u."id" AS "unit_id", u."name" AS "unit_name", u."model", u."model_version",
            a."id" AS "analysis_id", a."round_id", a."analysed_at", a."instruments"
       FROM "units" u
       JOIN "analyses" a ON a."unit_id" = u."id" AND a."is_current"
      WHERE u."site_id" = $1${filter}
      ORDER BY u."id", a."analysed_at" DESC, a."id" DESC`,
    params,
  )) as {
    unit_id: string;
    unit_name: string;
    model: CycleModel;
    model_version: string;
    analysis_id: string;
    round_id: string;
    analysed_at: Date;
    instruments: InstrumentResult[];
  }[];
  if (unitId && rows.length === 0) {
    const [u] = (await ds.query(`SELECT 1 FROM "units" WHERE "id" = $1 AND "site_id" = $2`, [
      unitId,
      siteId,
    ])) as unknown[];
    if (!u) throw new AppError(404, 'not_found', 'No such unit on this site');
  }
  const masterRows = rows.length
    ? ((await ds.query(
        `SELECT "unit_id", "tag", "quantity", "reference", "range", "accuracy", "gauge_unit" AS "gaugeUnit",
                "calibration_interval_days" AS "calibrationIntervalDays", "status"
           FROM "instruments" WHERE "unit_id" = ANY($1) ORDER BY "tag"`,
        [rows.map((r) => r.unit_id)],
      )) as (MasterInstrumentRow & { unit_id: string })[])
    : [];
  const units: UnitDetectability[] = rows.map((r) => {
    const effective = effectiveModel(
      r.model,
      masterRows.filter((m) => m.unit_id === r.unit_id),
    );
    const readings = r.instruments
      .filter((i) => i.reading !== null && i.sigma !== null && (i.status === 'used' || i.status === 'not-in-balance'))
      .map((i) => ({ tag: i.tag, value: i.reading!, sigma: i.sigma! }));
    const map = cached(`${r.analysis_id}|${effective.model.version}`, () =>
      detectabilityMap(effective.model, readings),
    );
    return {
      unitId: r.unit_id,
      unitName: r.unit_name,
      analysisId: r.analysis_id,
      roundId: r.round_id,
      analysedAt: new Date(r.analysed_at).toISOString(),
      alpha: map.alpha,
      beta: map.beta,
      delta0: map.delta0,
      instruments: map.instruments,
    };
  });
  return { units };
}
