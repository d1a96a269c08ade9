/**
 * Account lockout: LOCKOUT_THRESHOLD failed sign-ins of one account within LOCKOUT_WINDOW_MS lock
 * it for LOCKOUT_MS, whatever addresses they came from (the per-address limiter in ./routes.ts is
 * separate). OWASP Authentication Cheat Sheet "Account Lockout" and NIST SP 800-63B §5.2.2 (limit
 * failed attempts on one account); the numbers are the project's choice (common practice).
 * Counted in the users row (failed_sign_ins, failed_sign_ins_since, locked_until), so every server
 * process sees the same count; a successful sign-in resets it. While locked, a sign-in answers
 * exactly like a wrong password (401 bad_credentials), so the lock reveals no account; the
 * owner gets an e-mail when it locks (lockedNotice, through the mail outbox).
 */
import type { DataSource, EntityManager } from 'typeorm';
import { UserEntity, type User } from '../entities';
import { queueMail, type OutgoingMail } from '../mail/outbox';

export const LOCKOUT_THRESHOLD = 10;
export const LOCKOUT_WINDOW_MS = 15 * 60 * 1000;
export const LOCKOUT_MS = 15 * 60 * 1000;

/** True while the account is locked. A locked account's sign-in answers like a wrong password (./service.ts). */
export function isLocked(user: Pick<User, 'lockedUntil'>, now = new Date()): boolean {
  return !!user.lockedUntil && user.lockedUntil.getTime() > now.getTime();
}

/** The notice its owner gets when the account locks: the sign-in answer itself says nothing of it. */
export function lockedNotice(user: Pick<User, 'id' | 'email' | 'name'>, until: Date): OutgoingMail {
  return {
    to: user.email,
    subject: 'Trueround: your account is locked for 15 minutes',
    text: [
      `Hello ${user.name},`,
      '',
      `Trueround locked your account after ${LOCKOUT_THRESHOLD} failed sign-ins within ${LOCKOUT_WINDOW_MS / 60000} minutes.`,
      `It opens again at ${until.toISOString()}. Until then every sign-in answers "E-mail or password is wrong", even with the right password.`,
      '',
      'If these attempts were not yours, tell a site admin.',
    ].join('\n'),
    dedupeKey: `locked|${user.id}|${until.toISOString()}`,
  };
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
      await queueMail(em, [lockedNotice(u, until)]);
      return until;
    }
    await users.update(
      { id: userId },
      { failedSignIns: count, failedSignInsSince: fresh ? now : u.failedSignInsSince },
    );
    return null;
  });
}

/** A successful sign-in forgets earlier failures (and an expired lock). */
export async function resetFailedSignIns(
  db: DataSource | EntityManager,
  user: Pick<User, 'id' | 'failedSignIns' | 'failedSignInsSince' | 'lockedUntil'>,
): Promise<void> {
  if (user.failedSignIns === 0 && !user.failedSignInsSince && !user.lockedUntil) return;
  await db
    .getRepository(UserEntity)
    .update({ id: user.id }, { failedSignIns: 0, failedSignInsSince: null, lockedUntil: null });
}
