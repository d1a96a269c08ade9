import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Units, instruments, routes and route versions (reference data the devices pull), and the
 * rounds, readings, check answers and photos they push.
 *
 * - `sync_seq` is the one global sync sequence. A BEFORE INSERT OR UPDATE trigger
 *   (`sync_stamp`) gives every unit, instrument, route and route-version row a fresh
 *   `sync_version` from it, and takes a transaction-scoped advisory lock first: writers of synced
 *   rows run one at a time, so sequence order is commit order and a pull that has seen version N
 *   has seen everything below N (see server/sync/pull.ts).
 * - Readings and check answers are append-only: a trigger refuses UPDATE.
 *
 * Hand-written; TypeORM's schema builder finds no difference between this and server/entities.
 */
export class SyncAndRoutes1764720000000 implements MigrationInterface {
  name = 'SyncAndRoutes1764720000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE SEQUENCE "sync_seq" AS bigint START WITH 1`);
    await q.query(`
      CREATE FUNCTION "sync_stamp"() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        PERFORM pg_advisory_xact_lock(hashtext('trueround.sync_seq'));
        NEW."sync_version" := nextval('sync_seq');
        RETURN NEW;
      END
      $$`);
    await q.query(`
      CREATE FUNCTION "refuse_update"() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        RAISE EXCEPTION '% rows are append-only: write a new row that supersedes this one', TG_TABLE_NAME
          USING ERRCODE = 'restrict_violation';
      END
      $$`);

    await q.query(
      `CREATE TYPE "instrument_quantity" AS ENUM ('pressure', 'temperature', 'massFlow', 'power', 'level')`,
    );
    await q.query(`CREATE TYPE "pressure_reference" AS ENUM ('absolute', 'gauge', 'vacuum')`);
    await q.query(`CREATE TYPE "instrument_status" AS ENUM ('ok', 'suspect', 'out-of-service')`);
    await q.query(`CREATE TYPE "round_status" AS ENUM ('in-progress', 'finished')`);
    await q.query(`CREATE TYPE "photo_status" AS ENUM ('pending', 'stored')`);

    await q.query(`
      CREATE TABLE "units" (
        "id" uuid NOT NULL DEFAULT gen_random_uuid(),
        "site_id" uuid NOT NULL,
        "name" character varying(200) NOT NULL,
        "model" jsonb NOT NULL,
        "model_version" character varying(64) NOT NULL,
        "created_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        "updated_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        "sync_version" bigint NOT NULL DEFAULT nextval('sync_seq'),
        CONSTRAINT "pk_units" PRIMARY KEY ("id"),
        CONSTRAINT "uq_units_site_name" UNIQUE ("site_id", "name"),
        CONSTRAINT "fk_units_site" FOREIGN KEY ("site_id") REFERENCES "sites"("id") ON DELETE CASCADE
      )`);
    await q.query(`CREATE INDEX "ix_units_sync_version" ON "units" ("sync_version")`);

    await q.query(`
      CREATE TABLE "instruments" (
        "id" uuid NOT NULL DEFAULT gen_random_uuid(),
        "unit_id" uuid NOT NULL,
        "tag" character varying(40) NOT NULL,
        "quantity" "instrument_quantity" NOT NULL,
        "point_ref" character varying(64),
        "equipment_ref" character varying(64),
        "reference" "pressure_reference",
        "range" jsonb,
        "accuracy" jsonb,
        "gauge_unit" character varying(16) NOT NULL,
        "calibration_date" date,
        "calibration_interval_days" integer,
        "status" "instrument_status" NOT NULL DEFAULT 'ok',
        "is_barometer" boolean NOT NULL DEFAULT false,
        "created_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        "updated_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        "row_version" integer NOT NULL,
        "sync_version" bigint NOT NULL DEFAULT nextval('sync_seq'),
        CONSTRAINT "pk_instruments" PRIMARY KEY ("id"),
        CONSTRAINT "uq_instruments_unit_tag" UNIQUE ("unit_id", "tag"),
        CONSTRAINT "fk_instruments_unit" FOREIGN KEY ("unit_id") REFERENCES "units"("id") ON DELETE CASCADE
      )`);
    await q.query(`CREATE INDEX "ix_instruments_sync_version" ON "instruments" ("sync_version")`);

    await q.query(`
      CREATE TABLE "routes" (
        "id" uuid NOT NULL DEFAULT gen_random_uuid(),
        "site_id" uuid NOT NULL,
        "unit_id" uuid NOT NULL,
        "key" character varying(64) NOT NULL,
        "name" character varying(200) NOT NULL,
        "current_version_id" uuid,
        "created_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        "sync_version" bigint NOT NULL DEFAULT nextval('sync_seq'),
        CONSTRAINT "pk_routes" PRIMARY KEY ("id"),
        CONSTRAINT "uq_routes_site_key" UNIQUE ("site_id", "key"),
        CONSTRAINT "fk_routes_site" FOREIGN KEY ("site_id") REFERENCES "sites"("id") ON DELETE CASCADE,
        CONSTRAINT "fk_routes_unit" FOREIGN KEY ("unit_id") REFERENCES "units"("id") ON DELETE CASCADE
      )`);
    await q.query(`CREATE INDEX "ix_routes_unit" ON "routes" ("unit_id")`);
    await q.query(`CREATE INDEX "ix_routes_sync_version" ON "routes" ("sync_version")`);

    await q.query(`
      CREATE TABLE "route_versions" (
        "id" uuid NOT NULL DEFAULT gen_random_uuid(),
        "route_id" uuid NOT NULL,
        "number" integer NOT NULL,
        "template" jsonb NOT NULL,
        "published_at" TIMESTAMP WITH TIME ZONE NOT NULL,
        "published_by" uuid,
        "sync_version" bigint NOT NULL DEFAULT nextval('sync_seq'),
        CONSTRAINT "pk_route_versions" PRIMARY KEY ("id"),
        CONSTRAINT "uq_route_versions_route_number" UNIQUE ("route_id", "number"),
        CONSTRAINT "ck_route_versions_number" CHECK ("number" >= 1),
        CONSTRAINT "fk_route_versions_route" FOREIGN KEY ("route_id") REFERENCES "routes"("id") ON DELETE CASCADE,
        CONSTRAINT "fk_route_versions_published_by" FOREIGN KEY ("published_by") REFERENCES "users"("id") ON DELETE SET NULL
      )`);
    await q.query(`
      ALTER TABLE "routes" ADD CONSTRAINT "fk_routes_current_version"
        FOREIGN KEY ("current_version_id") REFERENCES "route_versions"("id") ON DELETE SET NULL`);

    for (const t of ['units', 'instruments', 'routes', 'route_versions']) {
      await q.query(
        `CREATE TRIGGER "tg_${t}_sync_stamp" BEFORE INSERT OR UPDATE ON "${t}" FOR EACH ROW EXECUTE FUNCTION "sync_stamp"()`,
      );
    }

    await q.query(`
      CREATE TABLE "rounds" (
        "id" uuid NOT NULL,
        "site_id" uuid NOT NULL,
        "route_version_id" uuid NOT NULL,
        "technician_id" uuid NOT NULL,
        "started_at_device" TIMESTAMP WITH TIME ZONE NOT NULL,
        "finished_at_device" TIMESTAMP WITH TIME ZONE,
        "received_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        "status" "round_status" NOT NULL,
        "dismissals" jsonb NOT NULL DEFAULT '[]',
        "client_clock_skew_ms" bigint NOT NULL,
        "device_id" character varying(128) NOT NULL,
        "server_seq" bigint NOT NULL DEFAULT nextval('sync_seq'),
        CONSTRAINT "pk_rounds" PRIMARY KEY ("id"),
        CONSTRAINT "fk_rounds_site" FOREIGN KEY ("site_id") REFERENCES "sites"("id") ON DELETE CASCADE,
        CONSTRAINT "fk_rounds_route_version" FOREIGN KEY ("route_version_id") REFERENCES "route_versions"("id"),
        CONSTRAINT "fk_rounds_technician" FOREIGN KEY ("technician_id") REFERENCES "users"("id")
      )`);
    await q.query(`CREATE INDEX "ix_rounds_site_seq" ON "rounds" ("site_id", "server_seq")`);
    await q.query(`CREATE INDEX "ix_rounds_route_version" ON "rounds" ("route_version_id")`);
    await q.query(`CREATE INDEX "ix_rounds_technician" ON "rounds" ("technician_id")`);

    await q.query(`
      CREATE TABLE "readings" (
        "id" uuid NOT NULL,
        "round_id" uuid NOT NULL,
        "instrument_id" uuid NOT NULL,
        "value_typed" numeric,
        "unit" character varying(16) NOT NULL,
        "reference" "pressure_reference",
        "value_si" double precision,
        "device_time" TIMESTAMP WITH TIME ZONE NOT NULL,
        "received_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        "note" text,
        "skip_reason" text,
        "supersedes" uuid,
        "confirmed_after_flag" boolean NOT NULL DEFAULT false,
        "flags" jsonb NOT NULL DEFAULT '[]',
        CONSTRAINT "pk_readings" PRIMARY KEY ("id"),
        CONSTRAINT "ck_readings_value_or_skip" CHECK (("value_typed" IS NOT NULL) OR ("skip_reason" IS NOT NULL)),
        CONSTRAINT "ck_readings_si_with_value" CHECK (("value_typed" IS NULL) = ("value_si" IS NULL)),
        CONSTRAINT "fk_readings_round" FOREIGN KEY ("round_id") REFERENCES "rounds"("id") ON DELETE CASCADE,
        CONSTRAINT "fk_readings_instrument" FOREIGN KEY ("instrument_id") REFERENCES "instruments"("id"),
        CONSTRAINT "fk_readings_supersedes" FOREIGN KEY ("supersedes") REFERENCES "readings"("id")
      )`);
    await q.query(`CREATE INDEX "ix_readings_instrument_time" ON "readings" ("instrument_id", "device_time")`);
    await q.query(`CREATE INDEX "ix_readings_round" ON "readings" ("round_id")`);

    await q.query(`
      CREATE TABLE "check_answers" (
        "id" uuid NOT NULL,
        "round_id" uuid NOT NULL,
        "check_id" character varying(64) NOT NULL,
        "answer" jsonb NOT NULL,
        "note" text,
        "device_time" TIMESTAMP WITH TIME ZONE NOT NULL,
        "received_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        CONSTRAINT "pk_check_answers" PRIMARY KEY ("id"),
        CONSTRAINT "fk_check_answers_round" FOREIGN KEY ("round_id") REFERENCES "rounds"("id") ON DELETE CASCADE
      )`);
    await q.query(`CREATE INDEX "ix_check_answers_round" ON "check_answers" ("round_id")`);

    for (const t of ['readings', 'check_answers']) {
      await q.query(
        `CREATE TRIGGER "tg_${t}_append_only" BEFORE UPDATE ON "${t}" FOR EACH ROW EXECUTE FUNCTION "refuse_update"()`,
      );
    }

    await q.query(`
      CREATE TABLE "photos" (
        "id" uuid NOT NULL,
        "round_id" uuid NOT NULL,
        "reading_id" uuid,
        "check_id" character varying(64),
        "sha256" character varying(64) NOT NULL,
        "mime" character varying(32) NOT NULL,
        "bytes" integer NOT NULL,
        "width" integer,
        "height" integer,
        "storage_key" character varying(200),
        "thumb_key" character varying(200),
        "status" "photo_status" NOT NULL DEFAULT 'pending',
        "received_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        "stored_at" TIMESTAMP WITH TIME ZONE,
        CONSTRAINT "pk_photos" PRIMARY KEY ("id"),
        CONSTRAINT "fk_photos_round" FOREIGN KEY ("round_id") REFERENCES "rounds"("id") ON DELETE CASCADE,
        CONSTRAINT "fk_photos_reading" FOREIGN KEY ("reading_id") REFERENCES "readings"("id") ON DELETE CASCADE
      )`);
    await q.query(`CREATE INDEX "ix_photos_round" ON "photos" ("round_id")`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE "photos"`);
    await q.query(`DROP TABLE "check_answers"`);
    await q.query(`DROP TABLE "readings"`);
    await q.query(`DROP TABLE "rounds"`);
    await q.query(`ALTER TABLE "routes" DROP CONSTRAINT "fk_routes_current_version"`);
    await q.query(`DROP TABLE "route_versions"`);
    await q.query(`DROP TABLE "routes"`);
    await q.query(`DROP TABLE "instruments"`);
    await q.query(`DROP TABLE "units"`);
    await q.query(`DROP TYPE "photo_status"`);
    await q.query(`DROP TYPE "round_status"`);
    await q.query(`DROP TYPE "instrument_status"`);
    await q.query(`DROP TYPE "pressure_reference"`);
    await q.query(`DROP TYPE "instrument_quantity"`);
    await q.query(`DROP FUNCTION "refuse_update"()`);
    await q.query(`DROP FUNCTION "sync_stamp"()`);
    await q.query(`DROP SEQUENCE "sync_seq"`);
  }
}
