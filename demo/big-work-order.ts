/**
 * An invented open calibrate order on TI-301 of the Fernhallow demo unit with `rounds` findings,
 * loaded straight in SQL on a database that holds the demo plant (seedDemo): `rounds` analysed
 * rounds, three shifts a day back from now, each with a TI-301 reading 0.5 K high (the demo's
 * drift) and its analysis row (reading σ 0.25 K, reconciled value 0.02 K above design with σ 0.1 K,
 * z = correction over √(σ² − σ̂²), VDI 2048), one finding naming TI-301, the finding attached to the
 * order and one history event per round, as the analysis writes them when it attaches evidence
 * (server/work-orders/from-findings.ts). For the work-order bench and the page's browser check.
 */
import type { DataSource } from 'typeorm';
import { barometricFromElevation } from '../shared/units';

const BARO = barometricFromElevation(112);
/** TI-301's design value (K) */
const T_DESIGN = 415.15;

export async function loadBigWorkOrder(
  ds: DataSource,
  rounds: number,
): Promise<{ siteId: string; workOrderId: string }> {
  const N_ROUNDS = rounds;
  const [site] = (await ds.query(`SELECT "id" FROM "sites" WHERE "slug" = 'fernhallow'`)) as { id: string }[];
  const [unit] = (await ds.query(`SELECT "id" FROM "units" WHERE "site_id" = $1`, [site.id])) as { id: string }[];
  const [inst] = (await ds.query(`SELECT "id" FROM "instruments" WHERE "unit_id" = $1 AND "tag" = 'TI-301'`, [
    unit.id,
  ])) as { id: string }[];
  const [tech] = (await ds.query(`SELECT "id" FROM "users" WHERE "email" = 'tech@fernhallow.example'`)) as {
    id: string;
  }[];
  const [version] = (await ds.query(
    `SELECT v."id" FROM "route_versions" v JOIN "routes" r ON r."id" = v."route_id" WHERE r."unit_id" = $1 ORDER BY r."key" LIMIT 1`,
    [unit.id],
  )) as { id: string }[];
  await ds.query(
    `INSERT INTO "rounds" ("id", "site_id", "route_version_id", "technician_id", "started_at_device", "finished_at_device", "received_at", "status",
                           "client_clock_skew_ms", "device_id", "analysed_at")
     SELECT gen_random_uuid(), $1, $2, $3, t, t + interval '40 minutes', t + interval '45 minutes', 'finished', 0, 'bench-big-order', t + interval '46 minutes'
       FROM generate_series(1, $4::int) k, LATERAL (SELECT now() - (k * interval '8 hours') AS t) x`,
    [site.id, version.id, tech.id, N_ROUNDS],
  );
  await ds.query(
    `INSERT INTO "analyses" ("round_id", "site_id", "unit_id", "input_hash", "model_version", "barometric_pa", "barometric_source",
                             "state_points", "balances", "performance", "instruments", "reconciliation", "finding_count", "analysed_at")
     SELECT ro."id", ro."site_id", $2, md5(ro."id"::text), 'bench', $3, 'elevation', '[]', '[]', '[]', '[]',
            '{"ok":true,"chiSquare":31.2,"dof":14,"critical":23.7,"passed":false,"zCritical":3.2,"suspects":["TI-301"]}', 1, ro."analysed_at"
       FROM "rounds" ro WHERE ro."site_id" = $1 AND ro."device_id" = 'bench-big-order'`,
    [site.id, unit.id, BARO],
  );
  await ds.query(
    `INSERT INTO "readings" ("id", "round_id", "instrument_id", "value_typed", "unit", "value_si", "device_time", "received_at")
     SELECT gen_random_uuid(), ro."id", $2, 142.5, '°C', $3 + 0.5, ro."started_at_device" + interval '5 minutes', ro."received_at"
       FROM "rounds" ro WHERE ro."site_id" = $1 AND ro."device_id" = 'bench-big-order'`,
    [site.id, inst.id, T_DESIGN],
  );
  await ds.query(
    `INSERT INTO "analysis_instruments" ("analysis_id", "instrument_id", "round_id", "site_id", "reading_id", "measured_at", "status", "reading_si",
                                         "sigma_si", "reconciled_si", "reconciled_sigma_si", "estimate_si", "estimate_sigma_si", "z", "suspect", "redundant")
     SELECT a."id", x."instrument_id", x."round_id", a."site_id", x."id", x."device_time", 'used', x."value_si", 0.25, $1 + 0.02, 0.1, $1, 0.12,
            (($1 + 0.02) - x."value_si") / sqrt(0.25 ^ 2 - 0.1 ^ 2), true, true
       FROM "readings" x JOIN "analyses" a ON a."round_id" = x."round_id" JOIN "rounds" ro ON ro."id" = x."round_id" AND ro."device_id" = 'bench-big-order'`,
    [T_DESIGN],
  );
  await ds.query(
    `INSERT INTO "findings" ("analysis_id", "round_id", "site_id", "unit_id", "ordinal", "kind", "severity", "instrument_tags", "instrument_ids", "message", "evidence", "created_at")
     SELECT a."id", a."round_id", a."site_id", a."unit_id", 0, 'sustained-bias', 2, '["TI-301"]', ARRAY[$1::uuid],
            'TI-301 reads about 0.5 K high against the balances', '{"u":2.1}', a."analysed_at"
       FROM "analyses" a JOIN "rounds" ro ON ro."id" = a."round_id" AND ro."device_id" = 'bench-big-order' WHERE a."site_id" = $2`,
    [inst.id, site.id],
  );
  const [wo] = (await ds.query(
    `INSERT INTO "work_orders" ("site_id", "unit_id", "number", "code", "kind", "status", "priority", "title", "instrument_id", "instrument_tag", "due_date")
     VALUES ($1, $2, 9001, 'WO-9001', 'calibrate', 'open', 2, 'Calibrate TI-301 (deaerator outlet temperature): sustained bias', $3, 'TI-301', (now() + interval '14 days')::date)
     RETURNING "id"`,
    [site.id, unit.id, inst.id],
  )) as { id: string }[];
  await ds.query(
    `INSERT INTO "work_order_findings" ("work_order_id", "finding_id", "attached_at") SELECT $1, f."id", f."created_at" FROM "findings" f JOIN "rounds" ro ON ro."id" = f."round_id" AND ro."device_id" = 'bench-big-order' WHERE f."site_id" = $2`,
    [wo.id, site.id],
  );
  await ds.query(
    `INSERT INTO "work_order_events" ("work_order_id", "actor_id", "type", "changes", "comment", "at")
     SELECT $1, NULL, 'evidence', jsonb_build_object('roundId', f."round_id"), f."message", f."created_at" FROM "findings" f JOIN "rounds" ro ON ro."id" = f."round_id" AND ro."device_id" = 'bench-big-order' WHERE f."site_id" = $2`,
    [wo.id, site.id],
  );
  return { siteId: site.id, workOrderId: wo.id };
}
