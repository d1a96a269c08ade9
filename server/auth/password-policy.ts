/**
 * What a password a person chooses must be (NIST SP 800-63B §5.1.1.2, "Memorized Secret
 * Verifiers"): at least PASSWORD_MIN characters (NIST asks for at least 8; 12 is the project's
 * choice, common practice), at most PASSWORD_MAX (NIST: allow at least 64), any characters, no
 * composition rules; refused when it is a commonly used or expected value: one of the most common
 * passwords, the service's own name, the account's e-mail (or its local part), one character
 * repeated, or a plain run like "123456789012". The common list is short and from memory of the
 * published breach top-lists (common practice), not a full breach corpus.
 *
 * Two checks close the gap that list leaves:
 *  - the e-mail's local part (as written, or without its dots, dashes and underscores) with only
 *    digits, symbols or a common word such as "pass" around it ("kim.ward2025!", "2025kimward") is
 *    refused with a message saying so;
 *  - a strength estimate: zxcvbn-ts (@zxcvbn-ts/core with its common and English dictionaries, a
 *    TypeScript port of Dropbox's zxcvbn, D. Wheeler, "zxcvbn: Low-Budget Password Strength
 *    Estimation", USENIX Security 2016) must score it at least MIN_SCORE = 3 (10⁸ guesses or more,
 *    zxcvbn's "safely unguessable: moderate protection from offline slow-hash scenario"), with the
 *    e-mail, its parts, the person's name and the service's name as words an attacker would try.
 */
import { ZxcvbnFactory } from '@zxcvbn-ts/core';
import * as zxcvbnCommon from '@zxcvbn-ts/language-common';
import * as zxcvbnEn from '@zxcvbn-ts/language-en';
import type { ValidationIssue } from '../../shared/api/errors';
import { AppError } from '../errors';

/** Lowest zxcvbn score accepted (0–4; 3 = at least 10⁸ guesses). */
export const MIN_SCORE = 3;
/** zxcvbn looks at this many characters (its cost grows with length; longer ones score on their start, which only under-rates them). */
const ESTIMATE_CHARS = 100;
/** Words that commonly stand around a name in a password (common practice, from memory of breach top-lists). */
const NAME_AFFIXES = ['password', 'passwort', 'pass', 'pwd', 'admin', 'secret', 'login', 'welcome', 'qwerty', 'abc'];

let estimator: ZxcvbnFactory | undefined;
function estimate(password: string, words: string[]) {
  estimator ??= new ZxcvbnFactory({
    dictionary: { ...zxcvbnCommon.dictionary, ...zxcvbnEn.dictionary },
    graphs: zxcvbnCommon.adjacencyGraphs,
    translations: zxcvbnEn.translations,
  });
  return estimator.check(password.slice(0, ESTIMATE_CHARS), words);
}

/** True when `p` is `core` with only digits, symbols, spaces or NAME_AFFIXES before and after it. */
function isNameWithTrimmings(p: string, core: string): boolean {
  if (core.length < 3) return false;
  let at = p.indexOf(core);
  while (at >= 0) {
    let rest = p.slice(0, at) + ' ' + p.slice(at + core.length);
    for (const a of NAME_AFFIXES) rest = rest.split(a).join(' ');
    if (/^[\p{N}\p{P}\p{S}\s]*$/u.test(rest)) return true;
    at = p.indexOf(core, at + 1);
  }
  return false;
}

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

/** Why `password` is refused for the account `email` (of the person `name`), or null when it is acceptable. */
export function passwordProblem(password: string, email: string, name = ''): string | null {
  const chars = [...password].length; // code points, as NIST counts characters
  if (chars < PASSWORD_MIN) return `Must be at least ${PASSWORD_MIN} characters (got ${chars})`;
  if (chars > PASSWORD_MAX) return `Must be at most ${PASSWORD_MAX} characters (got ${chars})`;
  const p = password.normalize('NFKC').trim().toLowerCase();
  const e = email.trim().toLowerCase();
  const local = e.split('@')[0];
  if (p === e || p === local || p.includes(e)) return 'Must not be your e-mail address';
  const squashed = local.replace(/[._+-]+/g, '');
  if (isNameWithTrimmings(p, local) || isNameWithTrimmings(p.replace(/[\s._+-]+/g, ''), squashed)) {
    return 'Must not be the name of your e-mail address with digits, symbols or a common word around it';
  }
  if (COMMON_PASSWORDS.has(p)) return 'Is one of the most commonly used passwords; choose another';
  if (p.startsWith('trueround')) return 'Must not be built on the name of the service';
  if (new Set(p).size === 1 || isSequence(p))
    return 'Must not be one character repeated or a plain run like 123456789012';
  const domain = e.split('@')[1] ?? '';
  const words = [
    e,
    local,
    squashed,
    ...local.split(/[._+-]+/),
    domain.split('.')[0] ?? '',
    ...name.toLowerCase().split(/\s+/),
    'trueround',
  ].filter((w) => w.length >= 3);
  const r = estimate(password, [...new Set(words)]);
  if (r.score < MIN_SCORE) {
    const why = r.feedback.warning ? ` (${r.feedback.warning.replace(/\.$/, '')})` : '';
    return `Is too easy to guess${why}: a strength estimate puts it at about 10^${Math.floor(r.guessesLog10)} guesses, at least 10^8 are needed; add words or make it longer`;
  }
  return null;
}

/** Throws a 400 `validation` naming `field` when the password is refused. */
export function assertPasswordAllowed(password: string, email: string, field = 'newPassword', name = ''): void {
  const problem = passwordProblem(password, email, name);
  if (!problem) return;
  const details: ValidationIssue[] = [{ path: field, message: problem }];
  throw new AppError(400, 'validation', `Invalid request body: ${field}: ${problem}`, details);
}
