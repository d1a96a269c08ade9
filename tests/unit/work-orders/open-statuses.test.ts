/**
 * One list of closed statuses (server/entities/work-order.ts) behind every "open order" test:
 * the policy's isClosed, the repository's SQL, and the partial unique indexes the first
 * work-order migration wrote by hand (which the SQL must match literally for the planner to use them).
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { WORK_ORDER_STATUSES } from '../../../shared/api/work-orders';
import { CLOSED_STATUSES, isClosed } from '../../../server/work-orders/policy';
import { openStatusSql } from '../../../server/work-orders/repository';

describe('open work orders', () => {
  it('are every status but done and cancelled', () => {
    expect(WORK_ORDER_STATUSES.filter((s) => !isClosed(s))).toEqual(['open', 'triaged', 'scheduled', 'in-progress']);
    expect([...CLOSED_STATUSES]).toEqual(['done', 'cancelled']);
  });

  it('are selected by the same predicate the partial unique indexes were created with', () => {
    const migration = readFileSync(
      path.join(__dirname, '../../../server/migrations/1764806400000-analysis-and-work-orders.ts'),
      'utf8',
    );
    expect(openStatusSql()).toBe(`"status" NOT IN ('done', 'cancelled')`);
    expect(migration).toContain(`WHERE ${openStatusSql()} AND "instrument_id" IS NOT NULL`);
    expect(openStatusSql('w')).toBe(`w."status" NOT IN ('done', 'cancelled')`);
  });
});
