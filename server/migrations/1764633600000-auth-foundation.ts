import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Sites, users, memberships (role per site) and refresh tokens.
 * Hand-written; TypeORM's schema builder finds no difference between this and server/entities
 * (tests/api/migrations.test.ts holds it so).
 */
export class AuthFoundation1764633600000 implements MigrationInterface {
  name = 'AuthFoundation1764633600000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE "sites" (
        "id" uuid NOT NULL DEFAULT gen_random_uuid(),
        "name" character varying(200) NOT NULL,
        "slug" character varying(64) NOT NULL,
        "timezone" character varying(64) NOT NULL,
        "elevation_m" double precision NOT NULL,
        "created_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        CONSTRAINT "pk_sites" PRIMARY KEY ("id"),
        CONSTRAINT "uq_sites_slug" UNIQUE ("slug")
      )`);
    await q.query(`
      CREATE TABLE "users" (
        "id" uuid NOT NULL DEFAULT gen_random_uuid(),
        "email" character varying(320) NOT NULL,
        "name" character varying(200) NOT NULL,
        "password_hash" character varying(255) NOT NULL,
        "created_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        "disabled" boolean NOT NULL DEFAULT false,
        CONSTRAINT "pk_users" PRIMARY KEY ("id"),
        CONSTRAINT "uq_users_email" UNIQUE ("email"),
        CONSTRAINT "ck_users_email_lower" CHECK ("email" = lower("email"))
      )`);
    await q.query(`CREATE TYPE "membership_role" AS ENUM ('technician', 'planner', 'engineer', 'admin')`);
    await q.query(`
      CREATE TABLE "memberships" (
        "id" uuid NOT NULL DEFAULT gen_random_uuid(),
        "user_id" uuid NOT NULL,
        "site_id" uuid NOT NULL,
        "role" "membership_role" NOT NULL,
        "created_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        CONSTRAINT "pk_memberships" PRIMARY KEY ("id"),
        CONSTRAINT "uq_memberships_user_site" UNIQUE ("user_id", "site_id"),
        CONSTRAINT "fk_memberships_user" FOREIGN KEY ("user_id") REFERENCES "users"("id") ON DELETE CASCADE,
        CONSTRAINT "fk_memberships_site" FOREIGN KEY ("site_id") REFERENCES "sites"("id") ON DELETE CASCADE
      )`);
    await q.query(`CREATE INDEX "ix_memberships_site" ON "memberships" ("site_id")`);
    await q.query(`
      CREATE TABLE "refresh_tokens" (
        "id" uuid NOT NULL DEFAULT gen_random_uuid(),
        "user_id" uuid NOT NULL,
        "token_hash" character varying(64) NOT NULL,
        "family_id" uuid NOT NULL,
        "expires_at" TIMESTAMP WITH TIME ZONE NOT NULL,
        "revoked_at" TIMESTAMP WITH TIME ZONE,
        "replaced_by" uuid,
        "created_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        CONSTRAINT "pk_refresh_tokens" PRIMARY KEY ("id"),
        CONSTRAINT "uq_refresh_tokens_hash" UNIQUE ("token_hash"),
        CONSTRAINT "fk_refresh_tokens_user" FOREIGN KEY ("user_id") REFERENCES "users"("id") ON DELETE CASCADE,
        CONSTRAINT "fk_refresh_tokens_replaced_by" FOREIGN KEY ("replaced_by") REFERENCES "refresh_tokens"("id") ON DELETE SET NULL
      )`);
    await q.query(`CREATE INDEX "ix_refresh_tokens_family" ON "refresh_tokens" ("family_id")`);
    await q.query(`CREATE INDEX "ix_refresh_tokens_user" ON "refresh_tokens" ("user_id")`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE "refresh_tokens"`);
    await q.query(`DROP TABLE "memberships"`);
    await q.query(`DROP TYPE "membership_role"`);
    await q.query(`DROP TABLE "users"`);
    await q.query(`DROP TABLE "sites"`);
  }
}
