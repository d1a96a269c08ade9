/**
 * Sign-in, access tokens, refresh rotation, sign-out: the real app on a fresh PostgreSQL
 * database loaded with the demo (server/seed/demo-users.ts).
 */
import type { Express } from 'express';
import jwt from 'jsonwebtoken';
import request from 'supertest';
import { IsNull } from 'typeorm';
import { MeResponse, RefreshResponse, SignInResponse } from '../../shared/api/auth';
import { ApiError } from '../../shared/api/errors';
import { RefreshTokenEntity, UserEntity } from '../../server/entities';
import { demoUser, demoUsers } from '../../server/seed/demo-users';
import { bearer, signIn, TEST_SECRET, testApp } from './helpers/app';
import { createTestDatabase, type TestDb } from './helpers/db';

let db: TestDb;
let app: Express;

beforeAll(async () => {
  db = await createTestDatabase();
  app = testApp(db.dataSource, db.url);
});
afterAll(() => db?.drop());

const tech = demoUser('technician');
const b64url = (o: object) => Buffer.from(JSON.stringify(o)).toString('base64url');

describe('sign-in', () => {
  test('the demo technician signs in: a token pair and the user with memberships', async () => {
    const res = await request(app).post('/api/auth/sign-in').send({ email: tech.email, password: 'trueround-demo' });
    expect(res.status).toBe(200);
    const body = SignInResponse.parse(res.body);
    expect(body.user).toMatchObject({ name: 'Robin Aske', email: 'tech@fernhallow.example' });
    expect(body.user.memberships).toEqual([
      { siteId: expect.any(String), siteName: 'Fernhallow Works', role: 'technician' },
    ]);
    // RFC 7519 §4.1: registered claims iss, aud, sub, exp; RFC 7515 header alg HS256.
    const decoded = jwt.decode(body.accessToken, { complete: true })!;
    expect(decoded.header.alg).toBe('HS256');
    expect(decoded.payload).toMatchObject({ iss: 'trueround', aud: 'trueround-api', sub: body.user.id });
    const p = decoded.payload as jwt.JwtPayload;
    expect(p.exp! - p.iat!).toBe(900);
    // 32 random bytes in base64url (RFC 4648 §5) without padding are 43 characters.
    expect(body.refreshToken).toMatch(/^[A-Za-z0-9_-]{43}$/);
  });

  test('e-mail is matched trimmed and case-insensitively', async () => {
    const s = await signIn(app, '  Planner@FERNHALLOW.example ');
    expect(s.user.name).toBe('Morgan Tilly');
  });

  test('every demo login works with its role on its site', async () => {
    for (const u of demoUsers) {
      const s = await signIn(app, u.email);
      expect(s.user.name).toBe(u.name);
      expect(s.user.memberships.map((m) => m.role)).toEqual([u.role]);
    }
  });

  test('OWASP Authentication Cheat Sheet: wrong password and unknown e-mail get the same 401 and no token', async () => {
    const tokens = db.dataSource.getRepository(RefreshTokenEntity);
    const before = await tokens.count();
    const wrong = await request(app)
      .post('/api/auth/sign-in')
      .send({ email: tech.email, password: 'not-the-password' });
    const unknown = await request(app)
      .post('/api/auth/sign-in')
      .send({ email: 'nobody@fernhallow.example', password: 'trueround-demo' });
    for (const res of [wrong, unknown]) {
      expect(res.status).toBe(401);
      expect(ApiError.parse(res.body).error).toEqual({
        code: 'bad_credentials',
        message: 'E-mail or password is wrong',
        details: null,
      });
      expect(res.body.accessToken).toBeUndefined();
      expect(res.body.refreshToken).toBeUndefined();
    }
    // Nothing was issued.
    expect(await tokens.count()).toBe(before);
  });

  test('OWASP Password Storage Cheat Sheet: passwords are stored as argon2id, m=19 MiB, t=2, p=1 (PHC string, RFC 9106 v=19)', async () => {
    const users = await db.dataSource.getRepository(UserEntity).find();
    expect(users).toHaveLength(demoUsers.length);
    for (const u of users) {
      const m = /^\$argon2id\$v=19\$([a-z=0-9,]+)\$[A-Za-z0-9+/]{22}\$[A-Za-z0-9+/]{43}$/.exec(u.passwordHash);
      expect(m).not.toBeNull();
      expect(Object.fromEntries(m![1].split(',').map((kv) => kv.split('=')))).toEqual({ m: '19456', t: '2', p: '1' });
    }
    // Each has its own salt.
    expect(new Set(users.map((u) => u.passwordHash)).size).toBe(users.length);
  });

  test('a disabled account gets 403 account_disabled (only with the right password) and cannot refresh', async () => {
    const s = await signIn(app, demoUser('engineer').email);
    await db.dataSource.getRepository(UserEntity).update({ email: demoUser('engineer').email }, { disabled: true });
    try {
      const right = await request(app)
        .post('/api/auth/sign-in')
        .send({ email: demoUser('engineer').email, password: 'trueround-demo' });
      expect(right.status).toBe(403);
      expect(right.body.error.code).toBe('account_disabled');
      const wrong = await request(app)
        .post('/api/auth/sign-in')
        .send({ email: demoUser('engineer').email, password: 'nope' });
      expect(wrong.body.error.code).toBe('bad_credentials');
      const refresh = await request(app).post('/api/auth/refresh').send({ refreshToken: s.refreshToken });
      expect(refresh.status).toBe(401);
      expect((await request(app).get('/api/me').set(bearer(s.accessToken))).status).toBe(401);
    } finally {
      await db.dataSource.getRepository(UserEntity).update({ email: demoUser('engineer').email }, { disabled: false });
    }
  });
});

async function userId(email: string): Promise<string> {
  return (await db.dataSource.getRepository(UserEntity).findOneByOrFail({ email })).id;
}

describe('access token (requireAuth)', () => {
  test('GET /api/me with a valid Bearer token → the user with memberships', async () => {
    const s = await signIn(app, demoUser('admin').email);
    const res = await request(app).get('/api/me').set(bearer(s.accessToken));
    expect(res.status).toBe(200);
    expect(MeResponse.parse(res.body)).toEqual(s.user);
  });

  test('RFC 6750 §3: no token → 401 unauthorized', async () => {
    const res = await request(app).get('/api/me');
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthorized');
    const notBearer = await request(app).get('/api/me').set('Authorization', 'Basic dGVjaDp4');
    expect(notBearer.status).toBe(401);
    expect(notBearer.body.error.code).toBe('unauthorized');
  });

  test('RFC 7519 §4.1.4: a token past its exp → 401', async () => {
    const sub = await userId(tech.email);
    const now = Math.floor(Date.now() / 1000);
    const expired = jwt.sign(
      { sub, iss: 'trueround', aud: 'trueround-api', iat: now - 1000, exp: now - 60 },
      TEST_SECRET,
      { algorithm: 'HS256' },
    );
    const res = await request(app).get('/api/me').set(bearer(expired));
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthorized');
    // RFC 6750 §3.1: invalid_token in WWW-Authenticate.
    expect(res.headers['www-authenticate']).toBe('Bearer error="invalid_token"');
    // The same claims with a future exp are accepted: the expiry is what failed.
    const fresh = jwt.sign({ sub, iss: 'trueround', aud: 'trueround-api', iat: now, exp: now + 60 }, TEST_SECRET, {
      algorithm: 'HS256',
    });
    expect((await request(app).get('/api/me').set(bearer(fresh))).status).toBe(200);
  });

  test('RFC 7515 §5.2: one flipped character in the payload or the signature → 401', async () => {
    const { accessToken } = await signIn(app, tech.email);
    expect((await request(app).get('/api/me').set(bearer(accessToken))).status).toBe(200);
    const [h, p, sig] = accessToken.split('.');
    const flip = (s: string, i: number) => s.slice(0, i) + (s[i] === 'A' ? 'B' : 'A') + s.slice(i + 1);
    for (const t of [`${h}.${flip(p, 10)}.${sig}`, `${h}.${p}.${flip(sig, 0)}`]) {
      const res = await request(app).get('/api/me').set(bearer(t));
      expect(res.status).toBe(401);
      expect(res.body.error.code).toBe('unauthorized');
    }
  });

  test('RFC 7518 §3.6 / RFC 8725 §3.1: an unsecured "alg: none" token → 401', async () => {
    const sub = await userId(tech.email);
    const now = Math.floor(Date.now() / 1000);
    const none = `${b64url({ alg: 'none', typ: 'JWT' })}.${b64url({ sub, iss: 'trueround', aud: 'trueround-api', iat: now, exp: now + 600 })}.`;
    const res = await request(app).get('/api/me').set(bearer(none));
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthorized');
  });

  test('RFC 7519 §4.1.1, §4.1.3, RFC 8725 §3.1: wrong secret, issuer, audience or algorithm (HS512) → 401', async () => {
    const sub = await userId(tech.email);
    const ok = {
      subject: sub,
      issuer: 'trueround',
      audience: 'trueround-api',
      expiresIn: 60,
      algorithm: 'HS256' as const,
    };
    const tokens = [
      jwt.sign({}, 'another-secret-another-secret-another-secret', ok),
      jwt.sign({}, TEST_SECRET, { ...ok, issuer: 'someone-else' }),
      jwt.sign({}, TEST_SECRET, { ...ok, audience: 'another-api' }),
      jwt.sign({}, TEST_SECRET, { ...ok, algorithm: 'HS512' }),
    ];
    for (const t of tokens) expect((await request(app).get('/api/me').set(bearer(t))).status).toBe(401);
    expect(
      (
        await request(app)
          .get('/api/me')
          .set(bearer(jwt.sign({}, TEST_SECRET, ok)))
      ).status,
    ).toBe(200);
  });
});

describe('refresh tokens (RFC 9700 §4.14.2: rotation and reuse detection)', () => {
  test('refresh returns a new pair; reusing the old token → 401 and the new one is revoked too', async () => {
    const s0 = await signIn(app, tech.email);
    const r1 = await request(app).post('/api/auth/refresh').send({ refreshToken: s0.refreshToken });
    expect(r1.status).toBe(200);
    const p1 = RefreshResponse.parse(r1.body);
    expect(p1.refreshToken).not.toBe(s0.refreshToken);
    expect((await request(app).get('/api/me').set(bearer(p1.accessToken))).status).toBe(200);

    // Only the SHA-256 is stored, never the token.
    const rows = await db.dataSource.getRepository(RefreshTokenEntity).find({ where: { userId: s0.user.id } });
    expect(rows.some((r) => r.tokenHash === p1.refreshToken)).toBe(false);
    expect(rows.every((r) => /^[0-9a-f]{64}$/.test(r.tokenHash))).toBe(true);

    const reuse = await request(app).post('/api/auth/refresh').send({ refreshToken: s0.refreshToken });
    expect(reuse.status).toBe(401);
    expect(reuse.body.error.code).toBe('unauthorized');
    expect(reuse.body.accessToken).toBeUndefined();

    const afterReuse = await request(app).post('/api/auth/refresh').send({ refreshToken: p1.refreshToken });
    expect(afterReuse.status).toBe(401);

    // Other sessions of the same user (another sign-in, another family) are not touched.
    const other = await signIn(app, tech.email);
    expect((await request(app).post('/api/auth/refresh').send({ refreshToken: other.refreshToken })).status).toBe(200);
  });

  test('a chain of refreshes keeps working, each token once', async () => {
    let token = (await signIn(app, demoUser('planner').email)).refreshToken;
    for (let i = 0; i < 3; i++) {
      const res = await request(app).post('/api/auth/refresh').send({ refreshToken: token });
      expect(res.status).toBe(200);
      token = res.body.refreshToken;
    }
  });

  test('two refreshes racing on one token: exactly one wins', async () => {
    const s = await signIn(app, demoUser('planner').email);
    const [a, b] = await Promise.all([
      request(app).post('/api/auth/refresh').send({ refreshToken: s.refreshToken }),
      request(app).post('/api/auth/refresh').send({ refreshToken: s.refreshToken }),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 401]);
  });

  test('an unknown or expired refresh token → 401; a missing one → 400 naming refreshToken', async () => {
    const unknown = await request(app)
      .post('/api/auth/refresh')
      .send({ refreshToken: 'A'.repeat(43) });
    expect(unknown.status).toBe(401);
    const s = await signIn(app, tech.email);
    await db.dataSource
      .getRepository(RefreshTokenEntity)
      .update({ userId: s.user.id, revokedAt: IsNull() }, { expiresAt: new Date(Date.now() - 1000) });
    const expired = await request(app).post('/api/auth/refresh').send({ refreshToken: s.refreshToken });
    expect(expired.status).toBe(401);
    expect(expired.body.error.message).toContain('expired');
    const missing = await request(app).post('/api/auth/refresh').send({});
    expect(missing.status).toBe(400);
    expect(missing.body.error.details).toEqual([{ path: 'refreshToken', message: 'Required' }]);
  });

  test('sign-out (with the access token) revokes the refresh token', async () => {
    const s = await signIn(app, tech.email);
    const noAuth = await request(app).post('/api/auth/sign-out').send({ refreshToken: s.refreshToken });
    expect(noAuth.status).toBe(401);
    const out = await request(app)
      .post('/api/auth/sign-out')
      .set(bearer(s.accessToken))
      .send({ refreshToken: s.refreshToken });
    expect(out.status).toBe(204);
    const refresh = await request(app).post('/api/auth/refresh').send({ refreshToken: s.refreshToken });
    expect(refresh.status).toBe(401);
    // Idempotent.
    expect(
      (await request(app).post('/api/auth/sign-out').set(bearer(s.accessToken)).send({ refreshToken: s.refreshToken }))
        .status,
    ).toBe(204);
  });

  test("one user cannot sign out another user's session", async () => {
    const victim = await signIn(app, demoUser('admin').email);
    const other = await signIn(app, tech.email);
    expect(
      (
        await request(app)
          .post('/api/auth/sign-out')
          .set(bearer(other.accessToken))
          .send({ refreshToken: victim.refreshToken })
      ).status,
    ).toBe(204);
    expect((await request(app).post('/api/auth/refresh').send({ refreshToken: victim.refreshToken })).status).toBe(200);
  });
});

describe('sign-in rate limit (RFC 6585 §4: 429 Too Many Requests)', () => {
  test('after SIGN_IN_RATE_LIMIT failed attempts from one address → 429 rate_limited, even with the right password', async () => {
    const limited = testApp(db.dataSource, db.url, { SIGN_IN_RATE_LIMIT: '3' });
    for (let i = 0; i < 3; i++) {
      const res = await request(limited)
        .post('/api/auth/sign-in')
        .send({ email: tech.email, password: `wrong-${i}` });
      expect(res.status).toBe(401);
    }
    const res = await request(limited)
      .post('/api/auth/sign-in')
      .send({ email: tech.email, password: 'trueround-demo' });
    expect(res.status).toBe(429);
    expect(ApiError.parse(res.body).error.code).toBe('rate_limited');
    expect(res.body.accessToken).toBeUndefined();
    // IETF draft-ietf-httpapi-ratelimit-headers-08 fields.
    expect(res.headers['ratelimit-policy']).toMatch(/q=3; w=900/);
    // Other routes are not limited.
    expect(
      (
        await request(limited)
          .post('/api/auth/refresh')
          .send({ refreshToken: 'A'.repeat(43) })
      ).status,
    ).toBe(401);
  });

  test('successful sign-ins are not counted (a shift signing in behind one NAT address)', async () => {
    const limited = testApp(db.dataSource, db.url, { SIGN_IN_RATE_LIMIT: '2' });
    for (let i = 0; i < 4; i++)
      expect(
        (await request(limited).post('/api/auth/sign-in').send({ email: tech.email, password: 'trueround-demo' }))
          .status,
      ).toBe(200);
  });
});
