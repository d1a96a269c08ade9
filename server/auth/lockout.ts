/**
 * Account lockout: LOCKOUT_THRESHOLD failed sign-ins of one account within LOCKOUT_WINDOW_MS lock
 * it for LOCKOUT_MS, whatever addresses they came from (the per-address limiter in ./routes.ts is
 * separate). OWASP Authentication Cheat Sheet "Account Lockout" and NIST SP 800-63B §5.2.2 (limit
 * failed attempts on one account); the numbers are the project's choice (common practice).
 * Counted in the users row (failed_sign_ins, failed_sign_ins_since, locked_until), so every server
 * process sees the same count; a successful sign-in resets it.
 */
import type { DataSource, EntityManager } from 'typeorm';
import { UserEntity, type User } from '../entities';
import { AppError } from '../errors';

export const LOCKOUT_THRESHOLD = 10;
export const LOCKOUT_WINDOW_MS = 15 * 60 * 1000;
export const LOCKOUT_MS = 15 * 60 * 1000;

/** The 429 a locked account gets; details carry when to retry. */
export function lockedError(until: Date, now = new Date()): AppError {
  const retryAfterS = Math.max(1, Math.ceil((until.getTime() - now.getTime()) / 1000));
  const minutes = Math.ceil(retryAfterS / 60);
  return new AppError(
    429,
    'rate_limited',
    `This account is locked after ${LOCKOUT_THRESHOLD} failed sign-ins within ${LOCKOUT_WINDOW_MS / 60000} minutes; ` +
      `try again after ${until.toISOString()} (in ${minutes} minute${minutes === 1 ? '' : 's'})`,
    { lockedUntil: until.toISOString(), retryAfterS },
  );
}

/** Throws the 429 when the account is locked now. */
export function assertNotLocked(user: Pick<User, 'lockedUntil'>, now = new Date()): void {
  if (user.lockedUntil && user.lockedUntil.getTime() > now.getTime()) throw lockedError(user.lockedUntil, now);
}

/**
 * Counts one failed sign-in of the account; returns the lock's end when this failure locked it.
 * Row-locked, so failures racing on one account are all counted.
 */
export async function recordFailedSignIn(ds: DataSource, userId: string, now = new Date()): Promise<Date | null> {
  return ds.transaction(async (em: EntityManager) => {
    const users = em.getRepository(UserEntity);
    const u = await users.findOne({ where: { id: userId }, lock: { mode: 'pessimistic_write' } });
    if (!u) return null;
    const fresh = !u.failedSignInsSince || now.getTime() - u.failedSignInsSince.getTime() >= LOCKOUT_WINDOW_MS;
    const count = fresh ? 1 : u.failedSignIns + 1;
    if (count >= LOCKOUT_THRESHOLD) {
      const until = new Date(now.getTime() + LOCKOUT_MS);
      await users.update({ id: userId }, { failedSignIns: 0, failedSignInsSince: null, lockedUntil: until });
      return until;
    }
    await users.update({ id: userId }, { failedSignIns: count, failedSignInsSince: fresh ? now : u.failedSignInsSince });
    return null;
  });
}

/** A successful sign-in forgets earlier failures (and an expired lock). */
export async function resetFailedSignIns(db: DataSource | EntityManager, user: Pick<User, 'id' | 'failedSignIns' | 'failedSignInsSince' | 'lockedUntil'>): Promise<void> {
  if (user.failedSignIns === 0 && !user.failedSignInsSince && !user.lockedUntil) return;
  await db.getRepository(UserEntity).update({ id: user.id }, { failedSignIns: 0, failedSignInsSince: null, lockedUntil: null });
}
