/**
 * runAnalysisJob(deps, roundId): one round analysed and stored. The pg-boss worker calls it (one
 * job per round, server/analysis/queue.ts); tests call it directly.
 *
 * In one transaction, holding the round's row lock (so two workers on the same round take turns):
 *  1. the round (finished only: an in-progress round is analysed when its finishing push comes),
 *     its unit's cycle model (units.model) and the unit's instruments;
 *  2. the unit-level input, assembled by shared/round-check exactly as the phone's round check does:
 *     the round's current readings (per instrument the latest reading no other supersedes; a
 *     skipped one counts as not read; SI absolute as stored), for instruments the route does not
 *     read the latest readings of the unit's other rounds within 4 h (ROUND_CHECK_WINDOW_HOURS), the round's barometric
 *     pressure (its barometer reading, else the site's elevation through the ICAO standard
 *     atmosphere), and earlier rounds of the same route for the stuck-value check;
 *  3. the input hash (SHA-256 of the canonical JSON of 1–2). An analysis of this round with this
 *     hash already stored → nothing new ("unchanged"; it becomes current again if a newer input
 *     had replaced it). Otherwise analyseRound (shared/cycle), the server's own findings
 *     (./plant-checks.ts), and the new analysis replaces the round's current one; its findings,
 *     per-instrument rows, rounds.analysed_at and the work orders (server/work-orders/
 *     from-findings.ts) are written in the same transaction.
 * After the commit the notifier hears of the stored findings and of opened priority-1 orders.
 *
 * A thrown error (database, a model the engine refuses) rolls everything back; the job fails and
 * pg-boss retries it. A worker killed mid-job leaves nothing behind: the transaction never commits.
 */
import { createHash } from 'node:crypto';
import type { DataSource } from 'typeorm';
import type { RouteTemplate } from '../../shared/route/template';
import {
  analyseRound,
  canonicalJson,
  type CycleModel,
  type RoundAnalysis,
  type RoundReading,
} from '../../shared/cycle';
import { effectiveModel, type MasterInstrumentRow } from '../../shared/cycle/instrument-master';
import { assembleRoundCheck, roundsFromRows, type ReadingRow } from '../../shared/round-check';
import { barometricFromElevation } from '../../shared/units';
import type { Logger } from '../logger';
import { notifySafely, type Notifier } from '../notify';
import {
  workOrdersFromFindings,
  type StoredFinding,
  type UnitInstrument,
  type WorkOrderChanges,
} from '../work-orders/from-findings';
import { instrumentEvidence } from './evidence';
import { outOfServiceFindings, serverFindings } from './plant-checks';

export interface AnalysisDeps {
  dataSource: DataSource;
  logger: Logger;
  notify?: Notifier;
  /** Runs inside the transaction just before it commits (fault injection in tests). */
  beforeCommit?: (roundId: string) => void | Promise<void>;
}

export type AnalysisOutcome =
  | { status: 'stored'; roundId: string; analysisId: string; findings: number; workOrders: WorkOrderChanges }
  | { status: 'unchanged'; roundId: string; analysisId: string }
  | { status: 'skipped'; roundId: string; reason: string };

interface RoundRow {
  id: string;
  site_id: string;
  status: string;
  received_at: Date;
  server_seq: string;
  device_model_version: string | null;
  route_id: string;
  template: RouteTemplate;
  unit_id: string;
  elevation_m: number;
}

interface InstrumentRow extends UnitInstrument, MasterInstrumentRow {
  isBarometer: boolean;
}

const sha256 = (text: string) => createHash('sha256').update(text).digest('hex');

function summaryOfReconciliation(r: RoundAnalysis['reconciliation']) {
  if (!r.ok) return { ok: false, error: r.error };
  const { variables: _v, constraints: _c, ...rest } = r;
  return rest;
}

export async function runAnalysisJob(deps: AnalysisDeps, roundId: string): Promise<AnalysisOutcome> {
  const { dataSource, logger } = deps;
  const result = await dataSource.transaction(async (em): Promise<AnalysisOutcome> => {
    const [round] = (await em.query(
      `SELECT r."id", r."site_id", r."status", r."received_at", r."server_seq", r."device_model_version",
              v."route_id", v."template", rt."unit_id", s."elevation_m"
         FROM "rounds" r
         JOIN "route_versions" v ON v."id" = r."route_version_id"
         JOIN "routes" rt ON rt."id" = v."route_id"
         JOIN "sites" s ON s."id" = r."site_id"
        WHERE r."id" = $1
        FOR NO KEY UPDATE OF r`,
      [roundId],
    )) as RoundRow[];
    if (!round) return { status: 'skipped', roundId, reason: 'the round does not exist (any more)' };
    if (round.status !== 'finished') return { status: 'skipped', roundId, reason: 'the round is still in progress' };

    const [unit] = (await em.query(`SELECT "id", "model", "model_version" FROM "units" WHERE "id" = $1`, [
      round.unit_id,
    ])) as {
      id: string;
      model: CycleModel;
      model_version: string;
    }[];
    const instrumentRows = (await em.query(
      `SELECT "id", "tag", "point_ref" AS "pointRef", "equipment_ref" AS "equipmentRef", "is_barometer" AS "isBarometer",
              "quantity", "reference", "range", "accuracy", "gauge_unit" AS "gaugeUnit",
              "calibration_interval_days" AS "calibrationIntervalDays", "status"
         FROM "instruments" WHERE "unit_id" = $1 ORDER BY "tag"`,
      [unit.id],
    )) as InstrumentRow[];
    // the instrument master: the rows' range, accuracy and status over the model's entries
    const effective = effectiveModel(unit.model, instrumentRows);
    const model = effective.model;
    const byId = new Map(instrumentRows.map((i) => [i.id, i]));
    const idByTag = new Map(instrumentRows.map((i) => [i.tag, i.id]));

    // The unit-level input, assembled exactly as the phone's round check does (shared/round-check):
    // this round's current readings, and for instruments its route does not read the latest
    // readings of the unit's other rounds within ROUND_CHECK_WINDOW_HOURS; earlier rounds of the same
    // route feed the stuck-value check. Same code, same rows → the same answer on both sides.
    const [{ started }] = (await em.query(
      `SELECT "started_at_device" AS "started", "finished_at_device" AS "finished" FROM "rounds" WHERE "id" = $1`,
      [round.id],
    )) as {
      started: Date;
      finished: Date | null;
    }[];
    const nearby = (await em.query(
      `SELECT r."id", v."route_id" AS "routeId", rt."name" AS "routeName", v."template", r."started_at_device" AS "startedAt",
              r."finished_at_device" AS "finishedAt", r."status"
         FROM "rounds" r
         JOIN "route_versions" v ON v."id" = r."route_version_id"
         JOIN "routes" rt ON rt."id" = v."route_id"
        WHERE rt."unit_id" = $1 AND r."started_at_device" <= $2 AND r."started_at_device" >= $2::timestamptz - interval '7 days'
        ORDER BY r."started_at_device" DESC, r."id"
        LIMIT 200`,
      [unit.id, started],
    )) as {
      id: string;
      routeId: string;
      routeName: string;
      template: RouteTemplate;
      startedAt: Date;
      finishedAt: Date | null;
      status: 'in-progress' | 'finished';
    }[];
    if (!nearby.some((r) => r.id === round.id)) {
      const [me] = (await em.query(
        `SELECT r."id", v."route_id" AS "routeId", rt."name" AS "routeName", v."template", r."started_at_device" AS "startedAt",
                r."finished_at_device" AS "finishedAt", r."status"
           FROM "rounds" r JOIN "route_versions" v ON v."id" = r."route_version_id" JOIN "routes" rt ON rt."id" = v."route_id" WHERE r."id" = $1`,
        [round.id],
      )) as typeof nearby;
      nearby.push(me);
    }
    const readingRows = (await em.query(
      `SELECT r."id", r."round_id" AS "roundId", i."tag", r."value_si" AS "valueSi", r."device_time" AS "deviceTime", r."supersedes",
              i."is_barometer" AS "isBarometer", r."instrument_id" AS "instrumentId"
         FROM "readings" r JOIN "instruments" i ON i."id" = r."instrument_id"
        WHERE r."round_id" = ANY($1::uuid[])
        ORDER BY r."round_id", r."device_time", r."id"`,
      [nearby.map((r) => r.id)],
    )) as (ReadingRow & { deviceTime: Date | string; instrumentId: string })[];
    const iso = (d: Date | string | null) =>
      d === null ? null : d instanceof Date ? d.toISOString() : new Date(d).toISOString();
    const checkRounds = roundsFromRows(
      nearby.map((r) => ({ ...r, startedAt: iso(r.startedAt)!, finishedAt: iso(r.finishedAt) })),
      readingRows.map((r) => ({
        ...r,
        valueSi: r.valueSi === null ? null : Number(r.valueSi),
        deviceTime: iso(r.deviceTime)!,
      })),
      round.elevation_m,
    );
    const me = checkRounds.find((r) => r.id === round.id)!;
    const assembled = assembleRoundCheck({
      model,
      round: me,
      others: checkRounds.filter((r) => r.id !== round.id),
      at: me.finishedAt ?? me.startedAt,
    });
    const readings: RoundReading[] = assembled.readings;
    const barometricPa = assembled.context.barometricPa ?? me.barometricPa;
    const barometricSource: 'reading' | 'elevation' =
      me.barometricPa === barometricFromElevation(round.elevation_m) ? 'elevation' : 'reading';
    // this round's own current readings (the per-instrument rows below are kept for these only)
    const ownIds = new Set(
      Object.values(assembled.sources)
        .filter((x) => x.own)
        .map((x) => x.readingId),
    );
    const mine = readingRows
      .filter((r) => ownIds.has(r.id))
      .map((r) => ({
        id: r.id,
        round_id: round.id,
        instrument_id: r.instrumentId,
        value_si: r.valueSi,
        device_time: new Date(iso(r.deviceTime)!),
      }));
    const inputHash = sha256(canonicalJson({ modelVersion: effective.version, context: assembled.context, readings }));

    const [existing] = (await em.query(
      `SELECT "id", "is_current" FROM "analyses" WHERE "round_id" = $1 AND "input_hash" = $2`,
      [round.id, inputHash],
    )) as { id: string; is_current: boolean }[];
    if (existing) {
      if (!existing.is_current) {
        await em.query(`UPDATE "analyses" SET "is_current" = false WHERE "round_id" = $1 AND "is_current"`, [round.id]);
        await em.query(
          `UPDATE "analysis_instruments" SET "is_current" = false WHERE "round_id" = $1 AND "is_current"`,
          [round.id],
        );
        await em.query(`UPDATE "analyses" SET "is_current" = true WHERE "id" = $1`, [existing.id]);
        await em.query(`UPDATE "analysis_instruments" SET "is_current" = true WHERE "analysis_id" = $1`, [existing.id]);
      }
      await em.query(`UPDATE "rounds" SET "analysed_at" = coalesce("analysed_at", now()) WHERE "id" = $1`, [round.id]);
      await deps.beforeCommit?.(round.id);
      return { status: 'unchanged', roundId, analysisId: existing.id };
    }

    const analysis = analyseRound(model, readings, assembled.context);
    const routeTags = new Set(round.template.stops.flatMap((s) => s.readings.map((r) => r.tag)));
    const modelVersionMismatch =
      round.device_model_version !== null && round.device_model_version !== effective.version;

    await em.query(`UPDATE "analyses" SET "is_current" = false WHERE "round_id" = $1 AND "is_current"`, [round.id]);
    await em.query(`UPDATE "analysis_instruments" SET "is_current" = false WHERE "round_id" = $1 AND "is_current"`, [
      round.id,
    ]);
    // sequential evidence over each instrument's own rounds (./evidence.ts): who may get a work order
    const evidence = await instrumentEvidence(
      em,
      round.id,
      analysis,
      idByTag,
      new Map(mine.map((r) => [r.instrument_id, r.device_time])),
    );
    const findings = [
      ...serverFindings(model, analysis.findings, analysis.performance, routeTags),
      ...outOfServiceFindings(effective.outOfService, routeTags),
      ...evidence.findings,
    ];
    const [{ id: analysisId }] = (await em.query(
      `INSERT INTO "analyses" ("round_id", "site_id", "unit_id", "input_hash", "model_version", "device_model_version", "model_version_mismatch",
                               "barometric_pa", "barometric_source", "state_points", "balances", "performance", "instruments", "reconciliation", "finding_count")
       VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11, $12, $13, $14, $15) RETURNING "id"`,
      [
        round.id,
        round.site_id,
        unit.id,
        inputHash,
        effective.version,
        round.device_model_version,
        modelVersionMismatch,
        barometricPa,
        barometricSource,
        JSON.stringify(analysis.statePoints),
        JSON.stringify(analysis.balances),
        JSON.stringify(analysis.performance),
        JSON.stringify(analysis.instruments),
        JSON.stringify({ ...summaryOfReconciliation(analysis.reconciliation), outOfService: effective.outOfService }),
        findings.length,
      ],
    )) as { id: string }[];

    // findings
    const stored: StoredFinding[] = [];
    if (findings.length) {
      const params: unknown[] = [];
      const tuples = findings.map((f, ordinal) => {
        const ids = f.instrumentTags.map((t) => idByTag.get(t)).filter((x): x is string => !!x);
        const row = [
          analysisId,
          round.id,
          round.site_id,
          unit.id,
          ordinal,
          f.kind,
          f.severity,
          JSON.stringify(f.instrumentTags),
          ids,
          f.equipmentId ?? null,
          f.pointId ?? null,
          f.message,
          JSON.stringify(f.evidence),
        ];
        return `(${row.map((v, k) => `$${params.push(v)}${k === 8 ? '::uuid[]' : ''}`).join(', ')})`;
      });
      const rows = (await em.query(
        `INSERT INTO "findings" ("analysis_id", "round_id", "site_id", "unit_id", "ordinal", "kind", "severity", "instrument_tags", "instrument_ids",
                                 "equipment_ref", "point_ref", "message", "evidence")
         VALUES ${tuples.join(', ')} RETURNING "id", "ordinal"`,
        params,
      )) as { id: string; ordinal: number }[];
      for (const r of rows.sort((a, b) => a.ordinal - b.ordinal)) {
        const f = findings[r.ordinal];
        stored.push({
          id: r.id,
          kind: f.kind,
          severity: f.severity,
          instrumentTags: f.instrumentTags,
          instrumentIds: f.instrumentTags.map((t) => idByTag.get(t)).filter((x): x is string => !!x),
          equipmentRef: f.equipmentId ?? null,
          message: f.message,
        });
      }
    }

    // per-instrument rows (instrument health and history read these)
    const readingOf = new Map(mine.map((r) => [r.instrument_id, r]));
    const instRows: unknown[][] = [];
    for (const ir of analysis.instruments) {
      const id = idByTag.get(ir.tag);
      if (!id) continue;
      const rd = readingOf.get(id);
      // A reading borrowed from another round is that round's evidence, not this one's.
      if (!rd) continue;
      instRows.push([
        analysisId,
        id,
        round.id,
        round.site_id,
        rd?.id ?? null,
        rd?.device_time ?? null,
        ir.status,
        ir.reading,
        ir.sigma,
        ir.reconciled,
        ir.reconciledSigma,
        ir.estimate,
        ir.estimateSigma,
        ir.z,
        ir.u,
        ir.suspect,
        ir.redundant,
      ]);
    }
    if (instRows.length) {
      const params: unknown[] = [];
      const tuples = instRows.map((row) => `(${row.map((v) => `$${params.push(v)}`).join(', ')})`);
      await em.query(
        `INSERT INTO "analysis_instruments" ("analysis_id", "instrument_id", "round_id", "site_id", "reading_id", "measured_at", "status", "reading_si", "sigma_si",
                                             "reconciled_si", "reconciled_sigma_si", "estimate_si", "estimate_sigma_si", "z", "u", "suspect", "redundant")
         VALUES ${tuples.join(', ')}`,
        params,
      );
    }
    await em.query(`UPDATE "rounds" SET "analysed_at" = now() WHERE "id" = $1`, [round.id]);

    const suspects = new Set(analysis.reconciliation.ok ? analysis.reconciliation.suspects : []);
    const workOrders = await workOrdersFromFindings(
      em,
      {
        siteId: round.site_id,
        unitId: unit.id,
        roundId: round.id,
        roundReceivedAt: round.received_at,
        roundSeq: Number(round.server_seq),
        model,
        instruments: byId,
        suspects,
        named: evidence.named,
        z: new Map(
          analysis.instruments
            .filter((ir) => ir.z !== null && Number.isFinite(ir.z))
            .map((ir) => [ir.tag, ir.z as number]),
        ),
      },
      stored,
    );
    await deps.beforeCommit?.(round.id);
    return { status: 'stored', roundId, analysisId, findings: stored.length, workOrders };
  });

  if (result.status === 'stored') {
    const notify = deps.notify;
    if (notify) {
      await notifySafely(logger, 'findingsStored', () => notify.findingsStored(roundId));
      for (const wo of [...result.workOrders.opened, ...result.workOrders.reopened]) {
        if (wo.priority === 1) await notifySafely(logger, 'workOrderOpened', () => notify.workOrderOpened(wo.id));
      }
    }
    logger.info(
      {
        roundId,
        analysisId: result.analysisId,
        findings: result.findings,
        opened: result.workOrders.opened.length,
        attached: result.workOrders.attached.length,
      },
      'round analysed',
    );
  }
  return result;
}
