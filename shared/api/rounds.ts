/**
 * Wire schemas of the site's analysed rounds. Pure zod.
 *
 *   GET /api/sites/:siteId/rounds?analysed=1&page=&limit=   planners, engineers → AnalysedRoundsResponse
 *
 * Newest first (by the round's start on the device, then id). Only analysed rounds are listed
 * for now, so `analysed=1` is required: a list of rounds still waiting is another question.
 */
import { z } from 'zod';

export const ANALYSED_ROUNDS_MAX_LIMIT = 100;
export const ANALYSED_ROUNDS_MAX_PAGE = 10_000;

const whole = (min: number, max: number) =>
  z
    .string({ error: `Must be a whole number from ${min} to ${max}` })
    .regex(/^\d{1,6}$/, `Must be a whole number from ${min} to ${max}`)
    .transform(Number)
    .pipe(z.number().min(min, `Must be at least ${min}`).max(max, `Must be at most ${max}`));

export const AnalysedRoundsQuery = z.object({
  analysed: z.literal('1', { error: 'Must be 1: only analysed rounds are listed' }),
  /** 1-based */
  page: whole(1, ANALYSED_ROUNDS_MAX_PAGE).default(1),
  limit: whole(1, ANALYSED_ROUNDS_MAX_LIMIT).default(25),
});
export type AnalysedRoundsQuery = z.output<typeof AnalysedRoundsQuery>;

export const FindingCounts = z.object({
  total: z.number().int().min(0),
  /** severity 1 */
  urgent: z.number().int().min(0),
  /** severity 2 */
  attend: z.number().int().min(0),
  /** severity 3 */
  note: z.number().int().min(0),
});
export type FindingCounts = z.infer<typeof FindingCounts>;

export const AnalysedRound = z.object({
  roundId: z.uuid(),
  analysisId: z.uuid(),
  routeId: z.uuid(),
  routeName: z.string(),
  unitId: z.uuid(),
  unitName: z.string(),
  /** device times of the round */
  startedAt: z.iso.datetime(),
  finishedAt: z.iso.datetime().nullable(),
  /** when the current analysis was stored */
  analysedAt: z.iso.datetime(),
  findings: FindingCounts,
  /** the phone recorded the round against another model version than the server analysed it with */
  modelVersionMismatch: z.boolean(),
});
export type AnalysedRound = z.infer<typeof AnalysedRound>;

export const AnalysedRoundsResponse = z.object({
  rounds: z.array(AnalysedRound),
  page: z.number().int().min(1),
  limit: z.number().int().min(1),
  /** analysed rounds of the site in all */
  total: z.number().int().min(0),
});
export type AnalysedRoundsResponse = z.infer<typeof AnalysedRoundsResponse>;
