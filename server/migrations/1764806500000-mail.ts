import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * E-mail: what the local SMTP fake received (mail_messages, for the dev mailbox) and the outbox
 * the notifier writes and the sender loop delivers with retry (mail_outbox). Hand-written; it
 * matches server/entities/mail.ts exactly.
 */
export class Mail1764806500000 implements MigrationInterface {
  name = 'Mail1764806500000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE "mail_messages" (
        "id" uuid NOT NULL DEFAULT gen_random_uuid(),
        "received_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        "from_address" text NOT NULL,
        "to_addresses" text array NOT NULL,
        "subject" text NOT NULL,
        "text" text NOT NULL,
        "raw_size" integer NOT NULL,
        CONSTRAINT "pk_mail_messages" PRIMARY KEY ("id")
      )`);
    await q.query(`CREATE INDEX "ix_mail_messages_received" ON "mail_messages" ("received_at")`);

    await q.query(`
      CREATE TABLE "mail_outbox" (
        "id" uuid NOT NULL DEFAULT gen_random_uuid(),
        "to_address" character varying(320) NOT NULL,
        "subject" text NOT NULL,
        "text" text NOT NULL,
        "dedupe_key" character varying(200),
        "attempts" integer NOT NULL DEFAULT 0,
        "next_attempt_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        "sent_at" TIMESTAMP WITH TIME ZONE,
        "last_error" text,
        "created_at" TIMESTAMP WITH TIME ZONE NOT NULL DEFAULT now(),
        CONSTRAINT "pk_mail_outbox" PRIMARY KEY ("id"),
        CONSTRAINT "uq_mail_outbox_dedupe" UNIQUE ("dedupe_key"),
        CONSTRAINT "ck_mail_outbox_attempts" CHECK ("attempts" >= 0)
      )`);
    await q.query(`CREATE INDEX "ix_mail_outbox_due" ON "mail_outbox" ("next_attempt_at") WHERE "sent_at" IS NULL`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE "mail_outbox"`);
    await q.query(`DROP TABLE "mail_messages"`);
  }
}
