/**
 * /api/sync — the device's outbox goes up (push), reference data comes down (pull).
 *   POST /api/sync/push                 PushRequest → PushResponse (200)
 *   GET  /api/sync/pull?siteId=&cursor=  → PullResponse
 */
import { Router } from 'express';
import { PullQuery, PushRequest, type PushResponse } from '../../shared/api/sync';
import { authOf, requireAuth } from '../auth/middleware';
import { deps } from '../context';
import { MembershipEntity } from '../entities';
import { AppError, validationError } from '../errors';
import { parseBody } from '../http/validate';
import { PUSH_ROLES } from './access';
import { noopSyncHooks, type SyncHooks } from './hooks';
import { pullChanges } from './pull';
import { pushBatch } from './push';

export function syncRouter(hooks: SyncHooks = noopSyncHooks): Router {
  const r = Router();
  r.use(requireAuth);

  r.post('/push', async (req, res) => {
    const { userId } = authOf(req);
    const { dataSource, logger } = deps(req);
    const receivedAt = new Date();
    // Who may push at all, before reading the batch: a push role on some site.
    const memberships = await dataSource.getRepository(MembershipEntity).find({ where: { userId } });
    if (!memberships.some((m) => PUSH_ROLES.includes(m.role))) {
      throw new AppError(
        403,
        'forbidden',
        `Pushing rounds needs the role ${PUSH_ROLES.join(', ')} on a site; you have none`,
      );
    }
    const batch = parseBody(PushRequest, req);
    const { response, roundIds } = await pushBatch(dataSource, userId, batch, receivedAt);
    if (roundIds.length) {
      try {
        await hooks.onRoundsPushed(roundIds);
      } catch (err) {
        logger.error({ err, roundIds }, 'onRoundsPushed hook failed after a stored push');
      }
    }
    res.json(response satisfies PushResponse);
  });

  r.get('/pull', async (req, res) => {
    const { userId } = authOf(req);
    const q = PullQuery.safeParse(req.query);
    if (!q.success) throw validationError(q.error, 'query');
    const { dataSource } = deps(req);
    const member = await dataSource
      .getRepository(MembershipEntity)
      .findOne({ where: { userId, siteId: q.data.siteId } });
    if (!member) throw new AppError(404, 'not_found', 'Site not found');
    res.json(await pullChanges(dataSource, q.data.siteId, q.data.cursor));
  });

  return r;
}
