/**
 * Password hashing with argon2id at the OWASP Password Storage Cheat Sheet's first
 * recommended setting: m = 19 MiB, t = 2, p = 1 (≈ 35 ms on one core here).
 * Hashes are PHC strings ("$argon2id$v=19$m=19456,t=2,p=1$…"), so stronger settings later
 * still verify old hashes.
 */
import argon2 from 'argon2';

const OPTIONS = { type: argon2.argon2id, memoryCost: 19456, timeCost: 2, parallelism: 1 } as const;

export function hashPassword(password: string): Promise<string> {
  return argon2.hash(password, OPTIONS);
}

export async function verifyPassword(hash: string, password: string): Promise<boolean> {
  try {
    return await argon2.verify(hash, password);
  } catch {
    return false; // a malformed stored hash never signs anyone in
  }
}

let dummy: Promise<string> | undefined;
/**
 * Spends the same work as a real check when there is no user to check against, so a wrong
 * e-mail and a wrong password take about the same time (OWASP Authentication Cheat Sheet).
 */
export async function burnPasswordCheck(password: string): Promise<void> {
  dummy ??= argon2.hash('no user has this password', OPTIONS);
  await verifyPassword(await dummy, password);
}
