/**
 * /api/sites/:siteId — site administration (admins only):
 *
 *   POST /api/sites/:siteId/invitations {email, name, role}        → 201 InvitationResult
 *   POST /api/sites/:siteId/routes/:routeId/versions {template}    → 201 PublishVersionResponse
 *
 * The wire schemas are in shared/api/admin.ts.
 */
import { Router } from 'express';
import {
  InvitationRequest,
  PublishVersionRequest,
  type InvitationResult,
  type PublishVersionResponse,
} from '../../shared/api/admin';
import { authOf, requireAuth, requireSiteRole, siteOf } from '../auth/middleware';
import { deps } from '../context';
import { AppError, validationError } from '../errors';
import { invite, publishVersion } from './service';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export function adminRouter(): Router {
  const r = Router();
  r.use(requireAuth);

  r.post('/:siteId/invitations', requireSiteRole('admin'), async (req, res) => {
    const body = InvitationRequest.safeParse(req.body);
    if (!body.success) throw validationError(body.error, 'invitation');
    const out: InvitationResult = await invite(deps(req).dataSource, siteOf(req).siteId, body.data);
    res.status(201).json(out);
  });

  r.post('/:siteId/routes/:routeId/versions', requireSiteRole('admin'), async (req, res) => {
    const routeId = String(req.params.routeId);
    if (!UUID.test(routeId)) throw new AppError(404, 'not_found', 'Route not found on this site');
    const body = PublishVersionRequest.safeParse(req.body);
    if (!body.success) throw validationError(body.error, 'route version');
    const out: PublishVersionResponse = await publishVersion(
      deps(req).dataSource,
      siteOf(req).siteId,
      routeId,
      body.data.template,
      authOf(req).userId,
    );
    res.status(201).json(out);
  });

  return r;
}
