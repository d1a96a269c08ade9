/** The SQL of the CSV exports (./routes.ts streams it). */
import type { DataSource } from 'typeorm';

/** Where a page of readings ends: the full-precision text of the device time (a JS Date keeps only milliseconds) and the id. */
export interface ReadingKey {
  t: string;
  id: string;
}

export interface ExportReadingRow {
  id: string;
  time_key: string;
  round_id: string;
  route: string;
  technician: string;
  device_time: Date;
  received_at: Date;
  tag: string;
  quantity: string;
  value_typed: string | null;
  unit: string;
  reference: string | null;
  value_si: number | null;
  skip_reason: string | null;
  note: string | null;
  supersedes: string | null;
  superseded: boolean;
  reconciled_si: number | null;
  reconciled_sigma_si: number | null;
  z: number | null;
  suspect: boolean | null;
}

/** Readings of the site recorded (device time) in [from, to), after `after`, in (device time, id) order. */
export async function readingsPage(
  ds: DataSource,
  siteId: string,
  from: Date,
  to: Date,
  after: ReadingKey | null,
  limit: number,
): Promise<ExportReadingRow[]> {
  const params: unknown[] = [siteId, from, to, limit];
  const keyset = after
    ? `AND (r."device_time", r."id") > ($${params.push(after.t)}::timestamptz, $${params.push(after.id)}::uuid)`
    : '';
  return (await ds.query(
    `SELECT r."id", r."device_time"::text AS "time_key", r."round_id", rt."key" AS "route", COALESCE(tm."display_name", u."name") AS "technician", r."device_time", r."received_at", i."tag", i."quantity",
            r."value_typed", r."unit", r."reference", r."value_si", r."skip_reason", r."note", r."supersedes",
            EXISTS (SELECT 1 FROM "readings" s WHERE s."supersedes" = r."id") AS "superseded",
            ai."reconciled_si", ai."reconciled_sigma_si", ai."z", ai."suspect"
       FROM "readings" r
       JOIN "rounds" ro ON ro."id" = r."round_id"
       JOIN "route_versions" v ON v."id" = ro."route_version_id"
       JOIN "routes" rt ON rt."id" = v."route_id"
       JOIN "users" u ON u."id" = ro."technician_id"
       LEFT JOIN "memberships" tm ON tm."user_id" = ro."technician_id" AND tm."site_id" = ro."site_id"
       JOIN "instruments" i ON i."id" = r."instrument_id"
       LEFT JOIN "analysis_instruments" ai ON ai."reading_id" = r."id" AND ai."is_current"
      WHERE ro."site_id" = $1 AND r."device_time" >= $2 AND r."device_time" < $3 ${keyset}
      ORDER BY r."device_time", r."id"
      LIMIT $4`,
    params,
  )) as ExportReadingRow[];
}
