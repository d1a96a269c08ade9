import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Account lockout after repeated failed sign-ins (server/auth/lockout.ts): the running count of
 * failures, when that count started, and until when the account is locked. Hand-written; it
 * matches server/entities/user.ts exactly.
 */
export class SignInLockout1764892800000 implements MigrationInterface {
  name = 'SignInLockout1764892800000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      ALTER TABLE "users"
        ADD "failed_sign_ins" integer NOT NULL DEFAULT 0,
        ADD "failed_sign_ins_since" TIMESTAMP WITH TIME ZONE,
        ADD "locked_until" TIMESTAMP WITH TIME ZONE,
        ADD CONSTRAINT "ck_users_failed_sign_ins" CHECK ("failed_sign_ins" >= 0)`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`
      ALTER TABLE "users"
        DROP CONSTRAINT "ck_users_failed_sign_ins",
        DROP COLUMN "locked_until",
        DROP COLUMN "failed_sign_ins_since",
        DROP COLUMN "failed_sign_ins"`);
  }
}
