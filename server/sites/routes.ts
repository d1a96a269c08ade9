/** /api/sites/:siteId… — every route here runs behind requireAuth and a site-role guard. */
import { Router } from 'express';
import type { SiteMembersResponse } from '../../shared/api/sites';
import { requireAuth, requireSiteRole, siteOf } from '../auth/middleware';
import { deps } from '../context';
import { getSite, listMembers } from './service';

export function sitesRouter(): Router {
  const r = Router();
  r.use(requireAuth);

  r.get('/:siteId', requireSiteRole(), async (req, res) => {
    const { siteId, role } = siteOf(req);
    res.json(await getSite(deps(req).dataSource, siteId, role));
  });

  r.get('/:siteId/members', requireSiteRole('admin'), async (req, res) => {
    const body: SiteMembersResponse = { members: await listMembers(deps(req).dataSource, siteOf(req).siteId) };
    res.json(body);
  });

  // The people a work order can be assigned to: planners and engineers need this, not only admins.
  r.get('/:siteId/assignees', requireSiteRole('planner', 'engineer', 'admin'), async (req, res) => {
    const all = await listMembers(deps(req).dataSource, siteOf(req).siteId);
    const body: SiteMembersResponse = { members: all.filter((m) => !m.disabled) };
    res.json(body);
  });

  return r;
}
