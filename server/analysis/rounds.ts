/** The site's analysed rounds, a page at a time (./rounds-routes.ts serves it). */
import type { DataSource } from 'typeorm';
import type { AnalysedRoundsResponse } from '../../shared/api/rounds';

export async function analysedRounds(
  ds: DataSource,
  siteId: string,
  page: number,
  limit: number,
): Promise<AnalysedRoundsResponse> {
  const [{ total }] = (await ds.query(
    `SELECT count(*)::int AS "total" FROM "analyses" a WHERE a."site_id" = $1 AND a."is_current"`,
    [siteId],
  )) as {
    total: number;
  }[];
  const rows = (await ds.query(
    `SELECT r."id" AS "round_id", a."id" AS "analysis_id", rt."id" AS "route_id", rt."name" AS "route_name", u."id" AS "unit_id", u."name" AS "unit_name",
            r."started_at_device", r."finished_at_device", a."analysed_at", a."model_version_mismatch",
            count(f."id")::int AS "total",
            count(f."id") FILTER (WHERE f."severity" = 1)::int AS "urgent",
            count(f."id") FILTER (WHERE f."severity" = 2)::int AS "attend",
            count(f."id") FILTER (WHERE f."severity" = 3)::int AS "note"
       FROM "analyses" a
       JOIN "rounds" r ON r."id" = a."round_id"
       JOIN "route_versions" v ON v."id" = r."route_version_id"
       JOIN "routes" rt ON rt."id" = v."route_id"
       JOIN "units" u ON u."id" = a."unit_id"
       LEFT JOIN "findings" f ON f."analysis_id" = a."id"
      WHERE a."site_id" = $1 AND a."is_current" AND r."site_id" = $1
      GROUP BY r."id", a."id", rt."id", u."id"
      ORDER BY r."started_at_device" DESC, r."id" DESC
      LIMIT $2 OFFSET $3`,
    [siteId, limit, (page - 1) * limit],
  )) as {
    round_id: string;
    analysis_id: string;
    route_id: string;
    route_name: string;
    unit_id: string;
    unit_name: string;
    started_at_device: Date;
    finished_at_device: Date | null;
    analysed_at: Date;
    model_version_mismatch: boolean;
    total: number;
    urgent: number;
    attend: number;
    note: number;
  }[];
  const iso = (d: Date) => new Date(d).toISOString();
  return {
    page,
    limit,
    total,
    rounds: rows.map((r) => ({
      roundId: r.round_id,
      analysisId: r.analysis_id,
      routeId: r.route_id,
      routeName: r.route_name,
      unitId: r.unit_id,
      unitName: r.unit_name,
      startedAt: iso(r.started_at_device),
      finishedAt: r.finished_at_device ? iso(r.finished_at_device) : null,
      analysedAt: iso(r.analysed_at),
      findings: { total: r.total, urgent: r.urgent, attend: r.attend, note: r.note },
      modelVersionMismatch: r.model_version_mismatch,
    })),
  };
}
