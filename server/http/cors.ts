/**
 * CORS for the origins listed in CORS_ORIGINS only (the Expo dev server in `npm run dev`).
 * Bearer tokens, not cookies, carry the session, so credentials are not allowed.
 */
import type { RequestHandler } from 'express';

export function cors(origins: readonly string[]): RequestHandler {
  const allowed = new Set(origins);
  return (req, res, next) => {
    const origin = req.get('origin');
    // The answer depends on Origin whether or not it is allowed, so caches must key on it
    // (Fetch standard, "CORS protocol and HTTP caches").
    if (origin) res.vary('Origin');
    if (!origin || !allowed.has(origin)) return next();
    res.setHeader('Access-Control-Allow-Origin', origin);
    res.setHeader('Access-Control-Expose-Headers', 'X-Request-Id, RateLimit, RateLimit-Policy, Retry-After');
    if (req.method === 'OPTIONS' && req.get('access-control-request-method')) {
      res.setHeader('Access-Control-Allow-Methods', 'GET, POST, PUT, PATCH, DELETE');
      res.setHeader('Access-Control-Allow-Headers', 'Authorization, Content-Type, Idempotency-Key');
      res.setHeader('Access-Control-Max-Age', '600');
      res.status(204).end();
      return;
    }
    next();
  };
}
