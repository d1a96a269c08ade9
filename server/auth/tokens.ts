/**
 * Access tokens: JWT (RFC 7519) signed HS256, issuer "trueround", audience "trueround-api",
 * `sub` the user id. Verification pins the algorithm list to HS256, so an unsigned
 * (`alg: none`) or differently signed token fails.
 * Refresh tokens: 32 random bytes, base64url; only their SHA-256 is stored.
 */
import { createHash, randomBytes } from 'node:crypto';
import jwt from 'jsonwebtoken';
import { z } from 'zod';

export const JWT_ISSUER = 'trueround';
export const JWT_AUDIENCE = 'trueround-api';
export const JWT_ALGORITHM = 'HS256' as const;

export interface AccessClaims {
  userId: string;
}

export function signAccessToken(userId: string, secret: string, ttlSeconds: number): string {
  return jwt.sign({}, secret, {
    algorithm: JWT_ALGORITHM,
    issuer: JWT_ISSUER,
    audience: JWT_AUDIENCE,
    subject: userId,
    expiresIn: ttlSeconds,
  });
}

const Sub = z.uuid();

/** The claims of a valid token, or null for anything else (expired, tampered, wrong alg…). */
export function verifyAccessToken(token: string, secret: string): AccessClaims | null {
  try {
    const payload = jwt.verify(token, secret, {
      algorithms: [JWT_ALGORITHM],
      issuer: JWT_ISSUER,
      audience: JWT_AUDIENCE,
    });
    if (typeof payload === 'string' || typeof payload.exp !== 'number') return null;
    const sub = Sub.safeParse(payload.sub);
    return sub.success ? { userId: sub.data } : null;
  } catch {
    return null;
  }
}

export function newRefreshToken(): string {
  return randomBytes(32).toString('base64url');
}

export function hashRefreshToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}
