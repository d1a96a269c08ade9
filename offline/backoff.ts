/**
 * Retry delays: exponential backoff with full jitter (common practice; the scheme is the
 * "full jitter" variant described in the AWS Architecture Blog's "Exponential Backoff And
 * Jitter", 2015): attempt n (0-based) waits a uniformly random time in [0, min(cap, base·2ⁿ)).
 * The random source is injected so the schedule is deterministic under test.
 */
export interface BackoffPolicy {
  /** First ceiling, ms. */
  baseMs: number;
  /** Largest ceiling, ms. */
  capMs: number;
}

export const DEFAULT_BACKOFF: BackoffPolicy = { baseMs: 1_000, capMs: 5 * 60_000 };

/** The ceiling of attempt `attempt`: min(cap, base·2^attempt). */
export function backoffCeiling(attempt: number, policy: BackoffPolicy = DEFAULT_BACKOFF): number {
  if (!Number.isInteger(attempt) || attempt < 0) {
    throw new RangeError(`backoff attempt must be an integer ≥ 0, got ${attempt}`);
  }
  if (!(policy.baseMs > 0) || !(policy.capMs >= policy.baseMs)) {
    throw new RangeError(`backoff needs 0 < baseMs ≤ capMs, got baseMs=${policy.baseMs}, capMs=${policy.capMs}`);
  }
  // 2^attempt overflows to Infinity for large attempts; min() keeps the cap.
  return Math.min(policy.capMs, policy.baseMs * 2 ** Math.min(attempt, 1024));
}

/** Full-jitter delay for attempt `attempt`; `random()` returns a number in [0, 1). */
export function backoffDelay(attempt: number, random: () => number, policy: BackoffPolicy = DEFAULT_BACKOFF): number {
  const r = random();
  if (!(r >= 0 && r < 1)) throw new RangeError(`random() must return a number in [0, 1), got ${r}`);
  return Math.floor(r * backoffCeiling(attempt, policy));
}
