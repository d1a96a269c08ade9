import { EntitySchema } from 'typeorm';
import type { Site } from './site';

/**
 * A message the local SMTP fake received (server/mail/fake-smtp.ts), parsed: what the dev
 * mailbox (GET /api/dev/mailbox) lists. `to` holds the To and Cc addresses of the header (the
 * envelope's recipients when the header has none).
 */
export interface MailMessage {
  id: string;
  receivedAt: Date;
  from: string;
  to: string[];
  subject: string;
  /** the plain-text body, decoded */
  text: string;
  /** size of the message as received (headers and body), bytes */
  rawSize: number;
  /** the site the message is about (from the outbox row its Message-ID names); null: none known */
  siteId: string | null;
  site?: Site | null;
}

export const MailMessageEntity = new EntitySchema<MailMessage>({
  name: 'MailMessage',
  tableName: 'mail_messages',
  columns: {
    id: { type: 'uuid', primary: true, generated: 'uuid', primaryKeyConstraintName: 'pk_mail_messages' },
    receivedAt: { name: 'received_at', type: 'timestamptz', default: () => 'now()' },
    from: { name: 'from_address', type: 'text' },
    to: { name: 'to_addresses', type: 'text', array: true },
    subject: { type: 'text' },
    text: { type: 'text' },
    rawSize: { name: 'raw_size', type: 'int' },
    siteId: { name: 'site_id', type: 'uuid', nullable: true },
  },
  relations: {
    site: {
      type: 'many-to-one',
      target: 'Site',
      nullable: true,
      onDelete: 'SET NULL',
      joinColumn: { name: 'site_id', foreignKeyConstraintName: 'fk_mail_messages_site' },
    },
  },
  indices: [
    { name: 'ix_mail_messages_received', columns: ['receivedAt'] },
    { name: 'ix_mail_messages_site_received', columns: ['siteId', 'receivedAt'] },
  ],
});

/**
 * One e-mail waiting to go out, or gone (server/mail/outbox.ts). Written in its own transaction
 * by the notifier; the sender loop delivers it, and on failure keeps it with the error and the
 * next attempt's time (exponential backoff). `dedupeKey`, when set, makes a second enqueue of
 * the same notice (the same work order opened twice, the same shift's digest) a no-op.
 */
export interface MailOutbox {
  id: string;
  to: string;
  subject: string;
  text: string;
  dedupeKey: string | null;
  attempts: number;
  nextAttemptAt: Date;
  sentAt: Date | null;
  lastError: string | null;
  createdAt: Date;
  /** the site the notice is about; null: about no site (an account's own notice) */
  siteId: string | null;
  site?: Site | null;
}

export const MailOutboxEntity = new EntitySchema<MailOutbox>({
  name: 'MailOutbox',
  tableName: 'mail_outbox',
  columns: {
    id: { type: 'uuid', primary: true, generated: 'uuid', primaryKeyConstraintName: 'pk_mail_outbox' },
    to: { name: 'to_address', type: 'varchar', length: 320 },
    subject: { type: 'text' },
    text: { type: 'text' },
    dedupeKey: { name: 'dedupe_key', type: 'varchar', length: 200, nullable: true },
    attempts: { type: 'int', default: 0 },
    nextAttemptAt: { name: 'next_attempt_at', type: 'timestamptz', default: () => 'now()' },
    sentAt: { name: 'sent_at', type: 'timestamptz', nullable: true },
    lastError: { name: 'last_error', type: 'text', nullable: true },
    createdAt: { name: 'created_at', type: 'timestamptz', default: () => 'now()' },
    siteId: { name: 'site_id', type: 'uuid', nullable: true },
  },
  relations: {
    site: {
      type: 'many-to-one',
      target: 'Site',
      nullable: true,
      onDelete: 'SET NULL',
      joinColumn: { name: 'site_id', foreignKeyConstraintName: 'fk_mail_outbox_site' },
    },
  },
  uniques: [{ name: 'uq_mail_outbox_dedupe', columns: ['dedupeKey'] }],
  indices: [{ name: 'ix_mail_outbox_due', columns: ['nextAttemptAt'], where: '"sent_at" IS NULL' }],
  checks: [{ name: 'ck_mail_outbox_attempts', expression: `"attempts" >= 0` }],
});
