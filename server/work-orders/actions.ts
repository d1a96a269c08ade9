/**
 * The actions of the work-order flow (./policy.ts). Every action runs in one transaction holding the
 * order's row lock, writes a history event, and returns the order as it is after the commit
 * (./queries.ts). Notifications (assigned) go out after the commit and never fail the action.
 * One handler per action in ACTIONS; the SQL is in ./repository.ts.
 */
import type { DataSource, EntityManager } from 'typeorm';
import type {
  AssignRequest,
  CancelRequest,
  CloseRequest,
  CommentRequest,
  MergeRequest,
  ScheduleRequest,
  StartRequest,
  TriageRequest,
  WorkOrderAction,
  WorkOrderDetail,
} from '../../shared/api/work-orders';
import { resolveUnit, UnitError } from '../../shared/units';
import { AppError } from '../errors';
import type { Logger } from '../logger';
import { notifySafely, type Notifier } from '../notify';
import { lockSiteCounter } from './from-findings';
import { TRANSITIONS, isClosed, refusal } from './policy';
import { getWorkOrder, notFound, UUID_RE } from './queries';
import { calibrations, events, findings, orders, type LockedRow, type OrderSet } from './repository';

export interface ActionDeps {
  dataSource: DataSource;
  logger: Logger;
  notify?: Notifier;
}

export type ActionBody =
  | { action: 'triage'; body: TriageRequest }
  | { action: 'assign'; body: AssignRequest }
  | { action: 'schedule'; body: ScheduleRequest }
  | { action: 'start'; body: StartRequest }
  | { action: 'close'; body: CloseRequest }
  | { action: 'cancel'; body: CancelRequest }
  | { action: 'merge'; body: MergeRequest }
  | { action: 'comment'; body: CommentRequest };

type BodyOf<A extends WorkOrderAction> = Extract<ActionBody, { action: A }>['body'];

interface ActionContext {
  em: EntityManager;
  siteId: string;
  actorId: string;
  /** work to run after the commit (notifications) */
  after: (() => Promise<void>)[];
  deps: ActionDeps;
}

const todayUtc = () => new Date().toISOString().slice(0, 10);
const addDays = (date: string, n: number) =>
  new Date(Date.parse(`${date}T00:00:00Z`) + n * 86_400_000).toISOString().slice(0, 10);

function assertMay(action: WorkOrderAction, wo: LockedRow): void {
  const why = refusal(action, wo.status);
  if (why) {
    throw new AppError(409, 'conflict', `${wo.code} cannot ${action}: ${why}`, {
      workOrder: wo.code,
      action,
      status: wo.status,
      allowedFrom: TRANSITIONS[action]?.from ?? [],
    });
  }
}

async function lockOne(em: EntityManager, siteId: string, id: string): Promise<LockedRow> {
  if (!UUID_RE.test(id)) throw notFound();
  const [row] = await orders.lock(em, siteId, [id]);
  if (!row) throw notFound();
  return row;
}

/** A date the body may change, as set + changes entries when it differs. */
function dueDateChange(
  wo: LockedRow,
  dueDate: string | null | undefined,
  set: OrderSet,
  changes: Record<string, unknown>,
) {
  if (dueDate !== undefined && dueDate !== wo.due_date) {
    set.due_date = dueDate;
    changes.dueDate = { from: wo.due_date, to: dueDate };
  }
}

function validation(path: string, message: string, detail: string): AppError {
  return new AppError(400, 'validation', `Invalid request body: ${path}: ${detail}`, [{ path, message }]);
}

/** The calibration record a calibrate order closes with; returns the history's changes. */
async function recordCalibration(
  c: ActionContext,
  wo: LockedRow,
  cal: CloseRequest['calibration'],
): Promise<Record<string, unknown>> {
  if (!cal) {
    throw validation(
      'calibration',
      'Required to close a calibrate work order',
      'Required to close a calibrate work order (as found, as left, date)',
    );
  }
  if (cal.calibratedOn > addDays(todayUtc(), 1)) {
    throw validation(
      'calibration.calibratedOn',
      'Must not lie in the future',
      `${cal.calibratedOn} lies in the future`,
    );
  }
  const inst = await calibrations.lockInstrument(c.em, wo.instrument_id!);
  if (!inst) throw notFound();
  if (cal.unit !== undefined) {
    let same = false;
    try {
      same = resolveUnit(inst.quantity, cal.unit).unit === resolveUnit(inst.quantity, inst.gauge_unit).unit;
    } catch (e) {
      if (!(e instanceof UnitError)) throw e;
    }
    if (!same) {
      throw validation(
        'calibration.unit',
        `Must be the instrument's own unit, ${inst.gauge_unit}`,
        `${inst.tag} reads in ${inst.gauge_unit}, got "${cal.unit}"`,
      );
    }
  }
  const recordId = await calibrations.record(c.em, {
    workOrderId: wo.id,
    siteId: c.siteId,
    instrument: inst,
    asFound: cal.asFound,
    asLeft: cal.asLeft,
    calibratedOn: cal.calibratedOn,
    calibratedBy: c.actorId,
    note: cal.note ?? null,
  });
  return {
    calibrationRecordId: recordId,
    calibration: { asFound: cal.asFound, asLeft: cal.asLeft, unit: inst.gauge_unit, calibratedOn: cal.calibratedOn },
  };
}

type Handler<A extends WorkOrderAction> = (c: ActionContext, wo: LockedRow, body: BodyOf<A>) => Promise<void>;

const ACTIONS: { [A in Exclude<WorkOrderAction, 'merge'>]: Handler<A> } = {
  async triage({ em, actorId }, wo, body) {
    const set: OrderSet = { status: 'triaged' };
    const changes: Record<string, unknown> = {};
    if (body.priority !== undefined && body.priority !== wo.priority) {
      set.priority = body.priority;
      changes.priority = { from: wo.priority, to: body.priority };
    }
    dueDateChange(wo, body.dueDate, set, changes);
    await orders.update(em, wo.id, set);
    await events.add(em, wo.id, 'triaged', { actorId, from: wo.status, to: 'triaged', changes, comment: body.comment });
  },

  async assign({ em, siteId, actorId, after, deps }, wo, body) {
    if (!(await orders.isMember(em, siteId, body.userId))) {
      throw new AppError(400, 'validation', 'Invalid request body: userId: is not a member of this site', [
        { path: 'userId', message: 'Must be a member of the work order’s site' },
      ]);
    }
    await orders.update(em, wo.id, { assignee_id: body.userId });
    await events.add(em, wo.id, 'assigned', {
      actorId,
      changes: { assignee: { from: wo.assignee_id, to: body.userId } },
      comment: body.comment,
    });
    const { notify, logger } = deps;
    if (notify) after.push(() => notifySafely(logger, 'assigned', () => notify.assigned(wo.id, body.userId)));
  },

  async schedule({ em, actorId }, wo, body) {
    const set: OrderSet = { status: 'scheduled', scheduled_for: body.scheduledFor };
    const changes: Record<string, unknown> = { scheduledFor: { from: wo.scheduled_for, to: body.scheduledFor } };
    dueDateChange(wo, body.dueDate, set, changes);
    await orders.update(em, wo.id, set);
    await events.add(em, wo.id, 'scheduled', {
      actorId,
      from: wo.status,
      to: 'scheduled',
      changes,
      comment: body.comment,
    });
  },

  async start({ em, actorId }, wo, body) {
    await orders.update(em, wo.id, { status: 'in-progress' });
    await events.add(em, wo.id, 'started', { actorId, from: wo.status, to: 'in-progress', comment: body.comment });
  },

  async close(c, wo, body) {
    let changes: Record<string, unknown> = {};
    if (wo.kind === 'calibrate') changes = await recordCalibration(c, wo, body.calibration);
    else if (body.calibration) {
      throw validation(
        'calibration',
        'Only for calibrate work orders',
        `only a calibrate work order takes a calibration record; ${wo.code} is ${wo.kind}`,
      );
    }
    await orders.update(c.em, wo.id, { status: 'done', closed_at: 'now' });
    await events.add(c.em, wo.id, 'closed', {
      actorId: c.actorId,
      from: wo.status,
      to: 'done',
      changes,
      comment: body.comment,
    });
  },

  async cancel({ em, actorId }, wo, body) {
    await orders.update(em, wo.id, { status: 'cancelled', cancel_reason: body.reason, closed_at: 'now' });
    await events.add(em, wo.id, 'cancelled', { actorId, from: wo.status, to: 'cancelled', comment: body.reason });
    if (wo.kind === 'calibrate' && wo.instrument_id) await orders.clearSuspect(em, wo.instrument_id);
  },

  async comment({ em, actorId }, wo, body) {
    await orders.update(em, wo.id, {});
    await events.add(em, wo.id, 'comment', { actorId, comment: body.comment });
  },
};

export async function actOnWorkOrder(
  deps: ActionDeps,
  siteId: string,
  id: string,
  actorId: string,
  a: ActionBody,
): Promise<WorkOrderDetail> {
  const after: (() => Promise<void>)[] = [];
  await deps.dataSource.transaction(async (em) => {
    const c: ActionContext = { em, siteId, actorId, after, deps };
    if (a.action === 'merge') return merge(c, id, a.body);
    const wo = await lockOne(em, siteId, id);
    if (a.action !== 'comment') assertMay(a.action, wo);
    await (ACTIONS[a.action] as Handler<typeof a.action>)(c, wo, a.body as never);
  });
  for (const f of after) await f();
  return getWorkOrder(deps.dataSource, siteId, id);
}

/**
 * Merge: the duplicates' findings and history move into the target; each duplicate is cancelled
 * "merged into WO-xxxx". All must be open (not closed) and on this site. The site's counter
 * row is locked first, as the analysis does, so a merge and an analysis never deadlock.
 */
async function merge({ em, siteId, actorId }: ActionContext, targetId: string, body: MergeRequest): Promise<void> {
  const dupIds = [...new Set(body.duplicateIds)];
  if (dupIds.includes(targetId)) {
    throw validation(
      'duplicateIds',
      'Must not contain the target work order',
      'a work order cannot be merged into itself',
    );
  }
  if (!UUID_RE.test(targetId)) throw notFound();
  await lockSiteCounter(em, siteId);
  const ids = [targetId, ...dupIds];
  const byId = new Map((await orders.lock(em, siteId, ids)).map((r) => [r.id, r]));
  for (const id of ids) if (!byId.has(id)) throw notFound();
  const target = byId.get(targetId)!;
  assertMay('merge', target);
  const dups = dupIds.map((d) => byId.get(d)!);
  for (const d of dups) {
    if (isClosed(d.status)) {
      throw new AppError(
        409,
        'conflict',
        `${d.code} cannot be merged: it is ${d.status}; only open work orders merge (flow: open → triaged → scheduled → in-progress)`,
        { workOrder: d.code, action: 'merge', status: d.status },
      );
    }
  }
  const codes = dups.map((d) => d.code);
  await findings.move(em, dupIds, target.id);
  await events.move(em, dupIds, target.id);
  for (const d of dups) {
    const reason = `merged into ${target.code}`;
    await orders.update(em, d.id, {
      status: 'cancelled',
      cancel_reason: reason,
      merged_into_id: target.id,
      closed_at: 'now',
    });
    await events.add(em, d.id, 'cancelled', {
      actorId,
      from: d.status,
      to: 'cancelled',
      changes: { mergedInto: target.code },
      comment: reason,
    });
  }
  const priority = Math.min(target.priority, ...dups.map((d) => d.priority));
  await orders.update(em, target.id, priority !== target.priority ? { priority } : {});
  await events.add(em, target.id, 'merged', {
    actorId,
    changes: {
      duplicates: codes,
      ...(priority !== target.priority ? { priority: { from: target.priority, to: priority } } : {}),
    },
    comment: body.comment ?? `Merged ${codes.join(', ')} into ${target.code}`,
  });
  for (const d of dups) {
    if (
      d.kind === 'calibrate' &&
      d.instrument_id &&
      !(target.kind === 'calibrate' && target.instrument_id === d.instrument_id)
    ) {
      await orders.clearSuspect(em, d.instrument_id);
    }
  }
}
