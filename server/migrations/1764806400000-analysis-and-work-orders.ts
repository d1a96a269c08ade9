import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Round analyses (analyses, findings, analysis_instruments), work orders (work_orders with their
 * per-site counter, findings attached as evidence, history events) and calibration records; the
 * rounds get `analysed_at` (set in the transaction that stores the analysis) and the model
 * version the device held (`device_model_version`).
 *
 * Dedup: at most one open work order per (site, instrument, kind) and per (unit, equipment, kind)
 * — partial unique indexes over the statuses other than done and cancelled; the analysis also
 * locks the site's counter row before it looks, so concurrent workers attach instead of failing.
 *
 * Hand-written; TypeORM's schema builder finds no difference between this and server/entities.
 */
export class AnalysisAndWorkOrders1764806400000 implements MigrationInterface {
  name = 'AnalysisAndWorkOrders1764806400000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE "rounds" ADD "analysed_at" TIMESTAMP WITH TIME ZONE`);
    await q.query(`ALTER TABLE "rounds" ADD "device_model_version" character varying(64)`);

    await q.query(`
      CREATE TABLE "analyses" (
        "id" uuid NOT NULL DEFAULT gen_random_uuid(),
        "round_id" uuid NOT NULL,
        "site_id" uuid NOT NULL,
        "unit_id" uuid NOT NULL,
        "input_hash" character varying(64) NOT NULL,
        "model_version" character varying(64) NOT NULL,
        "device_model_version" character varying(64),
        "model_version_mismatch" boolean NOT NULL DEFAULT false,
        "barometric_pa" double precision NOT NULL,
        "barometric_source" character varying(16) NOT NULL,
        "is_current" boolean NOT NULL DEFAULT true,
        "analysed_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        "state_points" jsonb NOT NULL,
        "balances" jsonb NOT NULL,
        "performance" jsonb NOT NULL,
        "instruments" jsonb NOT NULL,
        "reconciliation" jsonb NOT NULL,
        "finding_count" integer NOT NULL,
        CONSTRAINT "pk_analyses" PRIMARY KEY ("id"),
        CONSTRAINT "uq_analyses_round_input" UNIQUE ("round_id", "input_hash"),
        CONSTRAINT "fk_analyses_round" FOREIGN KEY ("round_id") REFERENCES "rounds"("id") ON DELETE CASCADE,
        CONSTRAINT "fk_analyses_site" FOREIGN KEY ("site_id") REFERENCES "sites"("id") ON DELETE CASCADE,
        CONSTRAINT "fk_analyses_unit" FOREIGN KEY ("unit_id") REFERENCES "units"("id") ON DELETE CASCADE
      )`);
    await q.query(`CREATE UNIQUE INDEX "ux_analyses_round_current" ON "analyses" ("round_id") WHERE "is_current"`);
    await q.query(`CREATE INDEX "ix_analyses_site_time" ON "analyses" ("site_id", "analysed_at")`);

    await q.query(`
      CREATE TABLE "findings" (
        "id" uuid NOT NULL DEFAULT gen_random_uuid(),
        "analysis_id" uuid NOT NULL,
        "round_id" uuid NOT NULL,
        "site_id" uuid NOT NULL,
        "unit_id" uuid NOT NULL,
        "ordinal" integer NOT NULL,
        "kind" character varying(40) NOT NULL,
        "severity" smallint NOT NULL,
        "instrument_tags" jsonb NOT NULL DEFAULT '[]',
        "instrument_ids" uuid array NOT NULL DEFAULT '{}',
        "equipment_ref" character varying(64),
        "point_ref" character varying(64),
        "message" text NOT NULL,
        "evidence" jsonb NOT NULL,
        "created_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        CONSTRAINT "pk_findings" PRIMARY KEY ("id"),
        CONSTRAINT "ck_findings_severity" CHECK ("severity" BETWEEN 1 AND 3),
        CONSTRAINT "fk_findings_analysis" FOREIGN KEY ("analysis_id") REFERENCES "analyses"("id") ON DELETE CASCADE,
        CONSTRAINT "fk_findings_site" FOREIGN KEY ("site_id") REFERENCES "sites"("id") ON DELETE CASCADE
      )`);
    await q.query(`CREATE INDEX "ix_findings_analysis" ON "findings" ("analysis_id")`);
    await q.query(`CREATE INDEX "ix_findings_site_time" ON "findings" ("site_id", "created_at")`);
    await q.query(`CREATE INDEX "ix_findings_instruments" ON "findings" USING gin ("instrument_ids")`);

    await q.query(`
      CREATE TABLE "analysis_instruments" (
        "analysis_id" uuid NOT NULL,
        "instrument_id" uuid NOT NULL,
        "round_id" uuid NOT NULL,
        "site_id" uuid NOT NULL,
        "reading_id" uuid,
        "measured_at" TIMESTAMP WITH TIME ZONE,
        "is_current" boolean NOT NULL DEFAULT true,
        "status" character varying(16) NOT NULL,
        "reading_si" double precision,
        "sigma_si" double precision,
        "reconciled_si" double precision,
        "reconciled_sigma_si" double precision,
        "estimate_si" double precision,
        "estimate_sigma_si" double precision,
        "z" double precision,
        "suspect" boolean NOT NULL DEFAULT false,
        "redundant" boolean NOT NULL DEFAULT false,
        CONSTRAINT "pk_analysis_instruments" PRIMARY KEY ("analysis_id", "instrument_id"),
        CONSTRAINT "fk_analysis_instruments_analysis" FOREIGN KEY ("analysis_id") REFERENCES "analyses"("id") ON DELETE CASCADE,
        CONSTRAINT "fk_analysis_instruments_instrument" FOREIGN KEY ("instrument_id") REFERENCES "instruments"("id") ON DELETE CASCADE,
        CONSTRAINT "fk_analysis_instruments_reading" FOREIGN KEY ("reading_id") REFERENCES "readings"("id") ON DELETE CASCADE
      )`);
    await q.query(
      `CREATE INDEX "ix_analysis_instruments_instrument_time" ON "analysis_instruments" ("instrument_id", "measured_at")`,
    );

    await q.query(`CREATE TYPE "work_order_kind" AS ENUM ('calibrate', 'repair', 'inspect', 'clean')`);
    await q.query(
      `CREATE TYPE "work_order_status" AS ENUM ('open', 'triaged', 'scheduled', 'in-progress', 'done', 'cancelled')`,
    );

    await q.query(`
      CREATE TABLE "work_orders" (
        "id" uuid NOT NULL DEFAULT gen_random_uuid(),
        "site_id" uuid NOT NULL,
        "unit_id" uuid NOT NULL,
        "number" integer NOT NULL,
        "code" character varying(16) NOT NULL,
        "kind" "work_order_kind" NOT NULL,
        "status" "work_order_status" NOT NULL DEFAULT 'open',
        "priority" smallint NOT NULL,
        "title" character varying(300) NOT NULL,
        "instrument_id" uuid,
        "instrument_tag" character varying(40),
        "equipment_ref" character varying(64),
        "assignee_id" uuid,
        "due_date" date,
        "scheduled_for" date,
        "cancel_reason" text,
        "merged_into_id" uuid,
        "reopen_count" integer NOT NULL DEFAULT 0,
        "opened_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        "updated_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        "closed_at" TIMESTAMP WITH TIME ZONE,
        CONSTRAINT "pk_work_orders" PRIMARY KEY ("id"),
        CONSTRAINT "uq_work_orders_site_number" UNIQUE ("site_id", "number"),
        CONSTRAINT "ck_work_orders_priority" CHECK ("priority" BETWEEN 1 AND 3),
        CONSTRAINT "ck_work_orders_number" CHECK ("number" >= 1),
        CONSTRAINT "ck_work_orders_target" CHECK (("instrument_id" IS NOT NULL) OR ("equipment_ref" IS NOT NULL)),
        CONSTRAINT "fk_work_orders_site" FOREIGN KEY ("site_id") REFERENCES "sites"("id") ON DELETE CASCADE,
        CONSTRAINT "fk_work_orders_unit" FOREIGN KEY ("unit_id") REFERENCES "units"("id") ON DELETE CASCADE,
        CONSTRAINT "fk_work_orders_instrument" FOREIGN KEY ("instrument_id") REFERENCES "instruments"("id") ON DELETE CASCADE,
        CONSTRAINT "fk_work_orders_assignee" FOREIGN KEY ("assignee_id") REFERENCES "users"("id") ON DELETE SET NULL,
        CONSTRAINT "fk_work_orders_merged_into" FOREIGN KEY ("merged_into_id") REFERENCES "work_orders"("id") ON DELETE SET NULL
      )`);
    await q.query(`
      CREATE UNIQUE INDEX "ux_work_orders_open_instrument" ON "work_orders" ("site_id", "instrument_id", "kind")
        WHERE "status" NOT IN ('done', 'cancelled') AND "instrument_id" IS NOT NULL`);
    await q.query(`
      CREATE UNIQUE INDEX "ux_work_orders_open_equipment" ON "work_orders" ("unit_id", "equipment_ref", "kind")
        WHERE "status" NOT IN ('done', 'cancelled') AND "instrument_id" IS NULL`);
    await q.query(`CREATE INDEX "ix_work_orders_site_status" ON "work_orders" ("site_id", "status", "priority")`);
    await q.query(`CREATE INDEX "ix_work_orders_site_opened" ON "work_orders" ("site_id", "opened_at")`);
    await q.query(`CREATE INDEX "ix_work_orders_site_kind" ON "work_orders" ("site_id", "kind")`);
    await q.query(`CREATE INDEX "ix_work_orders_site_tag" ON "work_orders" ("site_id", "instrument_tag")`);
    await q.query(`CREATE INDEX "ix_work_orders_unit" ON "work_orders" ("unit_id")`);
    await q.query(`CREATE INDEX "ix_work_orders_instrument" ON "work_orders" ("instrument_id")`);
    await q.query(`CREATE INDEX "ix_work_orders_assignee" ON "work_orders" ("assignee_id")`);

    await q.query(`
      CREATE TABLE "work_order_counters" (
        "site_id" uuid NOT NULL,
        "last_number" integer NOT NULL DEFAULT 0,
        CONSTRAINT "pk_work_order_counters" PRIMARY KEY ("site_id"),
        CONSTRAINT "fk_work_order_counters_site" FOREIGN KEY ("site_id") REFERENCES "sites"("id") ON DELETE CASCADE
      )`);

    await q.query(`
      CREATE TABLE "work_order_findings" (
        "work_order_id" uuid NOT NULL,
        "finding_id" uuid NOT NULL,
        "attached_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        CONSTRAINT "pk_work_order_findings" PRIMARY KEY ("work_order_id", "finding_id"),
        CONSTRAINT "fk_work_order_findings_work_order" FOREIGN KEY ("work_order_id") REFERENCES "work_orders"("id") ON DELETE CASCADE,
        CONSTRAINT "fk_work_order_findings_finding" FOREIGN KEY ("finding_id") REFERENCES "findings"("id") ON DELETE CASCADE
      )`);
    await q.query(`CREATE INDEX "ix_work_order_findings_finding" ON "work_order_findings" ("finding_id")`);

    await q.query(`
      CREATE TABLE "work_order_events" (
        "id" uuid NOT NULL DEFAULT gen_random_uuid(),
        "work_order_id" uuid NOT NULL,
        "at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        "actor_id" uuid,
        "type" character varying(32) NOT NULL,
        "from_status" "work_order_status",
        "to_status" "work_order_status",
        "changes" jsonb NOT NULL DEFAULT '{}',
        "comment" text,
        CONSTRAINT "pk_work_order_events" PRIMARY KEY ("id"),
        CONSTRAINT "fk_work_order_events_work_order" FOREIGN KEY ("work_order_id") REFERENCES "work_orders"("id") ON DELETE CASCADE,
        CONSTRAINT "fk_work_order_events_actor" FOREIGN KEY ("actor_id") REFERENCES "users"("id") ON DELETE SET NULL
      )`);
    await q.query(`CREATE INDEX "ix_work_order_events_work_order" ON "work_order_events" ("work_order_id", "at")`);

    await q.query(`
      CREATE TABLE "calibration_records" (
        "id" uuid NOT NULL DEFAULT gen_random_uuid(),
        "work_order_id" uuid NOT NULL,
        "instrument_id" uuid NOT NULL,
        "site_id" uuid NOT NULL,
        "as_found" double precision NOT NULL,
        "as_left" double precision NOT NULL,
        "unit" character varying(16) NOT NULL,
        "reference" "pressure_reference",
        "calibrated_on" date NOT NULL,
        "calibrated_by" uuid NOT NULL,
        "note" text,
        "created_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        CONSTRAINT "pk_calibration_records" PRIMARY KEY ("id"),
        CONSTRAINT "fk_calibration_records_work_order" FOREIGN KEY ("work_order_id") REFERENCES "work_orders"("id") ON DELETE CASCADE,
        CONSTRAINT "fk_calibration_records_instrument" FOREIGN KEY ("instrument_id") REFERENCES "instruments"("id") ON DELETE CASCADE,
        CONSTRAINT "fk_calibration_records_calibrated_by" FOREIGN KEY ("calibrated_by") REFERENCES "users"("id")
      )`);
    await q.query(
      `CREATE INDEX "ix_calibration_records_instrument" ON "calibration_records" ("instrument_id", "calibrated_on")`,
    );
    await q.query(`CREATE INDEX "ix_calibration_records_work_order" ON "calibration_records" ("work_order_id")`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE "calibration_records"`);
    await q.query(`DROP TABLE "work_order_events"`);
    await q.query(`DROP TABLE "work_order_findings"`);
    await q.query(`DROP TABLE "work_order_counters"`);
    await q.query(`DROP TABLE "work_orders"`);
    await q.query(`DROP TYPE "work_order_status"`);
    await q.query(`DROP TYPE "work_order_kind"`);
    await q.query(`DROP TABLE "analysis_instruments"`);
    await q.query(`DROP TABLE "findings"`);
    await q.query(`DROP TABLE "analyses"`);
    await q.query(`ALTER TABLE "rounds" DROP COLUMN "device_model_version"`);
    await q.query(`ALTER TABLE "rounds" DROP COLUMN "analysed_at"`);
  }
}
