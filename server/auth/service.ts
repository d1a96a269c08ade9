/**
 * Sign-in, token refresh with rotation and reuse detection, sign-out, and the user view.
 * Refresh follows the OAuth 2.0 Security Best Current Practice (RFC 9700 §4.14.2): each
 * refresh token is used once; a retired token presented again means it leaked, so every
 * token of its family (the sign-in it came from) is revoked.
 */
import { randomUUID } from 'node:crypto';
import { IsNull, type DataSource, type EntityManager } from 'typeorm';
import type { SignInRequest, SignInResponse, TokenPair, UserView } from '../../shared/api/auth';
import type { Config } from '../config';
import { MembershipEntity, RefreshTokenEntity, UserEntity, type Membership, type User } from '../entities';
import { AppError } from '../errors';
import { isLocked, recordFailedSignIn, resetFailedSignIns } from './lockout';
import { assertPasswordAllowed } from './password-policy';
import { burnPasswordCheck, hashPassword, verifyPassword } from './passwords';
import { hashRefreshToken, newRefreshToken, signAccessToken } from './tokens';

type TokenConfig = Pick<Config, 'JWT_SECRET' | 'ACCESS_TOKEN_TTL_S' | 'REFRESH_TOKEN_TTL_S'>;

const badCredentials = () => new AppError(401, 'bad_credentials', 'E-mail or password is wrong');
const badRefresh = (why: string) => new AppError(401, 'unauthorized', `Refresh token ${why}; sign in again`);

export async function loadUserView(db: DataSource | EntityManager, userId: string): Promise<UserView | null> {
  const user = await db.getRepository(UserEntity).findOne({ where: { id: userId } });
  if (!user || user.disabled) return null;
  const memberships: Membership[] = await db.getRepository(MembershipEntity).find({
    where: { userId },
    relations: { site: true },
  });
  return {
    id: user.id,
    name: user.name,
    email: user.email,
    memberships: memberships
      .map((m) => ({ siteId: m.siteId, siteName: m.site!.name, role: m.role }))
      .sort((a, b) => a.siteName.localeCompare(b.siteName)),
  };
}

async function issuePair(
  em: EntityManager,
  config: TokenConfig,
  userId: string,
  familyId: string,
): Promise<TokenPair & { id: string }> {
  const refreshToken = newRefreshToken();
  const row = await em.getRepository(RefreshTokenEntity).save({
    userId,
    familyId,
    tokenHash: hashRefreshToken(refreshToken),
    expiresAt: new Date(Date.now() + config.REFRESH_TOKEN_TTL_S * 1000),
    revokedAt: null,
    replacedBy: null,
  });
  return {
    id: row.id,
    accessToken: signAccessToken(userId, config.JWT_SECRET, config.ACCESS_TOKEN_TTL_S),
    refreshToken,
  };
}

export async function signIn(ds: DataSource, config: TokenConfig, input: SignInRequest): Promise<SignInResponse> {
  const user: User | null = await ds.getRepository(UserEntity).findOne({ where: { email: input.email } });
  if (!user) {
    await burnPasswordCheck(input.password);
    throw badCredentials();
  }
  // A locked account answers exactly like a wrong password (status, code, message; the same
  // argon2 work as an unknown address), so the lock does not tell anyone the account exists; its
  // owner is told by e-mail when it locks (./lockout.ts). The password is not looked at.
  if (isLocked(user)) {
    await burnPasswordCheck(input.password);
    throw badCredentials();
  }
  if (!(await verifyPassword(user.passwordHash, input.password))) {
    await recordFailedSignIn(ds, user.id);
    throw badCredentials();
  }
  // Said only to someone who knows the password.
  if (user.disabled) throw new AppError(403, 'account_disabled', 'This account is disabled; ask a site admin');

  return ds.transaction(async (em) => {
    await resetFailedSignIns(em, user);
    const { accessToken, refreshToken } = await issuePair(em, config, user.id, randomUUID());
    const view = await loadUserView(em, user.id);
    return { accessToken, refreshToken, user: view! };
  });
}

type RefreshOutcome = { ok: TokenPair } | { reused: string } | { fail: string };

export async function refreshTokens(ds: DataSource, config: TokenConfig, presented: string): Promise<TokenPair> {
  const tokenHash = hashRefreshToken(presented);
  const outcome: RefreshOutcome = await ds.transaction(async (em) => {
    const tokens = em.getRepository(RefreshTokenEntity);
    // Row lock: two refreshes racing on one token cannot both rotate it.
    const row = await tokens.findOne({ where: { tokenHash }, lock: { mode: 'pessimistic_write' } });
    if (!row) return { fail: 'is not known' };
    if (row.revokedAt) return { reused: row.familyId };
    if (row.expiresAt.getTime() <= Date.now()) return { fail: 'has expired' };
    const user = await em.getRepository(UserEntity).findOne({ where: { id: row.userId } });
    if (!user || user.disabled) return { fail: 'belongs to no active user' };

    const next = await issuePair(em, config, row.userId, row.familyId);
    await tokens.update({ id: row.id }, { revokedAt: new Date(), replacedBy: next.id });
    return { ok: { accessToken: next.accessToken, refreshToken: next.refreshToken } };
  });

  if ('ok' in outcome) return outcome.ok;
  if ('reused' in outcome) {
    // Committed on its own: the revocation must stand although the request fails.
    await revokeFamily(ds, outcome.reused);
    throw badRefresh('was already used; every session of that sign-in is now ended');
  }
  throw badRefresh(outcome.fail);
}

export async function revokeFamily(db: DataSource | EntityManager, familyId: string): Promise<void> {
  await db.getRepository(RefreshTokenEntity).update({ familyId, revokedAt: IsNull() }, { revokedAt: new Date() });
}

/**
 * Ends the session the refresh token belongs to (its whole family). Idempotent; a token of
 * another user, or one not known, is quietly left alone so nothing about it is revealed.
 */
export async function signOut(ds: DataSource, userId: string, presented: string): Promise<void> {
  const row = await ds
    .getRepository(RefreshTokenEntity)
    .findOne({ where: { tokenHash: hashRefreshToken(presented), userId } });
  if (row) await revokeFamily(ds, row.familyId);
}

/**
 * Sets a new password chosen by the signed-in user (an invitee's first step after signing in with
 * the one-time password of the invitation): the current password must be right (a wrong one counts
 * towards the lockout like a failed sign-in), the new one must pass ./password-policy.ts. Every
 * session of the user ends (all refresh tokens revoked) and a new pair is returned.
 */
export async function changePassword(
  ds: DataSource,
  config: TokenConfig,
  userId: string,
  input: { currentPassword: string; newPassword: string },
): Promise<TokenPair> {
  const user = await ds.getRepository(UserEntity).findOne({ where: { id: userId } });
  if (!user || user.disabled) throw new AppError(401, 'unauthorized', 'This account no longer exists or is disabled');
  const wrongCurrent = () =>
    new AppError(403, 'forbidden', 'The current password is wrong', [{ path: 'currentPassword', message: 'Is wrong' }]);
  // as at sign-in: a locked account's password is not looked at, and the answer is the wrong-password one
  if (isLocked(user)) {
    await burnPasswordCheck(input.currentPassword);
    throw wrongCurrent();
  }
  if (!(await verifyPassword(user.passwordHash, input.currentPassword))) {
    await recordFailedSignIn(ds, user.id);
    throw wrongCurrent();
  }
  assertPasswordAllowed(input.newPassword, user.email, 'newPassword', user.name);
  if (input.newPassword === input.currentPassword) {
    throw new AppError(400, 'validation', 'Invalid request body: newPassword: Must differ from the current password', [
      { path: 'newPassword', message: 'Must differ from the current password' },
    ]);
  }
  const hash = await hashPassword(input.newPassword);
  return ds.transaction(async (em) => {
    await em
      .getRepository(UserEntity)
      .update({ id: userId }, { passwordHash: hash, failedSignIns: 0, failedSignInsSince: null, lockedUntil: null });
    await em.getRepository(RefreshTokenEntity).update({ userId, revokedAt: IsNull() }, { revokedAt: new Date() });
    const { accessToken, refreshToken } = await issuePair(em, config, userId, randomUUID());
    return { accessToken, refreshToken };
  });
}
