/**
 *   GET /api/sites/:siteId/instruments?unitId=&status=&q=                planners, engineers, admins → InstrumentListResponse
 *   GET /api/sites/:siteId/instruments/:tag/history?from=&to=&unitId=    planners, engineers, admins → InstrumentHistoryResponse
 *   PATCH /api/sites/:siteId/instruments/:instrumentId  InstrumentUpdateRequest  admins → InstrumentUpdateResponse
 *   GET /api/sites/:siteId/detectability?unitId=                         engineers, admins → DetectabilityResponse
 *
 * A configuration change is logged as an audit line (who, which instrument, each field before →
 * after); the row's sync_version moves, so the next pull carries it to the phones.
 */
import { Router } from 'express';
import { InstrumentHistoryQuery, InstrumentListQuery } from '../../shared/api/analysis';
import { DetectabilityQuery } from '../../shared/api/detectability';
import { InstrumentUpdateRequest } from '../../shared/api/instruments';
import { authOf, requireAuth, requireSiteRole, siteOf } from '../auth/middleware';
import { deps } from '../context';
import { parseBody } from '../http/validate';
import { READ_ROLES, parseQuery } from '../work-orders/routes';
import { siteDetectability } from './detectability';
import { instrumentHealth, instrumentHistory, updateInstrument } from './service';

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

  r.get('/:siteId/detectability', requireSiteRole('engineer', 'admin'), async (req, res) => {
    const q = parseQuery(DetectabilityQuery, req);
    res.json(await siteDetectability(deps(req).dataSource, siteOf(req).siteId, q.unitId));
  });

  r.patch('/:siteId/instruments/:instrumentId', requireSiteRole('admin'), async (req, res) => {
    const body = parseBody(InstrumentUpdateRequest, req);
    const { dataSource, logger } = deps(req);
    const { siteId } = siteOf(req);
    const out = await updateInstrument(dataSource, siteId, String(req.params.instrumentId), body);
    if (Object.keys(out.changes).length) {
      logger.info(
        {
          audit: 'instrument.update',
          siteId,
          instrumentId: out.instrument.id,
          tag: out.instrument.tag,
          by: authOf(req).userId,
          changes: out.changes,
        },
        `instrument ${out.instrument.tag} changed`,
      );
    }
    res.json(out);
  });

  return r;
}
