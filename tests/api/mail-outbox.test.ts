/**
 * The mail outbox (server/mail/outbox.ts) on a real PostgreSQL with the real SMTP fake: a send
 * that fails keeps the message with its attempts, error and next attempt time (exponential
 * backoff: base·2^(n−1), common practice for retries); once the server is back the message is
 * delivered exactly once. The clock is passed in, so no test waits for a backoff.
 */
import { createServer } from 'node:net';
import type { AddressInfo } from 'node:net';
import { startFakeSmtp, type FakeSmtp } from '../../server/mail/fake-smtp';
import { backoffMs, deliverDue, enqueueMail, smtpTransport, startMailSender } from '../../server/mail/outbox';
import { createTestDatabase, type TestDb } from './helpers/db';

let db: TestDb;
beforeAll(async () => {
  db = await createTestDatabase({ seed: false });
});
afterAll(() => db?.drop());
beforeEach(async () => {
  await db.dataSource.query(`DELETE FROM "mail_outbox"`);
  await db.dataSource.query(`DELETE FROM "mail_messages"`);
});

/** A port nothing listens on right now (taken from the OS, then released). */
async function freePort(): Promise<number> {
  const s = createServer();
  await new Promise<void>((r) => s.listen(0, '127.0.0.1', () => r()));
  const port = (s.address() as AddressInfo).port;
  await new Promise<void>((r) => s.close(() => r()));
  return port;
}

interface OutboxRow {
  attempts: number;
  next_attempt_at: Date;
  sent_at: Date | null;
  last_error: string | null;
}
const outbox = async () =>
  (await db.dataSource.query(`SELECT * FROM "mail_outbox" ORDER BY "created_at"`)) as OutboxRow[];
const received = async () =>
  (await db.dataSource.query(`SELECT "to_addresses", "subject", "text" FROM "mail_messages"`)) as {
    to_addresses: string[];
    subject: string;
    text: string;
  }[];

test('backoff doubles from 30 s and stops at 1 h', () => {
  expect([1, 2, 3, 4, 5].map((n) => backoffMs(n))).toEqual([30_000, 60_000, 120_000, 240_000, 480_000]);
  expect(backoffMs(8)).toBe(3_600_000);
  expect(backoffMs(1000)).toBe(3_600_000);
  expect(() => backoffMs(0)).toThrow(/attempts must be a whole number ≥ 1, got 0/);
});

test('fake down: the message stays with attempts, error and next attempt; fake up: delivered once', async () => {
  const port = await freePort();
  const transport = smtpTransport(`smtp://127.0.0.1:${port}`);
  expect(
    await enqueueMail(db.dataSource, [
      { to: 'planner@fernhallow.example', subject: 'WO-0001 opened', text: 'Calibrate TI-301.' },
    ]),
  ).toBe(1);
  const t0 = new Date(Math.ceil(Date.now() / 1000) * 1000 + 1000);
  const at = (ms: number) => () => new Date(t0.getTime() + ms);

  // down
  expect(await deliverDue(db.dataSource, transport, { from: 'trueround@localhost', now: at(0) })).toEqual({
    sent: 0,
    failed: 1,
  });
  let [row] = await outbox();
  expect(row.attempts).toBe(1);
  expect(row.sent_at).toBeNull();
  expect(row.last_error).toMatch(/ECONNREFUSED|connect/i);
  expect(new Date(row.next_attempt_at).getTime()).toBe(t0.getTime() + 30_000);
  // not due yet: nothing is tried
  expect(await deliverDue(db.dataSource, transport, { from: 'trueround@localhost', now: at(29_000) })).toEqual({
    sent: 0,
    failed: 0,
  });
  // still down at the retry: the delay doubles
  expect(await deliverDue(db.dataSource, transport, { from: 'trueround@localhost', now: at(30_000) })).toEqual({
    sent: 0,
    failed: 1,
  });
  [row] = await outbox();
  expect(row.attempts).toBe(2);
  expect(new Date(row.next_attempt_at).getTime()).toBe(t0.getTime() + 30_000 + 60_000);

  // up on the same port
  const fake: FakeSmtp = await startFakeSmtp({ host: '127.0.0.1', port, dataSource: db.dataSource });
  try {
    expect(await deliverDue(db.dataSource, transport, { from: 'trueround@localhost', now: at(90_000) })).toEqual({
      sent: 1,
      failed: 0,
    });
    expect(
      await deliverDue(db.dataSource, transport, { from: 'trueround@localhost', now: at(10 * 3_600_000) }),
    ).toEqual({ sent: 0, failed: 0 });
    [row] = await outbox();
    expect(row.attempts).toBe(3);
    expect(row.sent_at).not.toBeNull();
    expect(row.last_error).toBeNull();
    expect(await received()).toEqual([
      { to_addresses: ['planner@fernhallow.example'], subject: 'WO-0001 opened', text: 'Calibrate TI-301.' },
    ]);
  } finally {
    transport.close();
    await fake.stop();
  }
});

test('a dedupe key makes the second enqueue a no-op; bad input is refused naming the field', async () => {
  const m = {
    to: 'engineer@fernhallow.example',
    subject: 'digest',
    text: '…',
    dedupeKey: 'digest|site|2025-12-04T06:00:00.000Z|user',
  };
  expect(await enqueueMail(db.dataSource, [m])).toBe(1);
  expect(await enqueueMail(db.dataSource, [m, { ...m, dedupeKey: null }, { ...m, dedupeKey: null }])).toBe(2);
  expect(await outbox()).toHaveLength(3);
  await expect(enqueueMail(db.dataSource, [{ to: 'not an address', subject: 's', text: 't' }])).rejects.toThrow(
    /messages\[0\]\.to must be an e-mail address, got "not an address"/,
  );
});

test('the sender loop delivers what is queued and a flush waits for it', async () => {
  const fake = await startFakeSmtp({ host: '127.0.0.1', port: 0, dataSource: db.dataSource });
  const ticks: number[] = [];
  const sender = startMailSender({
    dataSource: db.dataSource,
    transport: fake.url,
    from: 'Trueround <trueround@localhost>',
    intervalMs: 50,
    batch: 2,
    onTick: async () => void ticks.push(Date.now()),
  });
  try {
    await enqueueMail(
      db.dataSource,
      ['a', 'b', 'c', 'd', 'e'].map((x) => ({ to: `${x}@example.test`, subject: `to ${x}`, text: x })),
    );
    // two passes at once: each message still goes once (claims are exclusive)
    const [r1, r2] = await Promise.all([sender.flush(), sender.flush()]);
    expect(r1.sent + r2.sent).toBe(5);
    expect((await received()).map((m) => m.subject).sort()).toEqual(['to a', 'to b', 'to c', 'to d', 'to e']);
    await new Promise((r) => setTimeout(r, 200));
    expect(ticks.length).toBeGreaterThanOrEqual(1);
    expect(await received()).toHaveLength(5);
  } finally {
    await sender.stop();
    await fake.stop();
  }
});
