/** /api/auth/* and /api/me: parse, call the use case, respond. */
import { Router } from 'express';
import { rateLimit } from 'express-rate-limit';
import { RefreshRequest, SignInRequest, SignOutRequest } from '../../shared/api/auth';
import type { Config } from '../config';
import { deps } from '../context';
import { AppError } from '../errors';
import { parseBody } from '../http/validate';
import { authOf, requireAuth } from './middleware';
import { loadUserView, refreshTokens, signIn, signOut } from './service';

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
    res.json(await signIn(dataSource, config, input));
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
