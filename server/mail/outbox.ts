/**
 * The mail outbox: notices are written to mail_outbox in their own transaction (enqueueMail),
 * and a sender loop delivers them over SMTP (deliverDue / startMailSender). A failed send keeps
 * the message with its error, its attempt count and the time of the next attempt (exponential
 * backoff, capped); nothing is ever dropped, and nothing here touches the work order or the
 * analysis that caused the notice.
 *
 * Delivery is at least once: a row is claimed (attempts + 1, next attempt pushed a lease ahead,
 * FOR UPDATE SKIP LOCKED so several processes share the outbox), sent, then marked sent. A
 * process that dies between the send and the mark sends that one message again after the lease.
 */
import nodemailer, { type Transporter } from 'nodemailer';
import type { DataSource, EntityManager } from 'typeorm';
import type { Logger } from '../logger';

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  /** a second enqueue with the same key is ignored (one notice per work order, per shift digest…) */
  dedupeKey?: string | null;
  /** the site the notice is about (the dev mailbox shows it to that site's admins only); none: an account's own notice */
  siteId?: string | null;
}

export interface BackoffOptions {
  /** first retry delay, ms (default 30 s) */
  baseMs?: number;
  /** longest delay, ms (default 1 h) */
  maxMs?: number;
}

/** Delay before the next attempt after `attempts` failed ones: base·2^(attempts−1), capped. */
export function backoffMs(attempts: number, { baseMs = 30_000, maxMs = 3_600_000 }: BackoffOptions = {}): number {
  if (!Number.isInteger(attempts) || attempts < 1)
    throw new RangeError(`backoffMs: attempts must be a whole number ≥ 1, got ${String(attempts)}`);
  return Math.min(maxMs, baseMs * 2 ** Math.min(attempts - 1, 40));
}

const EMAIL_RE = /^[^\s@<>]+@[^\s@<>]+$/;

/**
 * Writes the messages to the outbox in one transaction of its own; returns how many were new
 * (a message whose dedupeKey is already there is skipped).
 */
export async function enqueueMail(ds: DataSource, messages: readonly OutgoingMail[]): Promise<number> {
  checkMessages(messages);
  if (messages.length === 0) return 0;
  return ds.transaction((em) => queueMail(em, messages));
}

function checkMessages(messages: readonly OutgoingMail[]): void {
  messages.forEach((m, i) => {
    if (!EMAIL_RE.test(m.to))
      throw new Error(`enqueueMail: messages[${i}].to must be an e-mail address, got "${m.to}"`);
    if (!m.subject.trim()) throw new Error(`enqueueMail: messages[${i}].subject must not be empty`);
  });
}

/** enqueueMail inside a transaction the caller holds: the notice commits (or not) with its cause. */
export async function queueMail(em: EntityManager, messages: readonly OutgoingMail[]): Promise<number> {
  checkMessages(messages);
  let n = 0;
  for (const m of messages) {
    const rows = (await em.query(
      `INSERT INTO "mail_outbox" ("to_address", "subject", "text", "dedupe_key", "site_id") VALUES ($1, $2, $3, $4, $5)
       ON CONFLICT ("dedupe_key") DO NOTHING RETURNING "id"`,
      [m.to, m.subject, m.text, m.dedupeKey ?? null, m.siteId ?? null],
    )) as { id: string }[];
    n += rows.length;
  }
  return n;
}

/** The Message-ID of an outbox row (RFC 5322 §3.6.4): the mail fake reads the row, and its site, back from it. */
export const OUTBOX_ID_DOMAIN = 'outbox.trueround.invalid';
export const outboxMessageId = (rowId: string) => `<${rowId}@${OUTBOX_ID_DOMAIN}>`;
/** The outbox row id a Message-ID names, or null when it is not one of ours. */
export function outboxIdOf(messageId: string | null): string | null {
  const m = /^<?([0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12})@outbox\.trueround\.invalid>?$/i.exec(
    (messageId ?? '').trim(),
  );
  return m ? m[1].toLowerCase() : null;
}

/** What the sender needs of a transport (nodemailer's Transporter has it). */
export interface MailTransport {
  sendMail(message: {
    from: string;
    to: string;
    subject: string;
    text: string;
    textEncoding: 'quoted-printable';
    messageId?: string;
  }): Promise<unknown>;
  close?(): void;
}

/** A nodemailer SMTP transport for SMTP_URL, with short timeouts (a dead server fails the attempt, it does not hang the loop). */
export function smtpTransport(url: string): MailTransport & Transporter {
  return nodemailer.createTransport(url, {
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 30_000,
  } as Parameters<typeof nodemailer.createTransport>[1]) as MailTransport & Transporter;
}

export interface DeliverOptions {
  from: string;
  logger?: Logger;
  /** the clock (tests move it) */
  now?: () => Date;
  /** most messages claimed per call, default 20 */
  batch?: number;
  backoff?: BackoffOptions;
  /** how long a claimed message waits before another sender may try it, ms (default 2 min) */
  leaseMs?: number;
}

export interface DeliverResult {
  sent: number;
  failed: number;
}

/** Sends the messages that are due now, once each; failures get their backoff. */
export async function deliverDue(ds: DataSource, transport: MailTransport, o: DeliverOptions): Promise<DeliverResult> {
  const now = (o.now ?? (() => new Date()))();
  const claimed = (await ds.query(
    `UPDATE "mail_outbox" SET "attempts" = "attempts" + 1, "next_attempt_at" = $2
      WHERE "id" IN (
        SELECT "id" FROM "mail_outbox"
         WHERE "sent_at" IS NULL AND "next_attempt_at" <= $1
         ORDER BY "next_attempt_at", "created_at"
         LIMIT $3
         FOR UPDATE SKIP LOCKED)
      RETURNING "id", "to_address", "subject", "text", "attempts"`,
    [now, new Date(now.getTime() + (o.leaseMs ?? 120_000)), o.batch ?? 20],
  )) as [{ id: string; to_address: string; subject: string; text: string; attempts: number }[], number];
  const rows = claimed[0];
  const out: DeliverResult = { sent: 0, failed: 0 };
  for (const r of rows) {
    try {
      await transport.sendMail({
        from: o.from,
        to: r.to_address,
        subject: r.subject,
        text: r.text,
        textEncoding: 'quoted-printable',
        messageId: outboxMessageId(r.id),
      });
      await ds.query(`UPDATE "mail_outbox" SET "sent_at" = $2, "last_error" = NULL WHERE "id" = $1`, [
        r.id,
        (o.now ?? (() => new Date()))(),
      ]);
      out.sent++;
    } catch (err) {
      const message = err instanceof Error ? err.message : String(err);
      const delay = backoffMs(r.attempts, o.backoff);
      await ds.query(`UPDATE "mail_outbox" SET "last_error" = $2, "next_attempt_at" = $3 WHERE "id" = $1`, [
        r.id,
        message.slice(0, 2000),
        new Date(now.getTime() + delay),
      ]);
      o.logger?.warn(
        { err, mailId: r.id, attempts: r.attempts, retryInMs: delay },
        'mail: send failed; kept in the outbox for a retry',
      );
      out.failed++;
    }
  }
  return out;
}

export interface MailSenderOptions extends DeliverOptions {
  dataSource: DataSource;
  /** SMTP_URL, or a transport (tests) */
  transport: MailTransport | string;
  /** time between rounds of the loop, ms */
  intervalMs: number;
  /** also run on every round of the loop (the shift digests); its failure is logged */
  onTick?: () => Promise<unknown>;
}

export interface MailSender {
  /** Delivers everything due now (repeating while full batches go out); resolves with the counts. */
  flush(): Promise<DeliverResult>;
  stop(): Promise<void>;
}

/** The sender loop: every intervalMs, onTick then deliverDue until nothing due is left. */
export function startMailSender(o: MailSenderOptions): MailSender {
  const transport = typeof o.transport === 'string' ? smtpTransport(o.transport) : o.transport;
  const batch = o.batch ?? 20;
  let running: Promise<DeliverResult> | null = null;
  let stopped = false;
  let timer: NodeJS.Timeout | null = null;

  const once = async (): Promise<DeliverResult> => {
    const total: DeliverResult = { sent: 0, failed: 0 };
    for (let i = 0; i < 50 && !stopped; i++) {
      const r = await deliverDue(o.dataSource, transport, { ...o, batch });
      total.sent += r.sent;
      total.failed += r.failed;
      if (r.sent + r.failed < batch) break;
    }
    return total;
  };
  const flush = (): Promise<DeliverResult> => {
    // one pass at a time; a flush during a pass waits for it and then runs its own
    const prev = running ?? Promise.resolve({ sent: 0, failed: 0 });
    const next: Promise<DeliverResult> = prev.catch(() => undefined).then(once);
    running = next;
    void next
      .finally(() => {
        if (running === next) running = null;
      })
      .catch(() => undefined);
    return next;
  };
  const schedule = () => {
    if (stopped) return;
    timer = setTimeout(() => {
      void (async () => {
        try {
          if (o.onTick) await o.onTick();
        } catch (err) {
          o.logger?.error({ err }, 'mail: digest check failed');
        }
        try {
          await flush();
        } catch (err) {
          o.logger?.error({ err }, 'mail: outbox pass failed');
        }
        schedule();
      })();
    }, o.intervalMs);
    timer.unref();
  };
  schedule();
  return {
    flush,
    stop: async () => {
      stopped = true;
      if (timer) clearTimeout(timer);
      if (running) await running.catch(() => undefined);
      transport.close?.();
    },
  };
}
