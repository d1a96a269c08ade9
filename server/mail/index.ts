/**
 * E-mail for the server process: startMail({ config, dataSource, logger }) starts what the config
 * asks for and returns the notifier to hand to createApp.
 *
 *  - SMTP_FAKE_PORT set: the local SMTP fake on 127.0.0.1 (./fake-smtp.ts), storing into mail_messages;
 *  - SMTP_URL, else the fake's URL: the sender loop (./outbox.ts) delivers mail_outbox every
 *    MAIL_SEND_INTERVAL_MS, and once a minute queues the digest of each site's last closed shift;
 *  - neither: notices are queued in mail_outbox and wait for an SMTP server to be configured.
 */
import type { DataSource } from 'typeorm';
import type { Config } from '../config';
import type { Logger } from '../logger';
import { startFakeSmtp, type FakeSmtp } from './fake-smtp';
import { makeMailNotifier, type MailNotifier } from './notifier';
import { startMailSender, type MailSender } from './outbox';

export { startFakeSmtp, isLoopback, type FakeSmtp, type FakeSmtpOptions } from './fake-smtp';
export {
  makeMailNotifier,
  sqlNotifierSource,
  HAZARD_CAUTION,
  workOrderPath,
  type MailNotifier,
  type NotifierSource,
} from './notifier';
export {
  enqueueMail,
  deliverDue,
  startMailSender,
  backoffMs,
  smtpTransport,
  type MailSender,
  type OutgoingMail,
} from './outbox';

/** How often the sender loop looks for a closed shift to digest, ms. */
export const DIGEST_CHECK_MS = 60_000;

export interface MailRuntime {
  fake?: FakeSmtp;
  sender?: MailSender;
  notifier: MailNotifier;
  /** where mail goes; undefined: nowhere yet (it waits in the outbox) */
  smtpUrl?: string;
  stop(): Promise<void>;
}

export async function startMail({
  config,
  dataSource,
  logger,
}: {
  config: Config;
  dataSource: DataSource;
  logger: Logger;
}): Promise<MailRuntime> {
  const fake =
    config.SMTP_FAKE_PORT !== undefined
      ? await startFakeSmtp({ host: '127.0.0.1', port: config.SMTP_FAKE_PORT, dataSource, logger })
      : undefined;
  if (fake) logger.info({ url: fake.url }, 'mail fake listening (development only; see GET /api/dev/mailbox)');
  const smtpUrl = config.SMTP_URL ?? fake?.url;
  const notifier = makeMailNotifier({ dataSource, logger });
  let lastDigestCheck = 0;
  const sender = smtpUrl
    ? startMailSender({
        dataSource,
        transport: smtpUrl,
        from: config.MAIL_FROM,
        intervalMs: config.MAIL_SEND_INTERVAL_MS,
        logger,
        onTick: async () => {
          if (Date.now() - lastDigestCheck < DIGEST_CHECK_MS) return;
          lastDigestCheck = Date.now();
          await notifier.digestClosedShifts();
        },
      })
    : undefined;
  if (!smtpUrl) logger.warn('SMTP_URL is not set and no mail fake runs: notices wait in mail_outbox');
  let stopping: Promise<void> | undefined;
  return {
    fake,
    sender,
    notifier,
    smtpUrl,
    stop: () =>
      (stopping ??= (async () => {
        await sender?.stop();
        await fake?.stop();
      })()),
  };
}
