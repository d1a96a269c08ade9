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
    all.slice(0, MAX_NAMED).map((d) => `${d.path}: ${d.message}`).join('; ') + (more > 0 ? `; and ${more} more problem${more === 1 ? '' : 's'}` : '');
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

function toAppError(err: unknown): AppError | null {
  if (err instanceof AppError) return err;
  if (err instanceof ZodError) return validationError(err);
  if (typeof err !== 'object' || err === null) return null;
  const e = err as HttpishError & { message?: string };
  switch (e.type) {
    case 'entity.parse.failed':
      return new AppError(400, 'bad_json', 'Request body is not valid JSON');
    case 'entity.too.large':
      return new AppError(413, 'too_large', `Request body is larger than the limit of ${e.limit ?? 'the server'} bytes`, {
        limit: e.limit ?? null,
      });
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
    req.log?.error({ err }, 'request failed');
  }
  res.status(appError.status).json(errorBody(appError));
};

/** Unknown /api route → 404 JSON (never the web app's index.html). */
export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(new AppError(404, 'not_found', `No API route ${req.method} ${req.originalUrl.split('?')[0]}`));
};
