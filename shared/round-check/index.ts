/**
 * The round check before leaving the unit: the same assembly and analysis on the phone and on
 * the server. Pure, browser-safe.
 */
export {
  assembleRoundCheck,
  RoundCheckInputError,
  ROUND_CHECK_WINDOW_HOURS,
  HISTORY_ROUNDS,
  type AssembledRoundCheck,
  type BorrowedRound,
  type NotRead,
  type ReadingSource,
  type RoundCheckDismissal,
  type RoundCheckInput,
  type RoundCheckReading,
  type CheckedRound,
  type RoundCheckRouteInfo,
  type RoundCheckStop,
} from './assemble';
export {
  checkRound,
  roundCheckFingerprint,
  type BalanceLine,
  type BalanceStatus,
  type RetakeItem,
  type RoundCheck,
  type SuspectView,
} from './check';
export { roundsFromRows, stopsOf, BAROMETER_MIN_PA, BAROMETER_MAX_PA, type ReadingRow, type RoundRow } from './rows';
