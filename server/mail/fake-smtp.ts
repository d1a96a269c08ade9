/**
 * A local SMTP server that accepts every message and keeps it in mail_messages, parsed (From,
 * To/Cc, Subject, plain text; ./parse.ts), for development and tests: the dev mailbox
 * (GET /api/dev/mailbox) lists what it received. Loopback only: it refuses to bind anything but
 * 127.0.0.0/8 or ::1, and drops a connection from anywhere else. No authentication, no TLS.
 *
 *   const fake = await startFakeSmtp({ host: '127.0.0.1', port: 0, dataSource });
 *   // nodemailer.createTransport(fake.url) … ; await fake.stop();
 */
import { isIP } from 'node:net';
import type { AddressInfo } from 'node:net';
import { SMTPServer, type SMTPServerDataStream, type SMTPServerSession } from 'smtp-server';
import type { DataSource } from 'typeorm';
import type { Logger } from '../logger';
import { outboxIdOf } from './outbox';
import { parseMessage } from './parse';

export interface FakeSmtpOptions {
  /** 127.0.0.1 (or another 127.x address, ::1, "localhost") */
  host: string;
  /** 0: any free port */
  port: number;
  dataSource: DataSource;
  logger?: Logger;
  /** largest message accepted, bytes; default 10 MiB */
  maxBytes?: number;
}

export interface FakeSmtp {
  host: string;
  port: number;
  /** smtp://host:port, for SMTP_URL or nodemailer.createTransport */
  url: string;
  /** messages stored since start */
  received(): number;
  stop(): Promise<void>;
}

export function isLoopback(host: string): boolean {
  const h = host
    .trim()
    .toLowerCase()
    .replace(/^\[|\]$/g, '');
  if (h === 'localhost' || h === '::1') return true;
  if (h.startsWith('::ffff:')) return isLoopback(h.slice(7));
  return isIP(h) === 4 && h.split('.')[0] === '127';
}

export async function startFakeSmtp(options: FakeSmtpOptions): Promise<FakeSmtp> {
  const { host, port, dataSource, logger } = options;
  if (typeof host !== 'string' || !isLoopback(host)) {
    throw new Error(
      `fake SMTP: host must be a loopback address (127.0.0.1, ::1 or localhost), got "${String(host)}": it accepts mail from anyone who can connect`,
    );
  }
  if (!Number.isInteger(port) || port < 0 || port > 65535)
    throw new Error(`fake SMTP: port must be a whole number from 0 to 65535, got ${String(port)}`);
  const maxBytes = options.maxBytes ?? 10 * 1024 * 1024;
  let count = 0;

  const server = new SMTPServer({
    secure: false,
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    disableReverseLookup: true,
    banner: 'Trueround mail fake (development only)',
    size: maxBytes,
    logger: false,
    // stop() waits this long for clients still connected, then closes them
    closeTimeout: 2000,
    onConnect(session: SMTPServerSession, callback: (err?: Error | null) => void) {
      if (!isLoopback(session.remoteAddress)) {
        const err = new Error('This mail fake takes connections from this machine only') as Error & {
          responseCode: number;
        };
        err.responseCode = 554;
        return callback(err);
      }
      callback();
    },
    onData(
      stream: SMTPServerDataStream,
      session: SMTPServerSession,
      callback: (err?: Error | null, message?: string) => void,
    ) {
      const chunks: Buffer[] = [];
      stream.on('data', (c: Buffer) => chunks.push(c));
      stream.on('error', (err: Error) => callback(err));
      stream.on('end', () => {
        if (stream.sizeExceeded) {
          const err = new Error(`Message larger than ${maxBytes} bytes`) as Error & { responseCode: number };
          err.responseCode = 552;
          return callback(err);
        }
        const raw = Buffer.concat(chunks);
        void (async () => {
          const parsed = parseMessage(raw);
          const envelopeTo = session.envelope.rcptTo.map((r) => r.address.toLowerCase());
          const envelopeFrom = session.envelope.mailFrom ? session.envelope.mailFrom.address : '';
          const to = [...parsed.to, ...parsed.cc];
          // the site comes from the outbox row the Message-ID names (server/mail/outbox.ts), never from the message's own words
          const rows = (await dataSource.query(
            `INSERT INTO "mail_messages" ("from_address", "to_addresses", "subject", "text", "raw_size", "site_id")
             VALUES ($1, $2, $3, $4, $5, (SELECT "site_id" FROM "mail_outbox" WHERE "id" = $6::uuid)) RETURNING "id"`,
            [
              parsed.from || envelopeFrom,
              to.length ? to : envelopeTo,
              parsed.subject,
              parsed.text,
              raw.length,
              outboxIdOf(parsed.messageId),
            ],
          )) as { id: string }[];
          count++;
          logger?.debug({ id: rows[0].id, to, subject: parsed.subject }, 'mail fake: message stored');
          return rows[0].id;
        })().then(
          (id) => callback(null, `Stored as ${id}`),
          (err: unknown) => {
            logger?.error({ err }, 'mail fake: could not store a message');
            const e = new Error('Could not store the message; try again later') as Error & { responseCode: number };
            e.responseCode = 451;
            callback(e);
          },
        );
      });
    },
  });
  server.on('error', (err) => logger?.warn({ err }, 'mail fake: server error'));

  await new Promise<void>((resolve, reject) => {
    const onError = (err: Error) => reject(new Error(`fake SMTP: cannot listen on ${host}:${port}: ${err.message}`));
    server.server.once('error', onError);
    server.listen(port, host, () => {
      server.server.off('error', onError);
      resolve();
    });
  });
  const address = server.server.address() as AddressInfo;
  const shownHost = address.address.includes(':') ? `[${address.address}]` : address.address;
  let stopped: Promise<void> | undefined;
  return {
    host: address.address,
    port: address.port,
    url: `smtp://${shownHost}:${address.port}`,
    received: () => count,
    stop: () =>
      (stopped ??= new Promise<void>((resolve) => {
        server.close(() => resolve());
      })),
  };
}
