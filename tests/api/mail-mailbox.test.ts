/**
 * GET /api/dev/mailbox: what the SMTP fake received, newest first, for site admins, and only
 * where the fake is in use (SMTP_FAKE_PORT set); elsewhere the route does not exist (404).
 */
import type { Express } from 'express';
import nodemailer from 'nodemailer';
import request from 'supertest';
import { startFakeSmtp, type FakeSmtp } from '../../server/mail/fake-smtp';
import { enqueueMail } from '../../server/mail/outbox';
import { start } from '../../server/main';
import { demoUser } from '../../server/seed/demo-users';
import { bearer, signIn, testApp, testConfig } from './helpers/app';
import { createTestDatabase, type TestDb } from './helpers/db';

let db: TestDb;
let fake: FakeSmtp;
let withFake: Express;
let withoutFake: Express;
const tokens: Record<string, string> = {};

beforeAll(async () => {
  db = await createTestDatabase();
  fake = await startFakeSmtp({ host: '127.0.0.1', port: 0, dataSource: db.dataSource });
  withFake = testApp(db.dataSource, db.url, { SMTP_FAKE_PORT: '0', SMTP_URL: fake.url });
  withoutFake = testApp(db.dataSource, db.url);
  for (const [key, role, site] of [
    ['admin', 'admin', 'fernhallow'],
    ['tech', 'technician', 'fernhallow'],
    ['brackPlanner', 'planner', 'brackenmoor'],
  ] as const) {
    tokens[key] = (await signIn(withFake, demoUser(role, site).email)).accessToken;
  }
  const t = nodemailer.createTransport(fake.url);
  for (const n of [1, 2, 3]) {
    await t.sendMail({ from: 'trueround@localhost', to: `person${n}@example.test`, subject: `message ${n}`, text: `body ${n}` });
  }
  t.close();
});
afterAll(async () => {
  await fake?.stop();
  await db?.drop();
});

test('an admin gets what the fake received, newest first', async () => {
  const res = await request(withFake).get('/api/dev/mailbox').set(bearer(tokens.admin));
  expect(res.status).toBe(200);
  expect(res.body.messages.map((m: { subject: string }) => m.subject)).toEqual(['message 3', 'message 2', 'message 1']);
  const m = res.body.messages[0];
  expect(m).toMatchObject({ from: 'trueround@localhost', to: ['person3@example.test'], text: 'body 3' });
  expect(m.rawSize).toBeGreaterThan(0);
  expect(Date.parse(m.receivedAt)).not.toBeNaN();
  const limited = await request(withFake).get('/api/dev/mailbox?limit=1').set(bearer(tokens.admin));
  expect(limited.body.messages.map((x: { subject: string }) => x.subject)).toEqual(['message 3']);
  const bad = await request(withFake).get('/api/dev/mailbox?limit=0').set(bearer(tokens.admin));
  expect(bad.status).toBe(400);
  expect(bad.body.error.message).toMatch(/limit: Must be a whole number from 1 to 500/);
});

test('a technician or a planner gets 403; no token 401', async () => {
  for (const key of ['tech', 'brackPlanner']) {
    const res = await request(withFake).get('/api/dev/mailbox').set(bearer(tokens[key]));
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('forbidden');
  }
  expect((await request(withFake).get('/api/dev/mailbox')).status).toBe(401);
});

test('without the fake in use the mailbox does not exist: 404 even for an admin', async () => {
  const res = await request(withoutFake).get('/api/dev/mailbox').set(bearer(tokens.admin));
  expect(res.status).toBe(404);
  expect(res.body.error.code).toBe('not_found');
  expect((await request(withoutFake).get('/api/dev/mailbox')).status).toBe(404);
});

test('start() with SMTP_FAKE_PORT runs the fake in-process: a queued notice reaches the mailbox through the sender loop', async () => {
  const running = await start(testConfig(db.url, { HOST: '127.0.0.1', PORT: '0', SMTP_FAKE_PORT: '0', MAIL_SEND_INTERVAL_MS: '100' }));
  try {
    expect(running.mail.fake?.host).toBe('127.0.0.1');
    expect(running.mail.smtpUrl).toBe(running.mail.fake!.url);
    await enqueueMail(db.dataSource, [{ to: 'planner@fernhallow.example', subject: 'through the loop', text: 'queued, sent, received' }]);
    let found: { subject: string; text: string } | undefined;
    for (let i = 0; i < 50 && !found; i++) {
      await new Promise((r) => setTimeout(r, 100));
      const res = await fetch(`${running.url}/api/dev/mailbox`, { headers: bearer(tokens.admin) });
      expect(res.status).toBe(200);
      found = ((await res.json()) as { messages: { subject: string; text: string }[] }).messages.find((m) => m.subject === 'through the loop');
    }
    expect(found?.text).toBe('queued, sent, received');
  } finally {
    await running.stop();
  }
  expect(running.mail.fake!.received()).toBe(1);
});
