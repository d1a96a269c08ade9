/**
 * What the server tells people about, as an interface: the work-order and analysis code calls it,
 * the e-mail code (server/mail/) implements it. Every call happens after the transaction that
 * made the change has committed, and through `notifySafely`, so a failing notifier is logged and
 * never undoes or fails a work order or an analysis. Implementations queue their own retries.
 *
 *  - workOrderOpened(id): a priority-1 work order was opened (or reopened) by an analysis;
 *  - assigned(id, userId): a planner assigned a work order to that site member;
 *  - findingsStored(roundId): a new analysis of the round and its findings are stored.
 */
import type { Logger } from './logger';

export interface Notifier {
  workOrderOpened(workOrderId: string): void | Promise<void>;
  assigned(workOrderId: string, userId: string): void | Promise<void>;
  findingsStored(roundId: string): void | Promise<void>;
}

/** Runs one notification; a throw or a rejection is logged with `what`, never passed on. */
export async function notifySafely(logger: Logger, what: string, call: () => void | Promise<void>): Promise<void> {
  try {
    await call();
  } catch (err) {
    logger.error({ err, notification: what }, 'notification failed (the change it reports is stored)');
  }
}
