/**
 * Fault: the SMTP server is down (nothing listens on SMTP_URL's port: the connection is refused).
 * A round with a thermometer 10σ off (a gross error by the VDI 2048 part 1 measurement test, the
 * Fernhallow design point of shared/cycle) is analysed: the work order is opened all the same, its
 * notices wait in mail_outbox with their attempts counted and the refusal as last error (the
 * outbox is written in its own transaction after the analysis commits: server/mail/outbox.ts).
 * When the SMTP fake comes up on that port, every notice is delivered exactly once.
 */
import { startFakeSmtp, type FakeSmtp } from '../../server/mail/fake-smtp';
import { makeMailNotifier } from '../../server/mail/notifier';
import { startMailSender, type MailSender } from '../../server/mail/outbox';
import { runAnalysisJob } from '../../server/analysis/job';
import { makeWorld, pushRound, until, type World } from './analysis-helpers';
import { memoryLogger } from './helpers/app';
import { freePort } from './fault-helpers';

jest.setTimeout(60_000);

let w: World;
let sender: MailSender | null = null;
let fake: FakeSmtp | null = null;
beforeAll(async () => {
  w = await makeWorld();
});
afterAll(async () => {
  await sender?.stop();
  await fake?.stop();
  await w?.db.drop();
});

interface OutboxRow {
  id: string;
  to_address: string;
  subject: string;
  attempts: number;
  sent_at: Date | null;
  last_error: string | null;
}
const outbox = async () =>
  (await w.db.dataSource.query(
    `SELECT id, to_address, subject, attempts, sent_at, last_error FROM mail_outbox ORDER BY created_at, id`,
  )) as OutboxRow[];

test('SMTP down: the work order opens, notices stay pending with attempts counted; once SMTP is back each is delivered once', async () => {
  const log = memoryLogger('warn');
  const notifier = makeMailNotifier({ dataSource: w.db.dataSource, logger: log.logger });
  const port = await freePort(); // nothing listens here yet
  sender = startMailSender({
    dataSource: w.db.dataSource,
    transport: `smtp://127.0.0.1:${port}`,
    from: 'Trueround <trueround@localhost>',
    intervalMs: 100,
    backoff: { baseMs: 200, maxMs: 400 },
    logger: log.logger,
  });

  const r = await pushRound(w, { bias: { 'TI-301': 10 } });
  const out = await runAnalysisJob({ dataSource: w.db.dataSource, logger: log.logger, notify: notifier }, r.roundId);
  expect(out.status).toBe('stored');
  const orders = (await w.db.dataSource.query(
    `SELECT id, status::text AS status FROM work_orders WHERE instrument_id = $1`,
    [w.inst['TI-301']],
  )) as {
    id: string;
    status: string;
  }[];
  expect(orders).toHaveLength(1);

  // the notices are queued and tried, and refused, several times
  await until('notices tried at least twice', async () => {
    const rows = await outbox();
    return rows.length > 0 && rows.every((m) => m.attempts >= 2);
  });
  const pending = await outbox();
  for (const m of pending) {
    expect(m.sent_at).toBeNull();
    expect(m.last_error).toMatch(/ECONNREFUSED|connect/i);
  }
  expect(pending.some((m) => m.subject.includes('TI-301'))).toBe(true);
  expect(log.lines.join('')).toMatch(/kept in the outbox for a retry/);
  // the work order is untouched by the mail failure
  expect(
    (await w.db.dataSource.query(`SELECT status::text AS status FROM work_orders WHERE id = $1`, [orders[0].id]))[0]
      .status,
  ).toBe(orders[0].status);

  // SMTP back on the same port: everything goes out, once
  fake = await startFakeSmtp({ host: '127.0.0.1', port, dataSource: w.db.dataSource });
  await until('every notice delivered', async () => (await outbox()).every((m) => m.sent_at !== null), 20_000);
  await new Promise((t) => setTimeout(t, 1000)); // a few more sender passes: nothing is sent again
  const sent = await outbox();
  expect(sent.map((m) => m.id)).toEqual(pending.map((m) => m.id));
  const received = (await w.db.dataSource.query(`SELECT to_addresses, subject FROM mail_messages`)) as {
    to_addresses: string[];
    subject: string;
  }[];
  expect(received).toHaveLength(sent.length);
  expect(fake.received()).toBe(sent.length);
  const key = (to: string, subject: string) => `${to}\n${subject}`;
  expect(received.map((m) => key(m.to_addresses.join(','), m.subject)).sort()).toEqual(
    sent.map((m) => key(m.to_address, m.subject)).sort(),
  );
  expect(
    (
      await w.db.dataSource.query(`SELECT count(*)::int AS n FROM work_orders WHERE instrument_id = $1`, [
        w.inst['TI-301'],
      ])
    )[0].n,
  ).toBe(1);
});
