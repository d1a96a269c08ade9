/**
 * requireAuth: a valid `Authorization: Bearer <access token>` of a user who still exists and is
 * not disabled, or 401 `unauthorized`. The user row is read on every request (one primary-key
 * lookup), so disabling an account ends its access at once, not when its token expires; a
 * request that passes several routers' requireAuth reads it once.
 * requireSiteRole(...roles): the caller's membership of `:siteId`. Not a member → 404
 * `not_found` (a site you do not belong to does not exist for you); a member without one of
 * the roles → 403 `forbidden`. No roles listed = any member.
 */
import type { Request, RequestHandler } from 'express';
import { z } from 'zod';
import type { Role } from '../../shared/api/auth';
import { deps, type AuthContext, type SiteContext } from '../context';
import { MembershipEntity, UserEntity } from '../entities';
import { AppError } from '../errors';
import { verifyAccessToken } from './tokens';

const unauthorized = (message: string) => new AppError(401, 'unauthorized', message);

export const requireAuth: RequestHandler = async (req, res, next) => {
  if (req.auth) return next(); // already checked by an earlier router of this request
  const header = req.get('authorization');
  if (!header) throw unauthorized('Sign in first: no access token was sent');
  const m = /^Bearer\s+(\S+)\s*$/i.exec(header);
  if (!m) throw unauthorized('Authorization header must be "Bearer <access token>"');
  const claims = verifyAccessToken(m[1], deps(req).config.JWT_SECRET);
  if (!claims) {
    res.setHeader('WWW-Authenticate', 'Bearer error="invalid_token"');
    throw unauthorized('Access token is invalid or expired');
  }
  const user = await deps(req)
    .dataSource.getRepository(UserEntity)
    .findOne({ where: { id: claims.userId }, select: { id: true, disabled: true } });
  if (!user || user.disabled) {
    res.setHeader('WWW-Authenticate', 'Bearer error="invalid_token"');
    throw unauthorized('This account no longer exists or is disabled');
  }
  req.auth = claims;
  next();
};

export function authOf(req: Request): AuthContext {
  if (!req.auth) throw new Error('authOf() used on a route without requireAuth');
  return req.auth;
}

export function siteOf(req: Request): SiteContext {
  if (!req.site) throw new Error('siteOf() used on a route without requireSiteRole');
  return req.site;
}

const SiteId = z.uuid();
const siteNotFound = () => new AppError(404, 'not_found', 'Site not found');

export function requireSiteRole(...roles: Role[]): RequestHandler {
  return async (req, _res, next) => {
    const { userId } = authOf(req);
    const raw = req.params.siteId;
    const siteId = SiteId.safeParse(raw);
    if (!siteId.success) throw siteNotFound();
    const membership = await deps(req)
      .dataSource.getRepository(MembershipEntity)
      .findOne({ where: { userId, siteId: siteId.data } });
    if (!membership) throw siteNotFound();
    if (roles.length > 0 && !roles.includes(membership.role)) {
      throw new AppError(
        403,
        'forbidden',
        `This needs the role ${roles.join(' or ')} on this site; you are ${membership.role}`,
      );
    }
    req.site = { siteId: siteId.data, role: membership.role };
    next();
  };
}
