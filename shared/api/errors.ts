/**
 * The one error shape every Trueround API response uses when something goes wrong:
 *   { "error": { "code": "validation", "message": "Invalid request: email: Required", "details": [...] } }
 * Pure zod: imported by the server (to build it) and the app (to read it).
 */
import { z } from 'zod';

/** Codes the server sends. The app may branch on these; the message is for people. */
export const ERROR_CODES = [
  'bad_request',
  'bad_json',
  'validation',
  'unsupported_media_type',
  'too_large',
  'unauthorized',
  'bad_credentials',
  'account_disabled',
  'forbidden',
  'not_found',
  'conflict',
  'rate_limited',
  'db_unavailable',
  'storage_unavailable',
  'internal',
] as const;
export type ErrorCode = (typeof ERROR_CODES)[number];

/** One problem with one field of a request, `path` dotted ("email", "items.3.value"). */
export const ValidationIssue = z.object({
  path: z.string(),
  message: z.string(),
});
export type ValidationIssue = z.infer<typeof ValidationIssue>;

export const ApiError = z.object({
  error: z.object({
    code: z.string().min(1),
    message: z.string(),
    /** For `validation`: ValidationIssue[]; otherwise null or code-specific data. */
    details: z.unknown(),
  }),
});
export type ApiError = z.infer<typeof ApiError>;
