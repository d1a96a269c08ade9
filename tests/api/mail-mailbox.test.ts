/**
 * GET /api/dev/mailbox?siteId=: what the SMTP fake received about one site, newest first, for that
 * site's admins, and only where the fake is in use (SMTP_FAKE_PORT set); elsewhere the route does
 * not exist (404). A message's site comes from the outbox row its Message-ID names (RFC 5322
 * §3.6.4), as the sender loop writes it; mail about no site, or not from the outbox, is in no
 * site's mailbox.
 */
import { randomUUID } from 'node:crypto';
import type { Express } from 'express';
import nodemailer from 'nodemailer';
import request from 'supertest';
import { startFakeSmtp, type FakeSmtp } from '../../server/mail/fake-smtp';
import { deliverDue, enqueueMail, outboxMessageId, smtpTransport } from '../../server/mail/outbox';
import { start } from '../../server/main';
import { demoUser } from '../../server/seed/demo-users';
import { addMember, bearer, signIn, testApp, testConfig } from './helpers/app';
import { createTestDatabase, type TestDb } from './helpers/db';

let db: TestDb;
let fake: FakeSmtp;
let withFake: Express;
let withoutFake: Express;
const tokens: Record<string, string> = {};
const site: Record<'fern' | 'brack', string> = { fern: '', brack: '' };

const mailbox = (token: string, siteId: string, query = '') =>
  request(withFake).get(`/api/dev/mailbox?siteId=${siteId}${query}`).set(bearer(token));
const subjects = (res: request.Response) => (res.body.messages as { subject: string }[]).map((m) => m.subject);

beforeAll(async () => {
  db = await createTestDatabase();
  fake = await startFakeSmtp({ host: '127.0.0.1', port: 0, dataSource: db.dataSource });
  withFake = testApp(db.dataSource, db.url, { SMTP_FAKE_PORT: '0', SMTP_URL: fake.url });
  withoutFake = testApp(db.dataSource, db.url);
  for (const [key, role, s] of [
    ['admin', 'admin', 'fernhallow'],
    ['tech', 'technician', 'fernhallow'],
    ['brackPlanner', 'planner', 'brackenmoor'],
  ] as const) {
    tokens[key] = (await signIn(withFake, demoUser(role, s).email)).accessToken;
  }
  await addMember(db.dataSource, 'brackenmoor', 'admin@brackenmoor.example', 'Lee Harrow', 'admin');
  tokens.brackAdmin = (await signIn(withFake, 'admin@brackenmoor.example')).accessToken;
  for (const row of (await db.dataSource.query(`SELECT "id", "slug" FROM "sites"`)) as { id: string; slug: string }[]) {
    site[row.slug === 'fernhallow' ? 'fern' : 'brack'] = row.id;
  }
  // one at a time, so the received order is the queued order
  const send = async (to: string, subject: string, siteId: string | null) => {
    await enqueueMail(db.dataSource, [{ to, subject, text: `body of ${subject}`, siteId }]);
    const transport = smtpTransport(fake.url);
    // the sender's clock a second on: the row's next_attempt_at (PostgreSQL now(), µs) may fall after a JS Date of the same millisecond
    expect(
      await deliverDue(db.dataSource, transport, {
        from: 'trueround@localhost',
        now: () => new Date(Date.now() + 1000),
      }),
    ).toEqual({ sent: 1, failed: 0 });
    transport.close();
  };
  await send('person1@example.test', 'fern 1', site.fern);
  await send('planner@brackenmoor.example', 'brack 1', site.brack);
  await send('person2@example.test', 'fern 2', site.fern);
  await send('someone@example.test', 'about no site', null);
  await send('person3@example.test', 'fern 3', site.fern);
  // a message from outside the outbox, naming a Fernhallow-looking outbox id that does not exist
  const t = nodemailer.createTransport(fake.url);
  await t.sendMail({
    from: 'x@localhost',
    to: 'y@example.test',
    subject: 'not from the outbox',
    text: 'forged',
    messageId: outboxMessageId(randomUUID()),
  });
  t.close();
});
afterAll(async () => {
  await fake?.stop();
  await db?.drop();
});

test("an admin gets what the fake received about their site, newest first, and nothing of another site's or of none", async () => {
  const res = await mailbox(tokens.admin, site.fern);
  expect(res.status).toBe(200);
  expect(subjects(res)).toEqual(['fern 3', 'fern 2', 'fern 1']);
  const m = res.body.messages[0];
  expect(m).toMatchObject({ from: 'trueround@localhost', to: ['person3@example.test'], text: 'body of fern 3' });
  expect(m.rawSize).toBeGreaterThan(0);
  expect(Date.parse(m.receivedAt)).not.toBeNaN();
  expect(subjects(await mailbox(tokens.brackAdmin, site.brack))).toEqual(['brack 1']);
  const limited = await mailbox(tokens.admin, site.fern, '&limit=1');
  expect(subjects(limited)).toEqual(['fern 3']);
  const bad = await mailbox(tokens.admin, site.fern, '&limit=0');
  expect(bad.status).toBe(400);
  expect(bad.body.error.message).toMatch(/limit: Must be a whole number from 1 to 500/);
  const none = await request(withFake).get('/api/dev/mailbox').set(bearer(tokens.admin));
  expect(none.status).toBe(400);
  expect(none.body.error.details).toEqual([{ path: 'siteId', message: 'Required' }]);
  const stored = (await db.dataSource.query(
    `SELECT "subject", "site_id" FROM "mail_messages" ORDER BY "received_at"`,
  )) as { subject: string; site_id: string | null }[];
  expect(stored.filter((r) => r.site_id === null).map((r) => r.subject)).toEqual([
    'about no site',
    'not from the outbox',
  ]);
});

test("another site's mailbox answers like a site that does not exist: the same 404, byte for byte", async () => {
  const other = await mailbox(tokens.admin, site.brack);
  const unknown = await mailbox(tokens.admin, randomUUID());
  expect(other.status).toBe(404);
  expect(other.text).toBe(unknown.text);
  expect(other.body.error.message).toBe('Site not found');
});

test('a technician or a planner of the site gets 403; no token 401', async () => {
  for (const [key, s] of [
    ['tech', site.fern],
    ['brackPlanner', site.brack],
  ] as const) {
    const res = await mailbox(tokens[key], s);
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('forbidden');
  }
  expect((await request(withFake).get(`/api/dev/mailbox?siteId=${site.fern}`)).status).toBe(401);
});

test('without the fake in use the mailbox does not exist: 404 even for an admin', async () => {
  const res = await request(withoutFake).get('/api/dev/mailbox').set(bearer(tokens.admin));
  expect(res.status).toBe(404);
  expect(res.body.error.code).toBe('not_found');
  expect((await request(withoutFake).get('/api/dev/mailbox')).status).toBe(404);
});

test('start() with SMTP_FAKE_PORT runs the fake in-process: a queued notice reaches the mailbox through the sender loop', async () => {
  const running = await start(
    testConfig(db.url, { HOST: '127.0.0.1', PORT: '0', SMTP_FAKE_PORT: '0', MAIL_SEND_INTERVAL_MS: '100' }),
  );
  try {
    expect(running.mail.fake?.host).toBe('127.0.0.1');
    expect(running.mail.smtpUrl).toBe(running.mail.fake!.url);
    await enqueueMail(db.dataSource, [
      {
        to: 'planner@fernhallow.example',
        subject: 'through the loop',
        text: 'queued, sent, received',
        siteId: site.fern,
      },
    ]);
    let found: { subject: string; text: string } | undefined;
    for (let i = 0; i < 50 && !found; i++) {
      await new Promise((r) => setTimeout(r, 100));
      const res = await fetch(`${running.url}/api/dev/mailbox?siteId=${site.fern}`, { headers: bearer(tokens.admin) });
      expect(res.status).toBe(200);
      found = ((await res.json()) as { messages: { subject: string; text: string }[] }).messages.find(
        (m) => m.subject === 'through the loop',
      );
    }
    expect(found?.text).toBe('queued, sent, received');
  } finally {
    await running.stop();
  }
  expect(running.mail.fake!.received()).toBe(1);
});
