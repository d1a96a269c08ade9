/**
 * Sequential evidence per instrument (shared/cycle/evidence.ts: Page's CUSUM on the signed
 * normalised corrections, the gross-error fast path), inside the analysis transaction.
 *
 * The series of an instrument is its own readings' rows in analysis_instruments (a reading borrowed
 * by another round has no row there, so each reading counts once), current analyses only, in
 * reading-time order up to this round's reading, after its last reset: the later of its last
 * calibration record and the close of its last done calibrate or check-group order (the loop
 * closed). At most SERIES_MAX rows are read: at k = 1 a CUSUM forgets far faster than that.
 *
 * What it returns: the decisions (who is named, why) and a `sustained-bias` finding for each
 * decision reached by accumulation; a gross error's own finding (gross-error, gauge read as
 * absolute …) carries the fast path. server/work-orders/from-findings.ts opens orders only for
 * instruments a decision names.
 */
import type { EntityManager } from 'typeorm';
import {
  CUSUM_H,
  CUSUM_K,
  cusumOver,
  decideEvidence,
  GROSS_Z,
  ATTEND,
  type EvidenceDecision,
  type InstrumentEvidence,
  type RoundAnalysis,
} from '../../shared/cycle';
import { messages } from '../../shared/cycle/messages';
import type { ServerFinding } from './plant-checks';

export const SERIES_MAX = 200;

interface SeriesRow {
  instrument_id: string;
  u: number | null;
}

export interface EvidenceOutcome {
  decisions: EvidenceDecision[];
  findings: ServerFinding[];
  /** tags a decision names: their reconciliation findings may open orders */
  named: Set<string>;
}

export async function instrumentEvidence(
  em: EntityManager,
  roundId: string,
  analysis: RoundAnalysis,
  idByTag: ReadonlyMap<string, string>,
  /** this round's own readings: instrument id → reading time */
  own: ReadonlyMap<string, Date>,
): Promise<EvidenceOutcome> {
  const tested = analysis.instruments.filter(
    (i) => i.u !== null && i.redundant && idByTag.has(i.tag) && own.has(idByTag.get(i.tag)!),
  );
  const ids = tested.map((i) => idByTag.get(i.tag)!);
  const rows = ids.length
    ? ((await em.query(
        `WITH me AS (SELECT * FROM unnest($2::uuid[], $3::timestamptz[]) AS t("instrument_id", "measured_at")),
              reset AS (
                SELECT me."instrument_id",
                       GREATEST(
                         (SELECT max(c."created_at") FROM "calibration_records" c WHERE c."instrument_id" = me."instrument_id"),
                         (SELECT max(w."closed_at") FROM "work_orders" w
                           WHERE w."instrument_id" = me."instrument_id" AND w."status" = 'done' AND w."kind" IN ('calibrate', 'check-group'))
                       ) AS "at"
                  FROM me),
              series AS (
                SELECT ai."instrument_id", ai."u", ai."measured_at", ai."round_id",
                       row_number() OVER (PARTITION BY ai."instrument_id" ORDER BY ai."measured_at" DESC, ai."round_id" DESC) AS "k"
                  FROM "analysis_instruments" ai
                  JOIN me ON me."instrument_id" = ai."instrument_id"
                  JOIN "rounds" r ON r."id" = ai."round_id"
                  JOIN reset ON reset."instrument_id" = ai."instrument_id"
                 WHERE ai."is_current" AND ai."u" IS NOT NULL AND ai."round_id" <> $1 AND ai."measured_at" <= me."measured_at"
                   AND (reset."at" IS NULL OR r."received_at" > reset."at"))
         SELECT "instrument_id", "u" FROM series WHERE "k" < $4
          ORDER BY "instrument_id", "measured_at", "round_id"`,
        [roundId, ids, ids.map((id) => own.get(id)!), SERIES_MAX],
      )) as SeriesRow[])
    : [];
  const byId = new Map<string, number[]>();
  for (const r of rows) {
    const u = r.u === null ? null : Number(r.u);
    if (u !== null && Number.isFinite(u)) byId.set(r.instrument_id, [...(byId.get(r.instrument_id) ?? []), u]);
  }
  const evidence: InstrumentEvidence[] = tested.map((i) => {
    const u = i.u;
    const series = [...(byId.get(idByTag.get(i.tag)!) ?? []), ...(u === null ? [] : [u])];
    return { tag: i.tag, u, state: cusumOver(series) };
  });
  const pairs = analysis.reconciliation.ok ? analysis.reconciliation.correlatedCorrections : [];
  const decisions = decideEvidence(evidence, pairs);
  const findings: ServerFinding[] = [];
  const named = new Set<string>();
  for (const d of decisions) {
    for (const t of d.tags) named.add(t);
    if (d.reason !== 'sustained') continue;
    const first = evidence.find((e) => e.tag === d.tags[0])!;
    const high = first.state.hi >= first.state.lo;
    findings.push({
      kind: 'sustained-bias',
      severity: ATTEND,
      instrumentTags: d.tags,
      instrumentIds: d.tags.map((t) => idByTag.get(t)!).filter(Boolean),
      message: messages.sustainedBias(d.tags, high, d.statistic, d.rounds),
      evidence: {
        cusum: d.statistic,
        threshold: CUSUM_H,
        reference: CUSUM_K,
        grossZ: GROSS_Z,
        rounds: d.rounds,
        direction: high ? 'high' : 'low',
        explains: d.explains,
        method: "Page's two-sided CUSUM on the signed normalised corrections (Page 1954)",
      },
    });
  }
  return { decisions, findings, named };
}
