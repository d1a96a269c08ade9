/**
 * Refuses text PostgreSQL cannot store as sent, anywhere in a request's JSON body or query string,
 * before any handler runs:
 *  - a NUL character (U+0000): text and jsonb cannot hold it (SQLSTATE 22021 / 22P05), so it
 *    would otherwise surface as a 500 halfway through a write;
 *  - a lone UTF-16 surrogate (JSON allows "\ud800"): it has no UTF-8 form, and the driver would
 *    store U+FFFD in its place — silently not what was sent.
 * The 400 names the field, as a schema refusal does (server/errors.ts validationError), and at
 * most MAX_NAMED of them.
 */
import type { NextFunction, Request, Response } from 'express';
import { AppError } from '../errors';

const MAX_NAMED = 10;
const NUL = 'must not contain a NUL character (U+0000)';
const SURROGATE = 'must be well-formed Unicode (a lone surrogate such as \\ud800 cannot be stored)';

interface Bad {
  path: string;
  message: string;
}

const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

function problemOf(text: string): string | null {
  if (text.includes('\u0000')) return NUL;
  if (LONE_SURROGATE.test(text)) return SURROGATE;
  return null;
}

function collect(value: unknown, path: string[], out: Bad[], depth = 0): void {
  if (out.length >= MAX_NAMED || depth > 64) return;
  if (typeof value === 'string') {
    const message = problemOf(value);
    if (message) out.push({ path: path.join('.') || '(body)', message });
    return;
  }
  if (Array.isArray(value)) {
    value.forEach((v, i) => collect(v, [...path, String(i)], out, depth + 1));
    return;
  }
  if (value && typeof value === 'object') {
    for (const [k, v] of Object.entries(value)) {
      const message = problemOf(k);
      const shown = message ? JSON.stringify(k).slice(1, -1) : k;
      if (message) out.push({ path: [...path, shown].join('.'), message });
      collect(v, [...path, shown], out, depth + 1);
    }
  }
}

export function refuseUnstorableText(req: Request, _res: Response, next: NextFunction): void {
  const inBody: Bad[] = [];
  collect(req.body, [], inBody);
  const inQuery: Bad[] = [];
  collect(req.query, [], inQuery);
  const where = inBody.length ? 'request body' : 'query';
  const details = inBody.length ? inBody : inQuery;
  if (details.length === 0) return next();
  next(
    new AppError(
      400,
      'validation',
      `Invalid ${where}: ${details.map((d) => `${d.path}: ${d.message}`).join('; ')}`,
      details,
    ),
  );
}
