/**
 * The e-mail notifier (server/mail/notifier.ts) on a real PostgreSQL: who gets which message, in
 * what words, once; and end to end — rounds pushed and analysed by the analysis job, the work
 * orders it opens, the notices in the outbox, delivered by the sender through the SMTP fake.
 * Shifts: 06:00, 14:00 and 22:00 site-local (common practice for three-shift plants).
 */
import type { DataSource } from 'typeorm';
import { runAnalysisJob } from '../../server/analysis/job';
import { makeLogger } from '../../server/logger';
import { startFakeSmtp } from '../../server/mail/fake-smtp';
import {
  HAZARD_CAUTION,
  makeMailNotifier,
  sqlNotifierSource,
  type DigestFinding,
  type NotifierSource,
} from '../../server/mail/notifier';
import { deliverDue, smtpTransport } from '../../server/mail/outbox';
import { localParts, shiftAt, zonedTime } from '../../server/mail/shifts';
import { DEFAULT_FAULTS } from '../../server/seed/history-generator';
import { seedHistory } from '../../server/seed/history';
import { createTestDatabase, type TestDb } from './helpers/db';

let db: TestDb;
let ds: DataSource;
let fern: { id: string; unitId: string; instrumentId: string };
let brack: { id: string };
const userIds: Record<string, string> = {};

beforeAll(async () => {
  db = await createTestDatabase();
  ds = db.dataSource;
  const [f] = (await ds.query(
    `SELECT s."id", u."id" AS unit_id, i."id" AS instrument_id FROM "sites" s JOIN "units" u ON u."site_id" = s."id"
       JOIN "instruments" i ON i."unit_id" = u."id" AND i."tag" = 'TI-301' WHERE s."slug" = 'fernhallow'`,
  )) as { id: string; unit_id: string; instrument_id: string }[];
  fern = { id: f.id, unitId: f.unit_id, instrumentId: f.instrument_id };
  [brack] = (await ds.query(`SELECT "id" FROM "sites" WHERE "slug" = 'brackenmoor'`)) as { id: string }[];
  // a second planner at Fernhallow, and a disabled one
  for (const [email, disabled] of [
    ['planner2@fernhallow.example', false],
    ['former.planner@fernhallow.example', true],
  ] as const) {
    const [u] = (await ds.query(
      `INSERT INTO "users" ("email", "name", "password_hash", "disabled") VALUES ($1, $2, 'x', $3) RETURNING "id"`,
      [email, email.split('@')[0], disabled],
    )) as { id: string }[];
    await ds.query(`INSERT INTO "memberships" ("user_id", "site_id", "role") VALUES ($1, $2, 'planner')`, [
      u.id,
      fern.id,
    ]);
  }
  for (const r of (await ds.query(`SELECT "id", "email" FROM "users"`)) as { id: string; email: string }[])
    userIds[r.email] = r.id;
});
afterAll(() => db?.drop());
beforeEach(async () => {
  await ds.query(`DELETE FROM "mail_outbox"`);
});

const outbox = async () =>
  (await ds.query(
    `SELECT "to_address", "subject", "text", "dedupe_key" FROM "mail_outbox" ORDER BY "to_address", "created_at"`,
  )) as {
    to_address: string;
    subject: string;
    text: string;
    dedupe_key: string | null;
  }[];

let woNumber = 100;
/** A work order row as the work-order code writes it (one open order per instrument and kind: closed afterwards). */
async function workOrder(
  priority: number,
  title = 'Calibrate TI-301 (Deaerator outlet temperature): saturation mismatch',
): Promise<string> {
  const n = ++woNumber;
  const [w] = (await ds.query(
    `INSERT INTO "work_orders" ("site_id", "unit_id", "number", "code", "kind", "priority", "title", "instrument_id", "instrument_tag")
     VALUES ($1, $2, $3, $4, 'calibrate', $5, $6, $7, 'TI-301') RETURNING "id"`,
    [fern.id, fern.unitId, n, `WO-${String(n).padStart(4, '0')}`, priority, title, fern.instrumentId],
  )) as { id: string }[];
  return w.id;
}
afterEach(async () => {
  await ds.query(
    `UPDATE "work_orders" SET "status" = 'done', "closed_at" = now() WHERE "number" > 100 AND "status" <> 'done'`,
  );
});

describe('work orders', () => {
  test('priority 1 opened: each active Fernhallow planner gets one message, in plain words, once', async () => {
    const id = await workOrder(1);
    const notifier = makeMailNotifier({ dataSource: ds });
    await notifier.workOrderOpened(id);
    await notifier.workOrderOpened(id); // a repeated call sends nothing twice
    const mails = await outbox();
    expect(mails.map((m) => m.to_address)).toEqual(['planner2@fernhallow.example', 'planner@fernhallow.example']);
    const m = mails.find((x) => x.to_address === 'planner@fernhallow.example')!;
    expect(m.subject).toBe(
      `[Trueround] Priority 1 work order WO-0${woNumber} opened: Calibrate TI-301 (Deaerator outlet temperature): saturation mismatch`,
    );
    expect(m.text).toContain('Hello Morgan Tilly,');
    expect(m.text).toContain(`Work order: WO-0${woNumber}\n`);
    expect(m.text).toContain('Title: Calibrate TI-301 (Deaerator outlet temperature): saturation mismatch\n');
    expect(m.text).toContain('Instrument: TI-301\n');
    expect(m.text).toContain('Priority: 1 (urgent)\n');
    expect(m.text).toContain(`Open it: /plan/work-orders/${id}\n`);
    expect(m.text).toContain(HAZARD_CAUTION);
    expect(HAZARD_CAUTION).toBe(
      "Work on pressurised or hot equipment only under your site's permit and isolation procedures.",
    );
    expect(m.text).toContain('you are a planner on Fernhallow Works');
  });

  test('a reopened order tells the planners again; priority 2 tells nobody', async () => {
    const id = await workOrder(1);
    const notifier = makeMailNotifier({ dataSource: ds });
    await notifier.workOrderOpened(id);
    await ds.query(`UPDATE "work_orders" SET "reopen_count" = 1 WHERE "id" = $1`, [id]);
    await notifier.workOrderOpened(id);
    expect((await outbox()).map((m) => m.subject.includes('reopened'))).toEqual([false, true, false, true]);
    await ds.query(`DELETE FROM "mail_outbox"`);
    await ds.query(`UPDATE "work_orders" SET "status" = 'done' WHERE "id" = $1`, [id]);
    await notifier.workOrderOpened(await workOrder(2));
    expect(await outbox()).toEqual([]);
  });

  test('assigned: the assignee gets one message; someone who is not a member is refused', async () => {
    const id = await workOrder(2, 'Repair PI-402 (Condenser absolute pressure): stuck value');
    const notifier = makeMailNotifier({ dataSource: ds, linkBase: 'https://trueround.example/' });
    await notifier.assigned(id, userIds['tech@fernhallow.example']);
    const [m, ...rest] = await outbox();
    expect(rest).toEqual([]);
    expect(m.to_address).toBe('tech@fernhallow.example');
    expect(m.subject).toBe(
      `[Trueround] Work order WO-0${woNumber} assigned to you: Repair PI-402 (Condenser absolute pressure): stuck value`,
    );
    expect(m.text).toContain('Hello Robin Aske,');
    expect(m.text).toContain('Priority: 2\n');
    expect(m.text).toContain(`Open it: https://trueround.example/plan/work-orders/${id}\n`);
    expect(m.text).toContain(HAZARD_CAUTION);
    await expect(notifier.assigned(id, userIds['planner@brackenmoor.example'])).rejects.toThrow(
      /is not an active member of site/,
    );
    await expect(notifier.workOrderOpened('00000000-0000-4000-8000-000000000000')).rejects.toThrow(/no work order/);
  });
});

describe('shift digest (fixture findings)', () => {
  const tz = 'Europe/London';
  const morning = zonedTime(2026, 11, 30, 6, 0, tz);
  const findings: DigestFinding[] = [
    {
      roundId: 'r1',
      routeName: 'Boiler house',
      at: zonedTime(2026, 11, 30, 7, 10, tz),
      kind: 'saturation-mismatch',
      severity: 2,
      message: 'At the deaerator outlet TI-301 reads 148.9 °C …',
      instrumentTags: ['TI-301', 'PI-301'],
    },
    {
      roundId: 'r2',
      routeName: 'Condenser and cooling water',
      at: zonedTime(2026, 11, 30, 8, 30, tz),
      kind: 'gross-error',
      severity: 1,
      message: 'PI-402 reads 1.2 kPa below what the condenser balances allow.',
      instrumentTags: ['PI-402'],
    },
    {
      roundId: 'r3',
      routeName: 'Boiler house',
      at: zonedTime(2026, 11, 30, 9, 5, tz),
      kind: 'saturation-mismatch',
      severity: 2,
      message: 'At the deaerator outlet TI-301 reads 149.0 °C …',
      instrumentTags: ['PI-301', 'TI-301'],
    },
  ];
  const source = (): NotifierSource => ({
    ...sqlNotifierSource(ds),
    findings: async (_s, start) => (start.getTime() === morning.getTime() ? findings : []),
  });

  test("the site's engineers get one digest once the shift has closed, listing the findings most urgent first", async () => {
    const open = makeMailNotifier({ dataSource: ds, source: source(), now: () => zonedTime(2026, 11, 30, 13, 59, tz) });
    expect(await open.sendDigest(fern.id, morning)).toBe(0); // the shift is still running
    const closed = makeMailNotifier({
      dataSource: ds,
      source: source(),
      now: () => zonedTime(2026, 11, 30, 14, 0, tz),
    });
    expect(await closed.sendDigest(fern.id, morning)).toBe(1);
    expect(await closed.sendDigest(fern.id, morning)).toBe(0); // once
    expect(await closed.digestClosedShifts()).toBe(0); // the same shift, already sent
    const [m, ...rest] = await outbox();
    expect(rest).toEqual([]);
    expect(m.to_address).toBe('engineer@fernhallow.example');
    expect(m.subject).toBe('[Trueround] Fernhallow Works: 2 findings from the morning shift of 2026-11-30 (1 urgent)');
    expect(m.text).toContain(
      'The round analyses of the morning shift of 2026-11-30 (06:00–14:00 Europe/London) at Fernhallow Works found:',
    );
    const items = m.text.split('\n').filter((l) => l.startsWith('- '));
    expect(items).toEqual([
      '- [urgent] PI-402 reads 1.2 kPa below what the condenser balances allow. (Condenser and cooling water, 08:30)',
      '- [attend to] At the deaerator outlet TI-301 reads 148.9 °C … (Boiler house, 07:10; on 2 rounds)',
    ]);
    expect(m.text).toContain(HAZARD_CAUTION);
  });

  test('sendDigest needs a shift start; a shift without findings sends nothing', async () => {
    const n = makeMailNotifier({ dataSource: ds, source: source(), now: () => new Date('2026-12-31T00:00:00Z') });
    await expect(n.sendDigest(fern.id, zonedTime(2026, 11, 30, 7, 0, tz))).rejects.toThrow(
      /is not the start of a shift in Europe\/London/,
    );
    expect(await n.sendDigest(fern.id, zonedTime(2026, 11, 30, 14, 0, tz))).toBe(0);
    expect(await n.sendDigest(brack.id, zonedTime(2026, 11, 30, 6, 0, tz))).toBe(0);
  });
});

test('end to end: analysed rounds open priority-1 work orders, planners and engineers are told, the fake receives it all', async () => {
  // yesterday's shifts, PI-302 typed as bar(a) on every boiler-house round (a gross error at the deaerator: severity 1, urgent)
  const far = 10_000;
  const seeded = await seedHistory(ds, {
    days: 1,
    analyse: false,
    faults: {
      drift: { ...DEFAULT_FAULTS.drift, fromDay: far },
      stuck: { ...DEFAULT_FAULTS.stuck, fromDay: far },
      readAsAbsolute: { tag: 'PI-302', fromDay: 0, untilDay: 1, everyNthRound: 1 },
      fouling: { ...DEFAULT_FAULTS.fouling, fromDay: far },
    },
  });
  expect(seeded.rounds).toBeGreaterThanOrEqual(6);
  const notify = makeMailNotifier({ dataSource: ds });
  const rounds = (await ds.query(`SELECT "id" FROM "rounds" ORDER BY "server_seq"`)) as { id: string }[];
  const logger = makeLogger({ LOG_LEVEL: 'silent' });
  for (const r of rounds) await runAnalysisJob({ dataSource: ds, logger, notify }, r.id);

  const p1 = (await ds.query(
    `SELECT "id", "code" FROM "work_orders" WHERE "site_id" = $1 AND "priority" = 1 AND "number" < 100`,
    [fern.id],
  )) as {
    id: string;
    code: string;
  }[];
  expect(p1.length).toBeGreaterThanOrEqual(1);
  const mails = await outbox();
  for (const w of p1) {
    const to = mails.filter((m) => m.subject.includes(` ${w.code} opened`)).map((m) => m.to_address);
    expect(to).toEqual(['planner2@fernhallow.example', 'planner@fernhallow.example']);
  }
  // one digest per closed shift of yesterday for the engineer (morning and afternoon have surely closed)
  const tz = 'Europe/London';
  const today = localParts(new Date(), tz);
  const digests = mails.filter((m) => m.dedupe_key?.startsWith('digest|'));
  expect(digests.every((m) => m.to_address === 'engineer@fernhallow.example')).toBe(true);
  for (const h of [6, 14]) {
    const start = shiftAt(zonedTime(today.year, today.month, today.day - 1, h, 30, tz), tz).start;
    expect(digests.filter((m) => m.dedupe_key!.includes(start.toISOString()))).toHaveLength(1);
  }
  expect(digests[0].text).toMatch(/PI-302/);

  // nothing was sent yet (the sender does that), and a dead SMTP server leaves the work orders alone
  const dead = smtpTransport('smtp://127.0.0.1:1');
  expect((await deliverDue(ds, dead, { from: 'trueround@localhost', batch: 100 })).sent).toBe(0);
  dead.close();
  expect(
    (
      (await ds.query(`SELECT count(*)::int AS n FROM "work_orders" WHERE "priority" = 1 AND "number" < 100`)) as {
        n: number;
      }[]
    )[0].n,
  ).toBe(p1.length);
  // the fake up, due again: all delivered
  await ds.query(`UPDATE "mail_outbox" SET "next_attempt_at" = now()`);
  const fake = await startFakeSmtp({ host: '127.0.0.1', port: 0, dataSource: ds });
  const t = smtpTransport(fake.url);
  try {
    expect((await deliverDue(ds, t, { from: 'trueround@localhost', batch: 100 })).sent).toBe(mails.length);
    const got = (await ds.query(`SELECT "to_addresses", "subject" FROM "mail_messages"`)) as {
      to_addresses: string[];
      subject: string;
    }[];
    expect(got.map((g) => g.subject).sort()).toEqual(mails.map((m) => m.subject).sort());
  } finally {
    t.close();
    await fake.stop();
  }
});
