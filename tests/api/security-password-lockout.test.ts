/**
 * Choosing a password and account lockout (server/auth/password-policy.ts, server/auth/lockout.ts).
 *
 * Password policy — NIST SP 800-63B §5.1.1.2 (Memorized Secret Verifiers): a minimum length
 * (NIST: 8; 12 here, the project's choice, common practice), characters counted as code points,
 * no composition rules, and a check against commonly used, expected or compromised values (the
 * service's name, the account's e-mail, repetitive or sequential characters, a short list of the
 * most common passwords). An invitee signs in with the one-time password of the invitation e-mail
 * and sets their own with POST /api/auth/password.
 *
 * Lockout — OWASP Authentication Cheat Sheet "Account Lockout", NIST SP 800-63B §5.2.2 (limit
 * consecutive failed attempts on one account): 10 failures within 15 minutes lock the account for
 * 15 minutes (the numbers are the project's choice, common practice), counted in the database,
 * whatever address they come from, separate from the per-address limiter; the answer is 429
 * (RFC 6585 §4) with Retry-After (RFC 9110 §10.2.3) and a message saying when to retry.
 * Only accounts made by this file are locked; the demo users are left alone.
 */
import type { Express } from 'express';
import request from 'supertest';
import { UserEntity } from '../../server/entities';
import { LOCKOUT_MS, LOCKOUT_THRESHOLD, LOCKOUT_WINDOW_MS } from '../../server/auth/lockout';
import { COMMON_PASSWORDS, PASSWORD_MIN, passwordProblem } from '../../server/auth/password-policy';
import { hashPassword } from '../../server/auth/passwords';
import { bearer, signIn, testApp } from './helpers/app';
import { createTestDatabase, type TestDb } from './helpers/db';

let db: TestDb;
let app: Express;
let fernId: string;

beforeAll(async () => {
  db = await createTestDatabase();
  // the per-address limiter far away, so only the account lockout acts; addresses from X-Forwarded-For
  app = testApp(db.dataSource, db.url, { SIGN_IN_RATE_LIMIT: '100000', TRUST_PROXY: '1' });
  [{ id: fernId }] = (await db.dataSource.query(`SELECT "id" FROM "sites" WHERE "slug" = 'fernhallow'`)) as { id: string }[];
});
afterAll(() => db?.drop());

const GOOD = 'correct horse battery staple';
let counter = 0;
async function newUser(password = GOOD): Promise<{ id: string; email: string }> {
  const email = `lock-${++counter}@fernhallow.example`;
  const u = await db.dataSource.getRepository(UserEntity).save({ email, name: `Lock ${counter}`, passwordHash: await hashPassword(password), disabled: false });
  return { id: u.id, email };
}
const attempt = (email: string, password: string, ip = '203.0.113.7') =>
  request(app).post('/api/auth/sign-in').set('X-Forwarded-For', ip).send({ email, password });
const row = (id: string) => db.dataSource.getRepository(UserEntity).findOneByOrFail({ id });

describe('password policy when an invitee sets their own password (POST /api/auth/password)', () => {
  let email: string;
  let oneTime: string;
  let session: { accessToken: string; refreshToken: string };

  beforeAll(async () => {
    const admin = (await signIn(app, 'admin@fernhallow.example')).accessToken;
    email = 'new.starter@fernhallow.example';
    const inv = await request(app).post(`/api/sites/${fernId}/invitations`).set(bearer(admin)).send({ email, name: 'New Starter', role: 'technician' });
    expect(inv.status).toBe(201);
    const [mail] = (await db.dataSource.query(`SELECT "text" FROM "mail_outbox" WHERE "to_address" = $1`, [email])) as { text: string }[];
    oneTime = /one-time password:\s+(\S+)/.exec(mail.text)![1];
    session = await signIn(app, email, oneTime);
  });

  const setPassword = (newPassword: string, currentPassword = oneTime) =>
    request(app).post('/api/auth/password').set(bearer(session.accessToken)).send({ currentPassword, newPassword });

  test(`fewer than ${PASSWORD_MIN} characters → 400 naming newPassword and the limit; code points are counted, not UTF-16 units`, async () => {
    const res = await setPassword('elevenchars');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation');
    expect(res.body.error.details).toEqual([{ path: 'newPassword', message: 'Must be at least 12 characters (got 11)' }]);
    expect(res.body.error.message).toContain('newPassword');
    // six emoji are 12 UTF-16 units but 6 characters
    const emoji = await setPassword('🔥🔥🔥🔥🔥🔥');
    expect(emoji.body.error.details[0].message).toBe('Must be at least 12 characters (got 6)');
  });

  test('the e-mail itself (any case), the service name, a common password, one repeated character, a plain run → 400 newPassword', async () => {
    const refused: [string, RegExp][] = [
      [email, /e-mail/],
      [email.toUpperCase(), /e-mail/],
      ['trueround-demo', /commonly used|name of the service/],
      ['Trueround2026!', /name of the service/],
      ['password1234', /commonly used/],
      ['Password1234', /commonly used/],
      ['123456789012', /commonly used|run/],
      ['qwertyuiop12', /commonly used/],
      ['zzzzzzzzzzzzzzzz', /repeated/],
      ['abcdefghijklmn', /run|commonly/],
      ['987654321098', /commonly|run/],
    ];
    for (const [pw, why] of refused) {
      const res = await setPassword(pw);
      expect({ pw, status: res.status, path: res.body.error?.details?.[0]?.path }).toEqual({ pw, status: 400, path: 'newPassword' });
      expect(res.body.error.details[0].message).toMatch(why);
    }
  });

  test('every listed common password is refused, and none of them is shorter than the minimum (or the list would be dead weight)', () => {
    for (const p of COMMON_PASSWORDS) {
      expect([...p].length).toBeGreaterThanOrEqual(PASSWORD_MIN);
      expect(passwordProblem(p, 'someone@example.test')).not.toBeNull();
    }
    // NIST SP 800-63B §5.1.1.2: no composition rules — a long passphrase of lower-case words passes
    expect(passwordProblem('correct horse battery staple', 'someone@example.test')).toBeNull();
    expect(passwordProblem('twelve chars', 'someone@example.test')).toBeNull();
  });

  test('a wrong current password → 403 naming currentPassword, nothing changed; a missing field → 400 naming it', async () => {
    const wrong = await setPassword(GOOD, 'not the one-time password');
    expect(wrong.status).toBe(403);
    expect(wrong.body.error.details).toEqual([{ path: 'currentPassword', message: 'Is wrong' }]);
    const missing = await request(app).post('/api/auth/password').set(bearer(session.accessToken)).send({ currentPassword: oneTime });
    expect(missing.status).toBe(400);
    expect(missing.body.error.details).toEqual([{ path: 'newPassword', message: 'Required' }]);
    const nul = await setPassword('long enough but \u0000 a NUL');
    expect(nul.status).toBe(400);
    expect(nul.body.error.details).toEqual([{ path: 'newPassword', message: 'must not contain a NUL character (U+0000)' }]);
    expect((await request(app).post('/api/auth/password').send({ currentPassword: oneTime, newPassword: GOOD })).status).toBe(401);
  });

  test('an acceptable password: 200 and a new pair; the one-time password and every earlier session stop working', async () => {
    const res = await setPassword(GOOD);
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ accessToken: expect.any(String), refreshToken: expect.any(String) });
    expect((await request(app).post('/api/auth/refresh').send({ refreshToken: session.refreshToken })).status).toBe(401);
    expect((await request(app).post('/api/auth/refresh').send({ refreshToken: res.body.refreshToken })).status).toBe(200);
    expect((await attempt(email, oneTime)).status).toBe(401);
    expect((await attempt(email, GOOD)).status).toBe(200);
  });
});

describe(`lockout: ${LOCKOUT_THRESHOLD} failures in ${LOCKOUT_WINDOW_MS / 60000} min lock one account for ${LOCKOUT_MS / 60000} min`, () => {
  test('nine failures are 401s; the tenth locks: 429 with Retry-After and when to retry; then even the right password → 429', async () => {
    const u = await newUser();
    for (let i = 1; i < LOCKOUT_THRESHOLD; i++) {
      const res = await attempt(u.email, `wrong-${i}`);
      expect(res.status).toBe(401);
      expect(res.body.error.code).toBe('bad_credentials');
    }
    expect((await row(u.id)).failedSignIns).toBe(LOCKOUT_THRESHOLD - 1);
    const tenth = await attempt(u.email, 'wrong-10');
    expect(tenth.status).toBe(429);
    const right = await attempt(u.email, GOOD);
    expect(right.status).toBe(429);
    for (const res of [tenth, right]) {
      expect(res.body.error.code).toBe('rate_limited');
      expect(res.body.error.message).toMatch(/locked after 10 failed sign-ins within 15 minutes; try again after \d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z \(in 1[45] minutes\)/);
      expect(Number(res.headers['retry-after'])).toBeGreaterThan(LOCKOUT_MS / 1000 - 60);
      expect(Number(res.headers['retry-after'])).toBeLessThanOrEqual(LOCKOUT_MS / 1000);
      expect(res.body.accessToken).toBeUndefined();
    }
    const { lockedUntil } = await row(u.id);
    expect(lockedUntil!.getTime() - Date.now()).toBeGreaterThan(LOCKOUT_MS - 60_000);
    expect(right.body.error.details.lockedUntil).toBe(lockedUntil!.toISOString());
  });

  test('counted per account, not per address: ten addresses one failure each lock it; another account is not touched', async () => {
    const u = await newUser();
    const other = await newUser();
    for (let i = 0; i < LOCKOUT_THRESHOLD; i++) await attempt(u.email, 'wrong', `198.51.100.${i + 1}`);
    expect((await attempt(u.email, GOOD, '192.0.2.200')).status).toBe(429);
    expect((await attempt(other.email, GOOD, '198.51.100.1')).status).toBe(200);
  });

  test('failures racing in parallel are all counted (row lock)', async () => {
    const u = await newUser();
    const results = await Promise.all(Array.from({ length: LOCKOUT_THRESHOLD + 2 }, (_, i) => attempt(u.email, `wrong-${i}`)));
    expect(results.filter((r) => r.status === 429).length).toBeGreaterThanOrEqual(1);
    expect((await attempt(u.email, GOOD)).status).toBe(429);
  });

  test('a successful sign-in resets the count: 9 failures, success, 9 more failures → still not locked', async () => {
    const u = await newUser();
    for (let i = 0; i < LOCKOUT_THRESHOLD - 1; i++) await attempt(u.email, 'wrong');
    expect((await attempt(u.email, GOOD)).status).toBe(200);
    expect(await row(u.id)).toMatchObject({ failedSignIns: 0, failedSignInsSince: null, lockedUntil: null });
    for (let i = 0; i < LOCKOUT_THRESHOLD - 1; i++) expect((await attempt(u.email, 'wrong')).status).toBe(401);
    expect((await attempt(u.email, GOOD)).status).toBe(200);
  });

  test('failures older than the window do not count: 9 failures 16 min ago, one now → count 1, not locked', async () => {
    const u = await newUser();
    for (let i = 0; i < LOCKOUT_THRESHOLD - 1; i++) await attempt(u.email, 'wrong');
    await db.dataSource.getRepository(UserEntity).update({ id: u.id }, { failedSignInsSince: new Date(Date.now() - LOCKOUT_WINDOW_MS - 60_000) });
    expect((await attempt(u.email, 'wrong')).status).toBe(401);
    expect((await row(u.id)).failedSignIns).toBe(1);
  });

  test('the lock ends after its time: the right password then signs in and clears the lock', async () => {
    const u = await newUser();
    for (let i = 0; i < LOCKOUT_THRESHOLD; i++) await attempt(u.email, 'wrong');
    expect((await attempt(u.email, GOOD)).status).toBe(429);
    // the clock moved past the lock's end
    await db.dataSource.getRepository(UserEntity).update({ id: u.id }, { lockedUntil: new Date(Date.now() - 1000) });
    expect((await attempt(u.email, GOOD)).status).toBe(200);
    expect(await row(u.id)).toMatchObject({ failedSignIns: 0, lockedUntil: null });
  });

  test('wrong current passwords on POST /api/auth/password count too (no guessing around the lock with a stolen token)', async () => {
    const u = await newUser();
    const s = await signIn(app, u.email, GOOD);
    const statuses: number[] = [];
    for (let i = 0; i < LOCKOUT_THRESHOLD; i++) {
      statuses.push((await request(app).post('/api/auth/password').set(bearer(s.accessToken)).send({ currentPassword: `guess-${i}`, newPassword: 'a brand new passphrase' })).status);
    }
    expect(statuses).toEqual([...Array(LOCKOUT_THRESHOLD - 1).fill(403), 429]);
    expect((await attempt(u.email, GOOD)).status).toBe(429);
  });

  test('the demo users are not locked by this file (their failures elsewhere stay below the threshold)', async () => {
    const rows = (await db.dataSource.query(`SELECT "email" FROM "users" WHERE "locked_until" IS NOT NULL AND "email" NOT LIKE 'lock-%'`)) as { email: string }[];
    expect(rows).toEqual([]);
  });
});
