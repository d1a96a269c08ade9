/**
 *   GET /api/sites/:siteId/rounds/:roundId/analysis   planners, engineers, admins → RoundAnalysisResponse
 *   GET /api/sites/:siteId/analysis-jobs?state=&limit= engineers, admins          → AnalysisJobsResponse
 */
import { Router } from 'express';
import { AnalysisJobsQuery } from '../../shared/api/analysis';
import { requireAuth, requireSiteRole, siteOf } from '../auth/middleware';
import { deps } from '../context';
import { READ_ROLES, parseQuery } from '../work-orders/routes';
import { analysisJobs, roundAnalysis } from './service';

export function analysisRouter(): Router {
  const r = Router();
  r.use(requireAuth);

  r.get('/:siteId/rounds/:roundId/analysis', requireSiteRole(...READ_ROLES), async (req, res) => {
    res.json(await roundAnalysis(deps(req).dataSource, siteOf(req).siteId, String(req.params.roundId)));
  });

  r.get('/:siteId/analysis-jobs', requireSiteRole('engineer', 'admin'), async (req, res) => {
    const q = parseQuery(AnalysisJobsQuery, req);
    res.json(await analysisJobs(deps(req).dataSource, siteOf(req).siteId, q.state, q.limit));
  });

  return r;
}
