import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Who recorded a reading, and which site a mail belongs to (issue "tighter guards"):
 *  - readings.recorded_by: the user whose push stored the reading (the round's technician, or a
 *    site admin acting on the round); NULL on readings stored before it was kept (their round's
 *    technician). Readings are append-only, so old rows are not rewritten.
 *  - mail_outbox.site_id, mail_messages.site_id: the site a notice is about (NULL: about no site,
 *    such as an account lock notice); the dev mailbox shows an admin only their site's mail.
 *  - memberships.display_name: the name the inviting admin typed, shown in the site's lists
 *    instead of the account's own name (which another site may have set).
 *  - ix_refresh_tokens_expires: the pruning job's look-up.
 * Hand-written; it matches server/entities exactly.
 */
export class AuthorsAndMailSites1765000000000 implements MigrationInterface {
  name = 'AuthorsAndMailSites1765000000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE "readings" ADD "recorded_by" uuid`);
    await q.query(
      `ALTER TABLE "readings" ADD CONSTRAINT "fk_readings_recorded_by" FOREIGN KEY ("recorded_by") REFERENCES "users"("id")`,
    );
    await q.query(`ALTER TABLE "mail_outbox" ADD "site_id" uuid`);
    await q.query(
      `ALTER TABLE "mail_outbox" ADD CONSTRAINT "fk_mail_outbox_site" FOREIGN KEY ("site_id") REFERENCES "sites"("id") ON DELETE SET NULL`,
    );
    await q.query(`ALTER TABLE "mail_messages" ADD "site_id" uuid`);
    await q.query(
      `ALTER TABLE "mail_messages" ADD CONSTRAINT "fk_mail_messages_site" FOREIGN KEY ("site_id") REFERENCES "sites"("id") ON DELETE SET NULL`,
    );
    await q.query(`CREATE INDEX "ix_mail_messages_site_received" ON "mail_messages" ("site_id", "received_at")`);
    await q.query(`ALTER TABLE "memberships" ADD "display_name" character varying(200)`);
    await q.query(`CREATE INDEX "ix_refresh_tokens_expires" ON "refresh_tokens" ("expires_at")`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP INDEX "ix_refresh_tokens_expires"`);
    await q.query(`ALTER TABLE "memberships" DROP COLUMN "display_name"`);
    await q.query(`DROP INDEX "ix_mail_messages_site_received"`);
    await q.query(`ALTER TABLE "mail_messages" DROP CONSTRAINT "fk_mail_messages_site"`);
    await q.query(`ALTER TABLE "mail_messages" DROP COLUMN "site_id"`);
    await q.query(`ALTER TABLE "mail_outbox" DROP CONSTRAINT "fk_mail_outbox_site"`);
    await q.query(`ALTER TABLE "mail_outbox" DROP COLUMN "site_id"`);
    await q.query(`ALTER TABLE "readings" DROP CONSTRAINT "fk_readings_recorded_by"`);
    await q.query(`ALTER TABLE "readings" DROP COLUMN "recorded_by"`);
  }
}
