/**
 * What a password a person chooses must be (NIST SP 800-63B §5.1.1.2, "Memorized Secret
 * Verifiers"): at least PASSWORD_MIN characters (NIST asks for at least 8; 12 is the project's
 * choice, common practice), at most PASSWORD_MAX (NIST: allow at least 64), any characters, no
 * composition rules; refused when it is a commonly used or expected value: one of the most common
 * passwords, the service's own name, the account's e-mail (or its local part), one character
 * repeated, or a plain run like "123456789012". The common list is short and from memory of the
 * published breach top-lists (common practice), not a full breach corpus.
 */
import type { ValidationIssue } from '../../shared/api/errors';
import { AppError } from '../errors';

export const PASSWORD_MIN = 12;
export const PASSWORD_MAX = 1024;

/** Lower-case; each is at least PASSWORD_MIN long (shorter ones fail the length rule anyway). */
export const COMMON_PASSWORDS: ReadonlySet<string> = new Set([
  '123456789012',
  '1234567890123',
  '12345678901234',
  '123123123123',
  '111111111111',
  '000000000000',
  '987654321098',
  'password1234',
  'password12345',
  'password123456',
  'passwordpassword',
  'password1234!',
  'qwertyuiop12',
  'qwertyuiopasdfgh',
  'qwerty123456',
  'qwertyqwerty',
  '1q2w3e4r5t6y',
  '1qaz2wsx3edc',
  'iloveyou1234',
  'letmein12345',
  'welcome12345',
  'abc123abc123',
  'abcdefghijkl',
  'administrator',
  'changeme1234',
  'trustno1trustno1',
  'football1234',
  'monkey123456',
  'sunshine1234',
  'trueround-demo',
  'trueround123',
  'trueround1234',
]);

/** True for a run of consecutive characters either way, e.g. "abcdefghijkl", "210987654321". */
function isSequence(p: string): boolean {
  if (p.length < 3) return false;
  const step = p.charCodeAt(1) - p.charCodeAt(0);
  if (Math.abs(step) !== 1) return false;
  for (let i = 2; i < p.length; i++) if (p.charCodeAt(i) - p.charCodeAt(i - 1) !== step) return false;
  return true;
}

/** Why `password` is refused for the account `email`, or null when it is acceptable. */
export function passwordProblem(password: string, email: string): string | null {
  const chars = [...password].length; // code points, as NIST counts characters
  if (chars < PASSWORD_MIN) return `Must be at least ${PASSWORD_MIN} characters (got ${chars})`;
  if (chars > PASSWORD_MAX) return `Must be at most ${PASSWORD_MAX} characters (got ${chars})`;
  const p = password.normalize('NFKC').trim().toLowerCase();
  const e = email.trim().toLowerCase();
  const local = e.split('@')[0];
  if (p === e || p === local || p.includes(e)) return 'Must not be your e-mail address';
  if (COMMON_PASSWORDS.has(p)) return 'Is one of the most commonly used passwords; choose another';
  if (p.startsWith('trueround')) return 'Must not be built on the name of the service';
  if (new Set(p).size === 1 || isSequence(p)) return 'Must not be one character repeated or a plain run like 123456789012';
  return null;
}

/** Throws a 400 `validation` naming `field` when the password is refused. */
export function assertPasswordAllowed(password: string, email: string, field = 'newPassword'): void {
  const problem = passwordProblem(password, email);
  if (!problem) return;
  const details: ValidationIssue[] = [{ path: field, message: problem }];
  throw new AppError(400, 'validation', `Invalid request body: ${field}: ${problem}`, details);
}
