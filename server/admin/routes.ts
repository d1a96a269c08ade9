/**
 * /api/sites/:siteId — site administration (admins only):
 *
 *   POST /api/sites/:siteId/invitations {email, name, role}        → 201 InvitationResult
 *   POST /api/sites/:siteId/routes/:routeId/versions {template}    → 201 {id, routeId, number, publishedAt}
 *
 * The request schemas live here until they move to shared/api.
 */
import { Router } from 'express';
import { z } from 'zod';
import { Email, Role } from '../../shared/api/auth';
import { authOf, requireAuth, requireSiteRole, siteOf } from '../auth/middleware';
import { deps } from '../context';
import { AppError, validationError } from '../errors';
import { invite, publishVersion } from './service';

export const InvitationRequest = z.object({
  email: Email,
  name: z.string({ error: 'Required' }).trim().min(1, 'Must not be empty').max(200, 'Must be at most 200 characters'),
  role: Role,
});

export const PublishVersionRequest = z.object({ template: z.unknown().refine((v) => v !== undefined, 'Required') });

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export function adminRouter(): Router {
  const r = Router();
  r.use(requireAuth);

  r.post('/:siteId/invitations', requireSiteRole('admin'), async (req, res) => {
    const body = InvitationRequest.safeParse(req.body);
    if (!body.success) throw validationError(body.error, 'invitation');
    res.status(201).json(await invite(deps(req).dataSource, siteOf(req).siteId, body.data));
  });

  r.post('/:siteId/routes/:routeId/versions', requireSiteRole('admin'), async (req, res) => {
    const routeId = String(req.params.routeId);
    if (!UUID.test(routeId)) throw new AppError(404, 'not_found', `Route ${routeId} not found`);
    const body = PublishVersionRequest.safeParse(req.body);
    if (!body.success) throw validationError(body.error, 'route version');
    res.status(201).json(await publishVersion(deps(req).dataSource, siteOf(req).siteId, routeId, body.data.template, authOf(req).userId));
  });

  return r;
}
