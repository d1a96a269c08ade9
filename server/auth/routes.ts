/**
 * /api/auth/* and /api/me: parse, call the use case, respond.
 *   POST /api/auth/sign-in  {email, password}                 → SignInResponse (429 when the address or the account is locked out)
 *   POST /api/auth/refresh  {refreshToken}                    → TokenPair
 *   POST /api/auth/sign-out {refreshToken}                    → 204 (signed in)
 *   POST /api/auth/password {currentPassword, newPassword}    → TokenPair, every other session ended (signed in)
 *   GET  /api/me                                              → UserView (signed in)
 * The password request schema lives here until it moves to shared/api.
 */
import { Router, type Response } from 'express';
import { z } from 'zod';
import { rateLimit } from 'express-rate-limit';
import { RefreshRequest, SignInRequest, SignOutRequest } from '../../shared/api/auth';
import type { Config } from '../config';
import { deps } from '../context';
import { AppError } from '../errors';
import { parseBody } from '../http/validate';
import { authOf, requireAuth } from './middleware';
import { PASSWORD_MAX } from './password-policy';
import { changePassword, loadUserView, refreshTokens, signIn, signOut } from './service';

const passwordText = (max: number) =>
  z
    .string({ error: (iss) => (iss.input === undefined ? 'Required' : 'Must be a string') })
    .min(1, 'Required')
    .max(max, `Must be at most ${max} characters`);

export const ChangePasswordRequest = z.object({
  currentPassword: passwordText(1024),
  // The policy (length, common passwords, the e-mail) is checked by the use case with the account at hand.
  newPassword: passwordText(PASSWORD_MAX * 2).refine((p) => !p.includes('\u0000'), 'Must not contain NUL characters'),
});

/** RFC 9110 §10.2.3 Retry-After on a 429 whose details say how long to wait. */
function withRetryAfter(res: Response, err: unknown): never {
  const d = err instanceof AppError ? (err.details as { retryAfterS?: unknown } | null) : null;
  if (err instanceof AppError && err.status === 429 && typeof d?.retryAfterS === 'number')
    res.setHeader('Retry-After', String(d.retryAfterS));
  throw err;
}

const WINDOW_MS = 15 * 60 * 1000;

/** Failed sign-ins per 15 min per client IP (successful ones are not counted). */
function signInLimiter(config: Config) {
  return rateLimit({
    windowMs: WINDOW_MS,
    limit: config.SIGN_IN_RATE_LIMIT,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    skipSuccessfulRequests: true,
    handler: (_req, _res, next) => {
      next(new AppError(429, 'rate_limited', 'Too many sign-in attempts from this address; try again in 15 minutes'));
    },
  });
}

export function authRouter(config: Config): Router {
  const r = Router();

  r.post('/sign-in', signInLimiter(config), async (req, res) => {
    const input = parseBody(SignInRequest, req);
    const { config, dataSource } = deps(req);
    res.json(await signIn(dataSource, config, input).catch((err: unknown) => withRetryAfter(res, err)));
  });

  r.post('/refresh', async (req, res) => {
    const { refreshToken } = parseBody(RefreshRequest, req);
    const { config, dataSource } = deps(req);
    res.json(await refreshTokens(dataSource, config, refreshToken));
  });

  r.post('/sign-out', requireAuth, async (req, res) => {
    const { refreshToken } = parseBody(SignOutRequest, req);
    await signOut(deps(req).dataSource, authOf(req).userId, refreshToken);
    res.status(204).end();
  });

  r.post('/password', requireAuth, async (req, res) => {
    const input = parseBody(ChangePasswordRequest, req);
    const { config, dataSource } = deps(req);
    res.json(
      await changePassword(dataSource, config, authOf(req).userId, input).catch((err: unknown) =>
        withRetryAfter(res, err),
      ),
    );
  });

  return r;
}

export function meRouter(): Router {
  const r = Router();
  r.get('/', requireAuth, async (req, res) => {
    const me = await loadUserView(deps(req).dataSource, authOf(req).userId);
    if (!me) throw new AppError(401, 'unauthorized', 'This account no longer exists or is disabled');
    res.json(me);
  });
  return r;
}
