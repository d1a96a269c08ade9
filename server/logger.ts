/**
 * pino logger and pino-http request logging. Requests are logged by id, method, path and status;
 * headers and bodies are not, so no Authorization header, cookie, password or token reaches a log.
 * The redaction paths are a second guard for anything logged by hand.
 */
import { randomUUID } from 'node:crypto';
import type { IncomingMessage, ServerResponse } from 'node:http';
import pino, { type DestinationStream, type Logger } from 'pino';
import { pinoHttp } from 'pino-http';
import type { Config } from './config';

export type { Logger };

/** Secret-bearing keys, redacted at the top level, one level down and two levels down. */
const SECRET_KEYS = [
  'password',
  'passwordHash',
  'password_hash',
  'currentPassword',
  'newPassword',
  'accessToken',
  'refreshToken',
  'tokenHash',
  'token',
  'JWT_SECRET',
  'PHOTO_S3_SECRET_ACCESS_KEY',
  'SMTP_URL',
  'DATABASE_URL',
];

export const REDACT_PATHS = [
  'req.headers.authorization',
  'req.headers.cookie',
  'headers.authorization',
  'headers.cookie',
  'authorization',
  '*.authorization',
  ...SECRET_KEYS,
  ...SECRET_KEYS.map((k) => `*.${k}`),
  ...SECRET_KEYS.map((k) => `*.*.${k}`),
];

export function makeLogger(config: Pick<Config, 'LOG_LEVEL'>, destination?: DestinationStream): Logger {
  const options = {
    level: config.LOG_LEVEL,
    base: { service: 'trueround-server' },
    redact: { paths: REDACT_PATHS, censor: '[redacted]' },
  };
  return destination ? pino(options, destination) : pino(options);
}

export function httpLogger(logger: Logger) {
  return pinoHttp({
    logger,
    genReqId: (req: IncomingMessage, res: ServerResponse) => {
      const id = randomUUID();
      res.setHeader('X-Request-Id', id);
      return id;
    },
    customLogLevel: (_req, res, err) =>
      err || res.statusCode >= 500 ? 'error' : res.statusCode >= 400 ? 'warn' : 'info',
    serializers: {
      req: (req: { id: unknown; method: string; url: string; remoteAddress?: string }) => ({
        id: req.id,
        method: req.method,
        // The path only: a query string could carry something private.
        path: String(req.url).split('?')[0],
        remoteAddress: req.remoteAddress,
      }),
      res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
    },
  });
}
