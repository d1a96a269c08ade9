/**
 * The one error type of the server and the one error middleware, registered last.
 * Every thrown thing becomes `{ error: { code, message, details } }` with the right status;
 * nothing leaks a stack trace (a 500 says "internal error" and the stack goes to the log).
 */
import type { ErrorRequestHandler, RequestHandler } from 'express';
import { ZodError } from 'zod';
import type { ApiError, ErrorCode, ValidationIssue } from '../shared/api/errors';

export class AppError extends Error {
  constructor(
    readonly status: number,
    readonly code: ErrorCode,
    message: string,
    readonly details: unknown = null,
  ) {
    super(message);
    this.name = 'AppError';
  }
}

/** zod issues → our validation details, and a message that names the fields. */
/** The message names at most this many fields; `details` carries the first MAX_DETAILS of them. */
export const MAX_NAMED = 10;
export const MAX_DETAILS = 200;

export function validationError(error: ZodError, where = 'request'): AppError {
  const all: ValidationIssue[] = error.issues.map((i) => ({
    path: i.path.map(String).join('.') || '(body)',
    message: i.message,
  }));
  const details = all.slice(0, MAX_DETAILS);
  const more = all.length - MAX_NAMED;
  const summary =
    all
      .slice(0, MAX_NAMED)
      .map((d) => `${d.path}: ${d.message}`)
      .join('; ') + (more > 0 ? `; and ${more} more problem${more === 1 ? '' : 's'}` : '');
  return new AppError(400, 'validation', `Invalid ${where}: ${summary}`, details);
}

/** body-parser (inside express.json) marks its errors with `type`; map them to our codes. */
interface HttpishError {
  type?: string;
  status?: number;
  statusCode?: number;
  expose?: boolean;
  limit?: number;
}

/** Seconds a client is asked to wait (Retry-After, RFC 9110 §10.2.3) when the database is unreachable. */
export const DB_RETRY_AFTER_S = 5;

/** Socket-level errors of the connection to PostgreSQL (node's net / the pg driver). */
const NET_CODES = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'ETIMEDOUT',
  'EPIPE',
  'EHOSTUNREACH',
  'ENETUNREACH',
  'ENOTFOUND',
  'EAI_AGAIN',
]);
/** SQLSTATEs of a database that is going away or not there yet (PostgreSQL Appendix A): class 08, 57P01–57P03, 53300. */
const PG_UNAVAILABLE = /^(08...|57P0[123]|53300)$/;
/** What pg and pg-pool say when the socket went away under a query or no connection came in time. */
const LOST_CONNECTION =
  /Connection terminated|connection error and is not queryable|timeout exceeded when trying to connect|Client was closed and is not queryable/i;

/**
 * True when `err` says the database cannot be reached right now (refused, restarting, shutting
 * down, connection lost mid-query): the request may succeed later, so it is a 503, not a 500.
 * TypeORM's QueryFailedError keeps the driver's error in `driverError`.
 */
export function isDbUnavailable(err: unknown): boolean {
  for (
    let e = err as { code?: unknown; message?: unknown; driverError?: unknown; cause?: unknown } | null, depth = 0;
    e && typeof e === 'object' && depth < 4;
    depth++
  ) {
    const code = typeof e.code === 'string' ? e.code : '';
    if (NET_CODES.has(code) || PG_UNAVAILABLE.test(code)) return true;
    if (typeof e.message === 'string' && LOST_CONNECTION.test(e.message)) return true;
    // node's AggregateError (a refused dual-stack connect) carries its reasons in `errors`
    const agg = (e as { errors?: unknown }).errors;
    if (Array.isArray(agg) && agg.some((x) => isDbUnavailable(x))) return true;
    e = (e.driverError ?? e.cause ?? null) as typeof e;
  }
  return false;
}

export const dbUnavailable = () =>
  new AppError(
    503,
    'db_unavailable',
    `Database is unreachable; retry in ${DB_RETRY_AFTER_S} s (pushes are idempotent: resend the same batch)`,
    {
      retryAfterS: DB_RETRY_AFTER_S,
    },
  );

function toAppError(err: unknown): AppError | null {
  if (err instanceof AppError) return err;
  if (isDbUnavailable(err)) return dbUnavailable();
  if (err instanceof ZodError) return validationError(err);
  if (typeof err !== 'object' || err === null) return null;
  const e = err as HttpishError & { message?: string };
  switch (e.type) {
    case 'entity.parse.failed':
      return new AppError(400, 'bad_json', 'Request body is not valid JSON');
    case 'entity.too.large':
      return new AppError(
        413,
        'too_large',
        `Request body is larger than the limit of ${e.limit ?? 'the server'} bytes`,
        {
          limit: e.limit ?? null,
        },
      );
    case 'encoding.unsupported':
    case 'charset.unsupported':
      return new AppError(415, 'unsupported_media_type', e.message ?? 'Unsupported encoding');
  }
  const status = e.status ?? e.statusCode;
  if (typeof status === 'number' && status >= 400 && status < 500 && e.expose !== false) {
    const code: ErrorCode = status === 404 ? 'not_found' : status === 413 ? 'too_large' : 'bad_request';
    return new AppError(status, code, e.message || 'Bad request');
  }
  return null;
}

export function errorBody(e: AppError): ApiError {
  return { error: { code: e.code, message: e.message, details: e.details ?? null } };
}

export const errorMiddleware: ErrorRequestHandler = (err, req, res, next) => {
  if (res.headersSent) return next(err);
  const known = toAppError(err);
  const appError = known ?? new AppError(500, 'internal', 'internal error');
  if (appError.status >= 500) {
    // The stack goes to the log only, with the request id so the two can be matched.
    if (appError.code === 'db_unavailable') req.log?.warn({ err }, 'request failed: database unreachable');
    else req.log?.error({ err }, 'request failed');
  }
  // A 503 says when to come back (RFC 9110 §15.6.4, Retry-After §10.2.3).
  if (appError.status === 503 && !res.getHeader('Retry-After')) res.setHeader('Retry-After', String(DB_RETRY_AFTER_S));
  res.status(appError.status).json(errorBody(appError));
};

/** Unknown /api route → 404 JSON (never the web app's index.html). */
export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(new AppError(404, 'not_found', `No API route ${req.method} ${req.originalUrl.split('?')[0]}`));
};
