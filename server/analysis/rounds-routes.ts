/**
 *   GET /api/sites/:siteId/rounds?analysed=1&page=&limit=   planners, engineers → AnalysedRoundsResponse
 *
 * The site's rounds with a current analysis, newest first (device start time, then id), with the
 * counts of the analysis' findings by severity and the model-version mismatch flag (./rounds.ts).
 */
import { Router } from 'express';
import { AnalysedRoundsQuery } from '../../shared/api/rounds';
import { requireAuth, requireSiteRole, siteOf } from '../auth/middleware';
import { deps } from '../context';
import { validationError } from '../errors';
import { analysedRounds } from './rounds';

/** Who may list analysed rounds. */
export const ROUND_LIST_ROLES = ['planner', 'engineer'] as const;

export function roundsRouter(): Router {
  const r = Router();
  r.use(requireAuth);

  r.get('/:siteId/rounds', requireSiteRole(...ROUND_LIST_ROLES), async (req, res) => {
    const q = AnalysedRoundsQuery.safeParse(req.query);
    if (!q.success) throw validationError(q.error, 'query');
    res.json(await analysedRounds(deps(req).dataSource, siteOf(req).siteId, q.data.page, q.data.limit));
  });

  return r;
}
