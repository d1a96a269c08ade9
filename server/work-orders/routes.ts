/**
 * /api/sites/:siteId/work-orders — thin handlers: parse, authorise, call ./service.ts, respond.
 *   GET  …/work-orders                      planners, engineers, admins  → WorkOrderListResponse
 *   GET  …/work-orders/:id                  planners, engineers, admins  → WorkOrderDetail (summary + newest evidence)
 *   GET  …/work-orders/:id/evidence?offset=&limit=   the same roles     → EvidencePage (by round, newest first)
 *   POST …/work-orders/:id/<action>         planners, admins             → WorkOrderDetail
 * A member with another role gets 403; someone not on the site 404 (requireSiteRole).
 */
import { Router, type Request } from 'express';
import type { z } from 'zod';
import type { Role } from '../../shared/api/auth';
import {
  AssignRequest,
  CancelRequest,
  CloseRequest,
  CommentRequest,
  EvidencePageQuery,
  MergeRequest,
  ScheduleRequest,
  StartRequest,
  TriageRequest,
  WorkOrderListQuery,
  type WorkOrderAction,
} from '../../shared/api/work-orders';
import { authOf, requireAuth, requireSiteRole, siteOf } from '../auth/middleware';
import { deps } from '../context';
import { AppError, validationError } from '../errors';
import { parseBody } from '../http/validate';
import { actOnWorkOrder, type ActionBody } from './actions';
import { evidencePage, getWorkOrder, listWorkOrders } from './queries';

/** Who reads work orders, instruments, analyses and exports. */
export const READ_ROLES: readonly Role[] = ['planner', 'engineer', 'admin'];
/** Who moves work orders. */
export const ACT_ROLES: readonly Role[] = ['planner', 'admin'];

export function parseQuery<S extends z.ZodType>(schema: S, req: Request): z.output<S> {
  const r = schema.safeParse(req.query);
  if (!r.success) throw validationError(r.error, 'query');
  return r.data;
}

const BODIES: { [A in WorkOrderAction]: z.ZodType } = {
  triage: TriageRequest,
  assign: AssignRequest,
  schedule: ScheduleRequest,
  start: StartRequest,
  close: CloseRequest,
  cancel: CancelRequest,
  merge: MergeRequest,
  comment: CommentRequest,
};

export function workOrdersRouter(): Router {
  const r = Router();
  r.use(requireAuth);

  r.get('/:siteId/work-orders', requireSiteRole(...READ_ROLES), async (req, res) => {
    const q = parseQuery(WorkOrderListQuery, req);
    res.json(await listWorkOrders(deps(req).dataSource, siteOf(req).siteId, q));
  });

  r.get('/:siteId/work-orders/:id', requireSiteRole(...READ_ROLES), async (req, res) => {
    res.json(await getWorkOrder(deps(req).dataSource, siteOf(req).siteId, String(req.params.id)));
  });

  r.get('/:siteId/work-orders/:id/evidence', requireSiteRole(...READ_ROLES), async (req, res) => {
    const q = parseQuery(EvidencePageQuery, req);
    res.json(await evidencePage(deps(req).dataSource, siteOf(req).siteId, String(req.params.id), q));
  });

  r.post('/:siteId/work-orders/:id/:action', requireSiteRole(...ACT_ROLES), async (req, res) => {
    const action = String(req.params.action) as WorkOrderAction;
    const schema = BODIES[action];
    if (!Object.hasOwn(BODIES, action) || !schema) {
      throw new AppError(
        404,
        'not_found',
        `No work-order action "${action}": use one of ${Object.keys(BODIES).join(', ')}`,
      );
    }
    const body = parseBody(schema, req);
    const { dataSource, logger, notify } = deps(req);
    const out = await actOnWorkOrder(
      { dataSource, logger, notify },
      siteOf(req).siteId,
      String(req.params.id),
      authOf(req).userId,
      {
        action,
        body,
      } as ActionBody,
    );
    res.json(out);
  });

  return r;
}
