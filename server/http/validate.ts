import type { Request } from 'express';
import type { z } from 'zod';
import { AppError, validationError } from '../errors';

/**
 * Parses the JSON body with a wire schema. A missing body counts as `{}` so the error names
 * the missing fields; a body that is not JSON at all is refused with 415.
 */
export function parseBody<S extends z.ZodType>(schema: S, req: Request): z.output<S> {
  if (req.body === undefined && req.get('content-type') && !req.is('application/json')) {
    throw new AppError(415, 'unsupported_media_type', 'Send the request body as application/json');
  }
  const r = schema.safeParse(req.body ?? {});
  if (!r.success) throw validationError(r.error, 'request body');
  return r.data;
}
