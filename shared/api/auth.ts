/**
 * Wire schemas of sign-in, token refresh, sign-out and the signed-in user.
 * Pure zod only (no server import): the app's forms and the server's handlers parse the same shapes.
 */
import { z } from 'zod';

export { ApiError, ValidationIssue, ERROR_CODES, type ErrorCode } from './errors';

/** Roles on a site, least to most privileged in the usual order of a plant. */
export const ROLES = ['technician', 'planner', 'engineer', 'admin'] as const;
export const Role = z.enum(ROLES, { error: 'Must be one of technician, planner, engineer, admin' });
export type Role = z.infer<typeof Role>;

/** A string field that says "Required" when absent, not zod's generic type message. */
const text = () => z.string({ error: (iss) => (iss.input === undefined ? 'Required' : 'Must be a string') });

/** E-mail addresses are compared trimmed and lower-case everywhere. */
export const Email = text()
  .trim()
  .toLowerCase()
  .pipe(z.email({ error: 'Must be an e-mail address' }).max(320, 'Must be at most 320 characters'));

export const SignInRequest = z.object({
  email: Email,
  // Upper bound keeps a hostile 1 MB "password" away from the hash function.
  password: text().min(1, 'Required').max(1024, 'Must be at most 1024 characters'),
});
export type SignInRequest = z.infer<typeof SignInRequest>;

export const Membership = z.object({
  siteId: z.uuid(),
  siteName: z.string(),
  role: Role,
});
export type Membership = z.infer<typeof Membership>;

export const UserView = z.object({
  id: z.uuid(),
  name: z.string(),
  email: z.string(),
  memberships: z.array(Membership),
});
export type UserView = z.infer<typeof UserView>;

export const TokenPair = z.object({
  /** JWT (HS256), short-lived; send as `Authorization: Bearer <accessToken>`. */
  accessToken: z.string().min(1),
  /** Opaque, single use: each refresh returns a new one and retires this one. */
  refreshToken: z.string().min(1),
});
export type TokenPair = z.infer<typeof TokenPair>;

export const SignInResponse = TokenPair.extend({ user: UserView });
export type SignInResponse = z.infer<typeof SignInResponse>;

export const RefreshRequest = z.object({
  refreshToken: text().min(1, 'Required').max(200, 'Must be at most 200 characters'),
});
export type RefreshRequest = z.infer<typeof RefreshRequest>;

/** `POST /api/auth/refresh` answers a fresh pair. */
export const RefreshResponse = TokenPair;
export type RefreshResponse = z.infer<typeof RefreshResponse>;

export const SignOutRequest = RefreshRequest;
export type SignOutRequest = z.infer<typeof SignOutRequest>;

/** `GET /api/me` answers the signed-in user with memberships. */
export const MeResponse = UserView;
export type MeResponse = z.infer<typeof MeResponse>;
