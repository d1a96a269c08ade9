/**
 *   GET /api/sites/:siteId/instruments?unitId=&status=&q=                planners, engineers, admins → InstrumentListResponse
 *   GET /api/sites/:siteId/instruments/:tag/history?from=&to=&unitId=    planners, engineers, admins → InstrumentHistoryResponse
 */
import { Router } from 'express';
import { InstrumentHistoryQuery, InstrumentListQuery } from '../../shared/api/analysis';
import { requireAuth, requireSiteRole, siteOf } from '../auth/middleware';
import { deps } from '../context';
import { READ_ROLES, parseQuery } from '../work-orders/routes';
import { instrumentHealth, instrumentHistory } from './service';

export function instrumentsRouter(): Router {
  const r = Router();
  r.use(requireAuth);

  r.get('/:siteId/instruments', requireSiteRole(...READ_ROLES), async (req, res) => {
    const q = parseQuery(InstrumentListQuery, req);
    res.json(await instrumentHealth(deps(req).dataSource, siteOf(req).siteId, q));
  });

  r.get('/:siteId/instruments/:tag/history', requireSiteRole(...READ_ROLES), async (req, res) => {
    const q = parseQuery(InstrumentHistoryQuery, req);
    res.json(await instrumentHistory(deps(req).dataSource, siteOf(req).siteId, String(req.params.tag), q));
  });

  return r;
}
