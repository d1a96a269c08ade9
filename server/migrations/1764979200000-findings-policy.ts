import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * The statistical policy of findings (issue 14): a work-order kind for instruments the balances
 * cannot tell apart ('check-group', one order naming them all), and severity turned to the
 * direction of priority (1 urgent … 3 note; it was 3 urgent … 1 note) for findings already stored,
 * and each analysed reading's evidence statistic u (server/analysis/evidence.ts; null on rows
 * stored before, which the evidence then skips).
 * Hand-written. PostgreSQL cannot drop an enum value: down() leaves 'check-group' in the type.
 */
export class FindingsPolicy1764979200000 implements MigrationInterface {
  name = 'FindingsPolicy1764979200000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TYPE "work_order_kind" ADD VALUE IF NOT EXISTS 'check-group'`);
    await q.query(`UPDATE "findings" SET "severity" = 4 - "severity"`);
    await q.query(`ALTER TABLE "analysis_instruments" ADD "u" double precision`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE "analysis_instruments" DROP COLUMN "u"`);
    await q.query(`UPDATE "findings" SET "severity" = 4 - "severity"`);
  }
}
