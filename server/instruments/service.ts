/**
 * Instrument health, from the stored analyses (current ones only: a re-taken round counts once).
 *
 * Per instrument, over the last 30 days:
 *  - flags: findings naming it whose kind opens work (server/work-orders/policy.ts FLAG_KINDS);
 *  - mean |z|: mean absolute normalised correction over the analyses that reconciled it;
 *  - estimated bias: mean (measured − reconciled), SI, signed (positive: it reads high), where
 *    "reconciled" is the estimate with the suspects removed (what the rest of the plant says),
 *    else the main-pass reconciled value;
 * and its last calibration, the due date (calibration date + interval), status and open orders.
 *
 * History: the instrument's readings against their reconciled values and σ, one point per
 * analysed round, in device time (the time of the reading).
 */
import { And, LessThan, MoreThanOrEqual, type DataSource } from 'typeorm';
import {
  byEvidence,
  type HistoryPoint,
  InstrumentHealth,
  InstrumentHistoryResponse,
  InstrumentListQuery,
  InstrumentListResponse,
} from '../../shared/api/analysis';
import type { InstrumentStatus } from '../../shared/api/sync';
import {
  ACCURACY_CLASSES,
  type InstrumentUpdateRequest as UpdateSchema,
  type InstrumentUpdateResponse,
} from '../../shared/api/instruments';
import type { z } from 'zod';
import { accuracySpecSchema, type AccuracySpec } from '../../shared/uncertainty';
import {
  ELEVATION_MIN_M,
  SI_UNIT,
  barometricFromElevation,
  toSIDelta,
  type PressureRef,
  type Quantity,
} from '../../shared/units';
import { CUSUM_H, cusumOver, cusumValue } from '../../shared/cycle/evidence';
import { SERIES_MAX } from '../analysis/evidence';
import { AnalysisInstrumentEntity, InstrumentEntity } from '../entities';
import type { Instrument } from '../entities/instrument';
import { AppError } from '../errors';

type InstrumentUpdateRequestOut = z.output<typeof UpdateSchema>;
const UUID_RE = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
import { FLAG_KINDS } from '../work-orders/policy';

export const HEALTH_WINDOW_DAYS = 30;
export const HISTORY_DEFAULT_DAYS = 90;
export const HISTORY_MAX_POINTS = 10_000;

const siUnitOf = (q: Quantity) => (q === 'level' ? '1' : SI_UNIT[q]);

type ListQuery = Pick<InstrumentListQuery, 'unitId' | 'status' | 'q'>;

export async function instrumentHealth(
  ds: DataSource,
  siteId: string,
  q: ListQuery,
  now = new Date(),
): Promise<InstrumentListResponse> {
  const since = new Date(now.getTime() - HEALTH_WINDOW_DAYS * 86_400_000);
  const params: unknown[] = [siteId, since, [...FLAG_KINDS]];
  const where = ['u."site_id" = $1'];
  if (q.unitId) where.push(`i."unit_id" = $${params.push(q.unitId)}`);
  if (q.status) where.push(`i."status" = $${params.push(q.status)}`);
  if (q.q) where.push(`i."tag" ILIKE $${params.push(`%${q.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`)}`);
  const rows = (await ds.query(
    `SELECT i."id", i."unit_id", i."tag", i."quantity", i."gauge_unit", i."status",
            to_char(i."calibration_date", 'YYYY-MM-DD') AS "calibration_date", i."calibration_interval_days",
            to_char(i."calibration_date" + i."calibration_interval_days", 'YYYY-MM-DD') AS "due",
            coalesce(i."calibration_date" + i."calibration_interval_days" < (now() AT TIME ZONE 'UTC')::date, false) AS "overdue",
            -- A flag is one of the instrument's own readings of the window (its per-instrument row:
            -- a reading borrowed by another route's round is not counted again) that a finding of
            -- that analysis blames on it, as the work orders do (server/work-orders/from-findings.ts):
            -- the only instrument named, or the reconciliation's suspect, or — no suspect among
            -- those named — the one the balances correct most. The window runs on the reading's
            -- time, not the analysis'.
            (SELECT count(DISTINCT ai."analysis_id")::int FROM "analysis_instruments" ai
               JOIN "findings" f ON f."analysis_id" = ai."analysis_id" AND f."instrument_ids" @> ARRAY[i."id"] AND f."kind" = ANY($3::text[])
              WHERE ai."instrument_id" = i."id" AND ai."is_current" AND ai."measured_at" >= $2
                AND (cardinality(f."instrument_ids") = 1 OR ai."suspect"
                     OR (NOT EXISTS (SELECT 1 FROM "analysis_instruments" o
                                      WHERE o."analysis_id" = ai."analysis_id" AND o."instrument_id" = ANY(f."instrument_ids") AND o."suspect")
                         AND coalesce(abs(ai."z"), -1) >= ALL (SELECT coalesce(abs(o."z"), -1) FROM "analysis_instruments" o
                                                               WHERE o."analysis_id" = ai."analysis_id" AND o."instrument_id" = ANY(f."instrument_ids"))))) AS "flags",
            s."n", s."mean_abs_z", s."bias", s."bias_var", i."reference"
       FROM "instruments" i
       JOIN "units" u ON u."id" = i."unit_id"
       LEFT JOIN LATERAL (
         SELECT count(*) FILTER (WHERE ai."z" IS NOT NULL)::int AS "n",
                avg(abs(ai."z")) FILTER (WHERE ai."z" IS NOT NULL) AS "mean_abs_z",
                avg(ai."reading_si" - coalesce(ai."estimate_si", ai."reconciled_si"))
                  FILTER (WHERE ai."status" = 'used' AND ai."reading_si" IS NOT NULL AND coalesce(ai."estimate_si", ai."reconciled_si") IS NOT NULL) AS "bias",
                -- variance of one (reading − estimate): σ² + σ_est² (the estimate leaves the reading out),
                -- or, against the main-pass value, the correction's σ² − σ_rec² (VDI 2048-1)
                avg(CASE WHEN ai."estimate_si" IS NOT NULL THEN power(ai."sigma_si", 2) + power(coalesce(ai."estimate_sigma_si", 0), 2)
                         ELSE greatest(power(ai."sigma_si", 2) - power(coalesce(ai."reconciled_sigma_si", 0), 2), 0) END)
                  FILTER (WHERE ai."status" = 'used' AND ai."reading_si" IS NOT NULL AND ai."sigma_si" IS NOT NULL
                            AND coalesce(ai."estimate_si", ai."reconciled_si") IS NOT NULL) AS "bias_var"
           FROM "analysis_instruments" ai
          WHERE ai."instrument_id" = i."id" AND ai."is_current" AND ai."measured_at" >= $2
       ) s ON true
      WHERE ${where.join(' AND ')}
      ORDER BY i."tag", i."unit_id"`,
    params,
  )) as {
    id: string;
    unit_id: string;
    tag: string;
    quantity: Quantity;
    gauge_unit: string;
    status: InstrumentStatus;
    calibration_date: string | null;
    calibration_interval_days: number | null;
    due: string | null;
    overdue: boolean;
    flags: number;
    n: number | null;
    mean_abs_z: number | null;
    bias: number | null;
    bias_var: number | null;
    reference: PressureRef | null;
  }[];
  const ev = await evidenceSinceCalibration(
    ds,
    rows.map((r) => r.id),
  );
  const cal = await calibrationOutcomes(
    ds,
    rows.map((r) => r.id),
  );
  const open = (await ds.query(
    `SELECT "id", "code", "kind", "status", "instrument_id" FROM "work_orders"
      WHERE "site_id" = $1 AND "instrument_id" IS NOT NULL AND "status" NOT IN ('done', 'cancelled') ORDER BY "number"`,
    [siteId],
  )) as { id: string; code: string; kind: string; status: string; instrument_id: string }[];
  const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));
  const instruments: InstrumentHealth[] = rows.map((r) => {
    const n = r.n ?? 0;
    const bias = num(r.bias);
    const v = num(r.bias_var);
    return {
      id: r.id,
      unitId: r.unit_id,
      tag: r.tag,
      quantity: r.quantity,
      siUnit: siUnitOf(r.quantity),
      gaugeUnit: r.gauge_unit,
      status: r.status,
      flags30d: r.flags,
      samples30d: n,
      meanAbsZ30d: num(r.mean_abs_z),
      biasSi30d: bias,
      biasUncertaintySi30d: bias !== null && v !== null && n > 0 ? Math.sqrt(v / n) : null,
      reference: r.quantity === 'pressure' ? r.reference : null,
      evidence: ev.get(r.id) ?? untested,
      calibrations: cal.get(r.id) ?? { closed: 0, confirmed: 0, refuted: 0 },
      lastCalibration: r.calibration_date,
      calibrationIntervalDays: r.calibration_interval_days,
      calibrationDue: r.due,
      calibrationOverdue: r.overdue,
      openWorkOrders: open
        .filter((w) => w.instrument_id === r.id)
        .map((w) => ({ id: w.id, number: w.code, kind: w.kind, status: w.status })),
    };
  });
  instruments.sort(byEvidence);
  return { instruments, asOf: now.toISOString() };
}

type Evidence = InstrumentHealth['evidence'];
const untested: Evidence = { cusum: 0, threshold: CUSUM_H, direction: null, rounds: 0, level: 'untested', since: null };

/**
 * Page's CUSUM per instrument over its own rounds since its last reset, with the reset rule and
 * series limit the analysis uses (server/analysis/evidence.ts): the later of the last calibration
 * record and the close of the last done calibrate or check-group order; rounds received after it.
 */
async function evidenceSinceCalibration(ds: DataSource, ids: string[]): Promise<Map<string, Evidence>> {
  if (ids.length === 0) return new Map();
  const rows = (await ds.query(
    `WITH reset AS (
        SELECT x."id" AS "instrument_id",
               GREATEST(
                 (SELECT max(c."created_at") FROM "calibration_records" c WHERE c."instrument_id" = x."id"),
                 (SELECT max(w."closed_at") FROM "work_orders" w
                   WHERE w."instrument_id" = x."id" AND w."status" = 'done' AND w."kind" IN ('calibrate', 'check-group'))
               ) AS "at"
          FROM unnest($1::uuid[]) AS x("id")),
      series AS (
        SELECT ai."instrument_id", ai."u", ai."measured_at", ai."round_id",
               row_number() OVER (PARTITION BY ai."instrument_id" ORDER BY ai."measured_at" DESC, ai."round_id" DESC) AS "k"
          FROM "analysis_instruments" ai
          JOIN "rounds" r ON r."id" = ai."round_id"
          JOIN reset ON reset."instrument_id" = ai."instrument_id"
         WHERE ai."is_current" AND ai."u" IS NOT NULL AND (reset."at" IS NULL OR r."received_at" > reset."at"))
     SELECT s."instrument_id", s."u", to_char(reset."at" AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"') AS "since"
       FROM series s JOIN reset ON reset."instrument_id" = s."instrument_id"
      WHERE s."k" <= $2
      ORDER BY s."instrument_id", s."measured_at", s."round_id"`,
    [ids, SERIES_MAX],
  )) as { instrument_id: string; u: number; since: string | null }[];
  const series = new Map<string, { us: number[]; since: string | null }>();
  for (const r of rows) {
    const e = series.get(r.instrument_id) ?? { us: [], since: r.since };
    e.us.push(Number(r.u));
    series.set(r.instrument_id, e);
  }
  const out = new Map<string, Evidence>();
  for (const [id, { us, since }] of series) {
    const st = cusumOver(us);
    const c = cusumValue(st);
    out.set(id, {
      cusum: c,
      threshold: CUSUM_H,
      direction: c > 0 ? (st.hi >= st.lo ? 'high' : 'low') : null,
      rounds: st.rounds,
      level: c >= CUSUM_H ? 'strong' : c >= CUSUM_H / 2 ? 'some' : 'none',
      since,
    });
  }
  return out;
}

/**
 * Calibration records of done orders opened for the instrument: the as-found error (as found − as
 * left, in the record's unit) against 2σ of the instrument's readings (its latest σ in the
 * analyses). Confirmed when it was larger, refuted when not.
 */
async function calibrationOutcomes(
  ds: DataSource,
  ids: string[],
): Promise<Map<string, InstrumentHealth['calibrations']>> {
  if (ids.length === 0) return new Map();
  const rows = (await ds.query(
    `SELECT c."instrument_id", c."as_found", c."as_left", c."unit", i."quantity",
            (SELECT ai."sigma_si" FROM "analysis_instruments" ai
              WHERE ai."instrument_id" = c."instrument_id" AND ai."sigma_si" IS NOT NULL
              ORDER BY ai."measured_at" DESC LIMIT 1) AS "sigma"
       FROM "calibration_records" c
       JOIN "work_orders" w ON w."id" = c."work_order_id" AND w."status" = 'done'
       JOIN "instruments" i ON i."id" = c."instrument_id"
      WHERE c."instrument_id" = ANY($1::uuid[])`,
    [ids],
  )) as {
    instrument_id: string;
    as_found: number;
    as_left: number;
    unit: string;
    quantity: Quantity;
    sigma: number | null;
  }[];
  const out = new Map<string, InstrumentHealth['calibrations']>();
  for (const r of rows) {
    const e = out.get(r.instrument_id) ?? { closed: 0, confirmed: 0, refuted: 0 };
    e.closed++;
    let errSi: number | null = null;
    try {
      errSi = Math.abs(
        toSIDelta({ quantity: r.quantity, value: Number(r.as_found) - Number(r.as_left), unit: r.unit }),
      );
    } catch {
      errSi = null;
    }
    if (errSi !== null && r.sigma !== null) {
      if (errSi > 2 * Number(r.sigma)) e.confirmed++;
      else e.refuted++;
    }
    out.set(r.instrument_id, e);
  }
  return out;
}

/** A date-only bound is midnight UTC; `to` as a date means the end of that day. */
export function bound(v: string | undefined, end: boolean): Date | undefined {
  if (v === undefined) return undefined;
  if (/^\d{4}-\d{2}-\d{2}$/.test(v)) return new Date(Date.parse(`${v}T00:00:00Z`) + (end ? 86_400_000 : 0));
  return new Date(v);
}

export async function instrumentHistory(
  ds: DataSource,
  siteId: string,
  tag: string,
  q: { from?: string; to?: string; unitId?: string },
  now = new Date(),
): Promise<InstrumentHistoryResponse> {
  const params: unknown[] = [siteId, tag];
  let sql = `SELECT i."id", i."unit_id", i."tag", i."quantity", i."status", i."gauge_unit", i."reference" FROM "instruments" i JOIN "units" u ON u."id" = i."unit_id"
              WHERE u."site_id" = $1 AND upper(i."tag") = upper($2)`;
  if (q.unitId) sql += ` AND i."unit_id" = $${params.push(q.unitId)}`;
  const found = (await ds.query(sql, params)) as {
    id: string;
    unit_id: string;
    tag: string;
    quantity: Quantity;
    status: InstrumentStatus;
    gauge_unit: string;
    reference: PressureRef | null;
  }[];
  if (found.length === 0)
    throw new AppError(404, 'not_found', `No instrument with this tag on this site${q.unitId ? ' in that unit' : ''}`);
  if (found.length > 1) {
    throw new AppError(
      400,
      'validation',
      `Invalid query: unitId: ${tag} exists in ${found.length} units of this site; say which with unitId`,
      [{ path: 'unitId', message: `Required: one of ${found.map((f) => f.unit_id).join(', ')}` }],
    );
  }
  const inst = found[0];
  const to = bound(q.to, true) ?? now;
  const from = bound(q.from, false) ?? new Date(to.getTime() - HISTORY_DEFAULT_DAYS * 86_400_000);
  if (!(from.getTime() < to.getTime())) {
    throw new AppError(
      400,
      'validation',
      `Invalid query: from (${from.toISOString()}) must lie before to (${to.toISOString()})`,
      [{ path: 'from', message: 'Must lie before to' }],
    );
  }
  // one row type for the history: the entity's (server/entities/analysis.ts AnalysisInstrument)
  const rows = await ds.getRepository(AnalysisInstrumentEntity).find({
    where: { instrumentId: inst.id, isCurrent: true, measuredAt: And(MoreThanOrEqual(from), LessThan(to)) },
    order: { measuredAt: 'ASC', analysisId: 'ASC' },
    take: HISTORY_MAX_POINTS + 1,
  });
  const truncated = rows.length > HISTORY_MAX_POINTS;
  const pts = rows.slice(0, HISTORY_MAX_POINTS);
  const flagged = pts.length
    ? ((await ds.query(
        `SELECT "analysis_id", "kind" FROM "findings" WHERE "analysis_id" = ANY($1::uuid[]) AND "instrument_ids" @> ARRAY[$2::uuid] ORDER BY "ordinal"`,
        [pts.map((p) => p.analysisId), inst.id],
      )) as { analysis_id: string; kind: string }[])
    : [];
  const baro = pts.length
    ? new Map(
        (
          (await ds.query(`SELECT "id", "barometric_pa" FROM "analyses" WHERE "id" = ANY($1::uuid[])`, [
            [...new Set(pts.map((p) => p.analysisId))],
          ])) as { id: string; barometric_pa: number | null }[]
        ).map((a) => [a.id, a.barometric_pa === null ? null : Number(a.barometric_pa)]),
      )
    : new Map<string, number | null>();
  const points: HistoryPoint[] = pts.map((p) => ({
    analysisId: p.analysisId,
    roundId: p.roundId,
    readingId: p.readingId,
    measuredAt: new Date(p.measuredAt!).toISOString(),
    reading: p.readingSi,
    sigma: p.sigmaSi,
    reconciled: p.reconciledSi,
    reconciledSigma: p.reconciledSigmaSi,
    estimate: p.estimateSi,
    estimateSigma: p.estimateSigmaSi,
    z: p.z,
    suspect: p.suspect,
    findings: flagged.filter((f) => f.analysis_id === p.analysisId).map((f) => f.kind),
    barometricPa: baro.get(p.analysisId) ?? null,
  }));
  return {
    instrument: {
      id: inst.id,
      unitId: inst.unit_id,
      tag: inst.tag,
      quantity: inst.quantity,
      siUnit: siUnitOf(inst.quantity),
      status: inst.status,
      gaugeUnit: inst.gauge_unit,
      reference: inst.quantity === 'pressure' ? inst.reference : null,
    },
    from: from.toISOString(),
    to: to.toISOString(),
    points,
    truncated,
  };
}

// ------------------------------------------------------------------------------ configuration change

/**
 * The highest atmospheric pressure a site can see: the ICAO standard atmosphere at the lowest
 * elevation the units module accepts (shared/units ELEVATION_MIN_M). A gauge reads at most this
 * far below zero; a vacuum gauge at most this far.
 */
const ATMOSPHERE_MAX_PA = barometricFromElevation(ELEVATION_MIN_M);

const bad = (path: string, message: string) =>
  new AppError(400, 'validation', `Invalid request body: ${path}: ${message}`, [{ path, message }]);

/** Quantity-specific limits of a range (SI, in the instrument's own reference). */
function checkRange(i: Instrument, r: { min: number; max: number }): void {
  const atLeast = (path: 'range.min' | 'range.max', v: number, lo: number, what: string) => {
    if (v < lo) throw bad(path, `Must be at least ${lo} (${what}); got ${v}`);
  };
  const atMost = (path: 'range.min' | 'range.max', v: number, hi: number, what: string) => {
    if (v > hi) throw bad(path, `Must be at most ${hi} (${what}); got ${v}`);
  };
  switch (i.quantity) {
    case 'temperature':
      atLeast('range.min', r.min, 0, 'K, absolute zero');
      break;
    case 'pressure':
      if (i.reference === 'absolute' || i.reference === null) atLeast('range.min', r.min, 0, 'Pa absolute');
      else if (i.reference === 'gauge')
        atLeast(
          'range.min',
          r.min,
          -Math.round(ATMOSPHERE_MAX_PA),
          'Pa gauge, a full vacuum at the highest atmospheric pressure',
        );
      else {
        atLeast('range.min', r.min, 0, 'Pa of vacuum');
        atMost('range.max', r.max, Math.round(ATMOSPHERE_MAX_PA), 'Pa of vacuum, the highest atmospheric pressure');
      }
      break;
    case 'massFlow':
      atLeast('range.min', r.min, 0, 'kg/s');
      break;
    case 'level':
      atLeast('range.min', r.min, 0, 'fraction of the gauge glass');
      atMost('range.max', r.max, 1, 'fraction of the gauge glass');
      break;
    case 'power':
      break;
  }
}

function withClass(i: Instrument, accuracy: unknown, cls: string): AccuracySpec {
  const spec = accuracy as { kind?: string } | null;
  if (!spec || typeof spec !== 'object' || !spec.kind)
    throw bad('accuracyClass', `${i.tag} has no accuracy specification to set a class on`);
  const c = ACCURACY_CLASSES[spec.kind];
  if (!c) throw bad('accuracyClass', `${i.tag}'s accuracy is given as ${spec.kind}, which has no class`);
  const value = c.values.find((v) => String(v) === cls);
  if (value === undefined)
    throw bad('accuracyClass', `Must be one of ${c.values.join(', ')} (${c.standard} ${c.field}es); got "${cls}"`);
  return { ...(spec as object), [c.field]: value } as AccuracySpec;
}

export async function updateInstrument(
  ds: DataSource,
  siteId: string,
  instrumentId: string,
  body: InstrumentUpdateRequestOut,
): Promise<InstrumentUpdateResponse> {
  if (!UUID_RE.test(instrumentId)) throw new AppError(404, 'not_found', 'Instrument not found on this site');
  return ds.transaction(async (em) => {
    const repo = em.getRepository(InstrumentEntity);
    const i = await repo
      .createQueryBuilder('i')
      .innerJoin('units', 'u', 'u.id = i.unit_id')
      .where('i.id = :id AND u.site_id = :siteId', { id: instrumentId, siteId })
      .setLock('pessimistic_write', undefined, ['i'])
      .getOne();
    if (!i) throw new AppError(404, 'not_found', 'Instrument not found on this site');
    if (body.rowVersion !== undefined && body.rowVersion !== i.rowVersion) {
      throw new AppError(
        409,
        'conflict',
        `${i.tag} changed since you read it (row version ${body.rowVersion}, now ${i.rowVersion}); reload and try again`,
        {
          rowVersion: i.rowVersion,
        },
      );
    }
    const changes: InstrumentUpdateResponse['changes'] = {};
    const next = {
      range: i.range,
      accuracy: i.accuracy,
      calibrationIntervalDays: i.calibrationIntervalDays,
      status: i.status,
    };
    if (body.range) {
      checkRange(i, body.range);
      next.range = { min: body.range.min, max: body.range.max };
      // EN 837-1 and ASME B40.100 give the error in % of the span: it follows the range
      const a = next.accuracy as { spanPa?: number; span?: number; kind?: string } | null;
      if (a && (a.kind === 'en837' || a.kind === 'asmeB40'))
        next.accuracy = { ...a, spanPa: body.range.max - body.range.min };
      if (a && a.kind === 'percentSpan') next.accuracy = { ...a, span: body.range.max - body.range.min };
    }
    if (body.accuracyClass !== undefined) next.accuracy = withClass(i, next.accuracy, body.accuracyClass);
    if (body.calibrationIntervalDays !== undefined) next.calibrationIntervalDays = body.calibrationIntervalDays;
    if (body.status !== undefined) next.status = body.status;
    if (next.accuracy !== null && next.accuracy !== undefined) {
      const ok = accuracySpecSchema.safeParse(next.accuracy);
      if (!ok.success)
        throw bad(
          'accuracyClass',
          `The accuracy specification would be invalid: ${ok.error.issues.map((x) => `${x.path.join('.')}: ${x.message}`).join('; ')}`,
        );
    }
    for (const k of ['range', 'accuracy', 'calibrationIntervalDays', 'status'] as const) {
      if (JSON.stringify(next[k]) !== JSON.stringify(i[k])) changes[k] = { from: i[k] ?? null, to: next[k] ?? null };
    }
    if (Object.keys(changes).length) {
      await em.query(
        `UPDATE "instruments" SET "range" = $2, "accuracy" = $3, "calibration_interval_days" = $4, "status" = $5, "updated_at" = now(), "row_version" = "row_version" + 1
          WHERE "id" = $1`,
        [
          i.id,
          next.range === null ? null : JSON.stringify(next.range),
          next.accuracy === null ? null : JSON.stringify(next.accuracy),
          next.calibrationIntervalDays,
          next.status,
        ],
      );
    }
    const u = await repo.findOneByOrFail({ id: i.id });
    return {
      changes,
      instrument: {
        id: u.id,
        unitId: u.unitId,
        tag: u.tag,
        quantity: u.quantity,
        pointRef: u.pointRef,
        equipmentRef: u.equipmentRef,
        reference: u.reference,
        range: u.range,
        accuracy: u.accuracy,
        gaugeUnit: u.gaugeUnit,
        calibrationDate: u.calibrationDate,
        calibrationIntervalDays: u.calibrationIntervalDays,
        status: u.status,
        isBarometer: u.isBarometer,
        updatedAt: new Date(u.updatedAt).toISOString(),
        rowVersion: u.rowVersion,
        syncVersion: Number(u.syncVersion),
      },
    };
  });
}
