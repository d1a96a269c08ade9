/**
 * The round check before leaving the unit: the same assembly and analysis on the phone and on
 * the server. Pure, browser-safe.
 */
export {
  assembleReview,
  ReviewInputError,
  REVIEW_WINDOW_HOURS,
  HISTORY_ROUNDS,
  type AssembledReview,
  type BorrowedRound,
  type NotRead,
  type ReadingSource,
  type ReviewDismissal,
  type ReviewInput,
  type ReviewReading,
  type ReviewRound,
  type ReviewRouteInfo,
  type ReviewStop,
} from './assemble';
export { reviewRound, reviewFingerprint, type BalanceLine, type BalanceStatus, type RetakeItem, type RoundReview, type SuspectView } from './review';
export { roundsFromRows, stopsOf, BAROMETER_MIN_PA, BAROMETER_MAX_PA, type ReadingRow, type RoundRow } from './rows';
