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
 * whatever address they come from, separate from the per-address limiter. A locked account
 * answers exactly like a wrong password and like an address with no account (401
 * bad_credentials, the same bytes), so the lock says nothing about whether the account exists
 * (OWASP Authentication Cheat Sheet, "Authentication and Error Messages"); its owner is told by
 * e-mail when it locks.
 *
 * Strength: the e-mail's local part with digits, symbols or a common word around it is refused,
 * and zxcvbn-ts (Wheeler, "zxcvbn: Low-Budget Password Strength Estimation", USENIX Security
 * 2016) must estimate at least 10^8 guesses (its score 3).
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
  [{ id: fernId }] = (await db.dataSource.query(`SELECT "id" FROM "sites" WHERE "slug" = 'fernhallow'`)) as {
    id: string;
  }[];
});
afterAll(() => db?.drop());

const GOOD = 'correct horse battery staple';
let counter = 0;
async function newUser(password = GOOD): Promise<{ id: string; email: string }> {
  const email = `lock-${++counter}@fernhallow.example`;
  const u = await db.dataSource
    .getRepository(UserEntity)
    .save({ email, name: `Lock ${counter}`, passwordHash: await hashPassword(password), disabled: false });
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
    const inv = await request(app)
      .post(`/api/sites/${fernId}/invitations`)
      .set(bearer(admin))
      .send({ email, name: 'New Starter', role: 'technician' });
    expect(inv.status).toBe(201);
    const [mail] = (await db.dataSource.query(`SELECT "text" FROM "mail_outbox" WHERE "to_address" = $1`, [email])) as {
      text: string;
    }[];
    oneTime = /one-time password:\s+(\S+)/.exec(mail.text)![1];
    session = await signIn(app, email, oneTime);
  });

  const setPassword = (newPassword: string, currentPassword = oneTime) =>
    request(app).post('/api/auth/password').set(bearer(session.accessToken)).send({ currentPassword, newPassword });

  test(`fewer than ${PASSWORD_MIN} characters → 400 naming newPassword and the limit; code points are counted, not UTF-16 units`, async () => {
    const res = await setPassword('elevenchars');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation');
    expect(res.body.error.details).toEqual([
      { path: 'newPassword', message: 'Must be at least 12 characters (got 11)' },
    ]);
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
      // the e-mail's local part ("new.starter") with a year, symbols or a common word around it
      ['new.starter2025', /name of your e-mail address/],
      ['New.Starter2026!', /name of your e-mail address/],
      ['2025newstarter!!', /name of your e-mail address/],
      ['pass new starter 99', /name of your e-mail address/],
      // no e-mail in it, but a strength estimate puts it under 10^8 guesses
      ['monkeymonkey12', /too easy to guess/],
      ['dragon12345678', /too easy to guess/],
      // the site's own name from the e-mail's domain, with a year
      ['Fernhallow2026', /too easy to guess/],
    ];
    for (const [pw, why] of refused) {
      const res = await setPassword(pw);
      expect({ pw, status: res.status, path: res.body.error?.details?.[0]?.path }).toEqual({
        pw,
        status: 400,
        path: 'newPassword',
      });
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
    expect(passwordProblem('kestrel lantern oatmeal', 'someone@example.test')).toBeNull();
    // the local part inside other words is not "built on the e-mail"
    expect(passwordProblem('kim.ward keeps bees at dusk', 'kim.ward@example.test')).toBeNull();
    expect(passwordProblem('kim.ward2025', 'kim.ward@example.test')).toMatch(/name of your e-mail address/);
  });

  test('a wrong current password → 403 naming currentPassword, nothing changed; a missing field → 400 naming it', async () => {
    const wrong = await setPassword(GOOD, 'not the one-time password');
    expect(wrong.status).toBe(403);
    expect(wrong.body.error.details).toEqual([{ path: 'currentPassword', message: 'Is wrong' }]);
    const missing = await request(app)
      .post('/api/auth/password')
      .set(bearer(session.accessToken))
      .send({ currentPassword: oneTime });
    expect(missing.status).toBe(400);
    expect(missing.body.error.details).toEqual([{ path: 'newPassword', message: 'Required' }]);
    const nul = await setPassword('long enough but \u0000 a NUL');
    expect(nul.status).toBe(400);
    expect(nul.body.error.details).toEqual([
      { path: 'newPassword', message: 'must not contain a NUL character (U+0000)' },
    ]);
    expect(
      (await request(app).post('/api/auth/password').send({ currentPassword: oneTime, newPassword: GOOD })).status,
    ).toBe(401);
  });

  test('an acceptable password: 200 and a new pair; the one-time password and every earlier session stop working', async () => {
    const res = await setPassword(GOOD);
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ accessToken: expect.any(String), refreshToken: expect.any(String) });
    expect((await request(app).post('/api/auth/refresh').send({ refreshToken: session.refreshToken })).status).toBe(
      401,
    );
    expect((await request(app).post('/api/auth/refresh').send({ refreshToken: res.body.refreshToken })).status).toBe(
      200,
    );
    expect((await attempt(email, oneTime)).status).toBe(401);
    expect((await attempt(email, GOOD)).status).toBe(200);
  });
});

/** A sign-in answer as an outsider sees it: status, the headers that could differ, and the body's bytes. */
const seen = (res: request.Response) => ({
  status: res.status,
  retryAfter: res.headers['retry-after'] ?? null,
  body: res.text,
});

describe(`lockout: ${LOCKOUT_THRESHOLD} failures in ${LOCKOUT_WINDOW_MS / 60000} min lock one account for ${LOCKOUT_MS / 60000} min`, () => {
  test('the tenth failure locks; then the wrong password, the right one and an unknown address answer byte for byte alike (401)', async () => {
    const u = await newUser();
    const wrong = seen(await attempt(u.email, 'wrong-0'));
    expect(wrong).toEqual({
      status: 401,
      retryAfter: null,
      body: JSON.stringify({
        error: { code: 'bad_credentials', message: 'E-mail or password is wrong', details: null },
      }),
    });
    for (let i = 1; i < LOCKOUT_THRESHOLD - 1; i++) expect(seen(await attempt(u.email, `wrong-${i}`))).toEqual(wrong);
    expect((await row(u.id)).failedSignIns).toBe(LOCKOUT_THRESHOLD - 1);
    const tenth = await attempt(u.email, 'wrong-10');
    const { lockedUntil } = await row(u.id);
    expect(lockedUntil!.getTime() - Date.now()).toBeGreaterThan(LOCKOUT_MS - 60_000);
    const right = await attempt(u.email, GOOD);
    const nobody = await attempt('nobody-at-all@fernhallow.example', GOOD);
    for (const res of [tenth, right, nobody]) expect(seen(res)).toEqual(wrong);
    expect(right.body.accessToken).toBeUndefined();
    // still locked: the right password did not open it, nor reset the count
    expect((await row(u.id)).lockedUntil).toEqual(lockedUntil);
    // the owner is told, by e-mail, when it opens again (the answer itself says nothing)
    const mail = (await db.dataSource.query(
      `SELECT "subject", "text", "site_id" FROM "mail_outbox" WHERE "to_address" = $1`,
      [u.email],
    )) as {
      subject: string;
      text: string;
      site_id: string | null;
    }[];
    expect(mail).toHaveLength(1);
    expect(mail[0].subject).toBe('Trueround: your account is locked for 15 minutes');
    expect(mail[0].text).toContain(`It opens again at ${lockedUntil!.toISOString()}`);
    expect(mail[0].site_id).toBeNull();
  });

  test('counted per account, not per address: ten addresses one failure each lock it; another account is not touched', async () => {
    const u = await newUser();
    const other = await newUser();
    for (let i = 0; i < LOCKOUT_THRESHOLD; i++) await attempt(u.email, 'wrong', `198.51.100.${i + 1}`);
    expect((await attempt(u.email, GOOD, '192.0.2.200')).status).toBe(401);
    expect((await row(u.id)).lockedUntil).not.toBeNull();
    expect((await attempt(other.email, GOOD, '198.51.100.1')).status).toBe(200);
  });

  test('failures racing in parallel are all counted (row lock)', async () => {
    const u = await newUser();
    const results = await Promise.all(
      Array.from({ length: LOCKOUT_THRESHOLD + 2 }, (_, i) => attempt(u.email, `wrong-${i}`)),
    );
    expect(results.every((r) => r.status === 401)).toBe(true);
    expect((await row(u.id)).lockedUntil).not.toBeNull();
    expect((await attempt(u.email, GOOD)).status).toBe(401);
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
    await db.dataSource
      .getRepository(UserEntity)
      .update({ id: u.id }, { failedSignInsSince: new Date(Date.now() - LOCKOUT_WINDOW_MS - 60_000) });
    expect((await attempt(u.email, 'wrong')).status).toBe(401);
    expect((await row(u.id)).failedSignIns).toBe(1);
  });

  test('the lock ends after its time: the right password then signs in and clears the lock', async () => {
    const u = await newUser();
    for (let i = 0; i < LOCKOUT_THRESHOLD; i++) await attempt(u.email, 'wrong');
    expect((await attempt(u.email, GOOD)).status).toBe(401);
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
      statuses.push(
        (
          await request(app)
            .post('/api/auth/password')
            .set(bearer(s.accessToken))
            .send({ currentPassword: `guess-${i}`, newPassword: 'a brand new passphrase' })
        ).status,
      );
    }
    // the tenth locks; a locked account's current password is refused like a wrong one (403), not looked at
    expect(statuses).toEqual(Array(LOCKOUT_THRESHOLD).fill(403));
    const right = await request(app)
      .post('/api/auth/password')
      .set(bearer(s.accessToken))
      .send({ currentPassword: GOOD, newPassword: 'a brand new passphrase' });
    expect(right.status).toBe(403);
    expect((await row(u.id)).lockedUntil).not.toBeNull();
    expect((await attempt(u.email, GOOD)).status).toBe(401);
  });

  test('the demo users are not locked by this file (their failures elsewhere stay below the threshold)', async () => {
    const rows = (await db.dataSource.query(
      `SELECT "email" FROM "users" WHERE "locked_until" IS NOT NULL AND "email" NOT LIKE 'lock-%'`,
    )) as { email: string }[];
    expect(rows).toEqual([]);
  });
});
