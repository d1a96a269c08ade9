/**
 * Pruning refresh-token rows that can never be used again, on a pg-boss schedule.
 *
 * A row goes when it expired more than PRUNE_GRACE_MS ago (spent or not, it can no longer
 * refresh), or when it was retired more than PRUNE_GRACE_MS ago and its whole family (the sign-in
 * it came from) holds no live token any more (signed out, password changed, reuse detected). A
 * retired token of a family that still lives is kept until it expires: presenting it again is the
 * sign of a leaked token, and the reuse detection of ./service.ts needs the row to see it.
 *
 * The job `prune-refresh-tokens` runs at minute 17 of every hour (cron, UTC) in whichever process
 * runs workers; pg-boss keeps one run per slot across processes.
 */
import type PgBoss from 'pg-boss';
import type { DataSource } from 'typeorm';
import type { Logger } from '../logger';

export const PRUNE_QUEUE = 'prune-refresh-tokens';
export const PRUNE_CRON = '17 * * * *';
/** How long a retired or expired row is kept after it stopped working (one day). */
export const PRUNE_GRACE_MS = 24 * 3600 * 1000;

/** Deletes the refresh-token rows described above; returns how many went. */
export async function pruneRefreshTokens(ds: DataSource, now = new Date(), graceMs = PRUNE_GRACE_MS): Promise<number> {
  const before = new Date(now.getTime() - graceMs);
  const res = (await ds.query(
    `DELETE FROM "refresh_tokens" t
      WHERE t."expires_at" < $2
         OR (t."revoked_at" < $2
             AND NOT EXISTS (SELECT 1 FROM "refresh_tokens" l
                              WHERE l."family_id" = t."family_id" AND l."revoked_at" IS NULL AND l."expires_at" > $1))`,
    [now, before],
  )) as [unknown[], number];
  return res[1];
}

/** Creates the queue, puts it on its schedule and works it (the process must run pg-boss with `schedule: true`). */
export async function schedulePruning(boss: PgBoss, ds: DataSource, logger: Logger): Promise<void> {
  await boss.createQueue(PRUNE_QUEUE, { name: PRUNE_QUEUE, policy: 'short', retryLimit: 2 });
  await boss.schedule(PRUNE_QUEUE, PRUNE_CRON, {}, { tz: 'UTC' });
  await boss.work(PRUNE_QUEUE, async () => {
    const deleted = await pruneRefreshTokens(ds);
    if (deleted) logger.info({ deleted }, 'pruned refresh tokens that can no longer be used');
    return { deleted };
  });
}
