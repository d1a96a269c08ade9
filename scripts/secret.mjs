/** The JWT secret of this checkout's own server: made once, kept in .data/secret.json (mode 600). */
import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '..');

export function localJwtSecret() {
  const file = join(ROOT, '.data', 'secret.json');
  mkdirSync(dirname(file), { recursive: true });
  if (!existsSync(file))
    writeFileSync(file, JSON.stringify({ jwtSecret: randomBytes(48).toString('base64url') }), { mode: 0o600 });
  return JSON.parse(readFileSync(file, 'utf8')).jwtSecret;
}
