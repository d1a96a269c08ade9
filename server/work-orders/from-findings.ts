/**
 * Work orders from an analysis' findings, inside the analysis transaction (server/analysis/job.ts).
 *
 * Each finding of a kind that opens work (./policy.ts) has one target: an instrument (a
 * reconciliation suspect among the instruments it names, else the one of them the reconciliation
 * corrects most — of two instruments that disagree, the one the rest of the plant does not back
 * —, else the first named) or, without
 * instruments, the equipment it is about. A reconciliation finding that names a group the
 * balances cannot tell apart (FI-401 or TI-402) becomes one check-group order, its target the
 * group's first tag in code-unit order (the same order for the same group on every round).
 * Findings of one analysis with the same target and work-order kind go together.
 *
 * The statistical policy: a group of EVIDENCE_KINDS findings opens (or reopens) an order only when
 * the sequential evidence names its instrument (ctx.named, server/analysis/evidence.ts); else it is
 * attached to an order already open, or opens nothing. For each group, in a fixed order:
 *
 *  1. an open order (not done/cancelled) for the target and kind → the findings are attached as
 *     new evidence (an "evidence" event; an order still untriaged is escalated when the new
 *     priority is more urgent);
 *  2. else, for calibrate: the instrument's last calibrate order that was closed (done) —
 *     - the round reached the server before that close: its findings are attached to it as late
 *       evidence, the order stays done;
 *     - the round is among the instrument's first 3 rounds after the close: the order reopens
 *       (status open) with a history note;
 *  3. else a new order: the site's next number, the priority from ./policy.ts, a due date.
 *
 * A balance that does not close on equipment where the reconciliation names a suspect instrument
 * goes with that instrument's group (foldBalancesIntoSuspects): the wrong reading explains it.
 *
 * While a calibrate order is open its instrument's status is `suspect`.
 *
 * Lock order (the same in the planner's actions, so none of them deadlock with an analysis): the
 * site's counter row, then work-order rows, then instruments (whose update takes the sync-stamp
 * lock, server/migrations/1764720000000-sync-and-routes.ts) — instruments last, all at the end.
 *
 * Concurrency: the site's counter row is locked first (`FOR UPDATE`), so two workers analysing
 * rounds of the same site do their work-order part one after the other: the second sees the
 * first's order and attaches. The partial unique indexes on open orders are the backstop.
 */
import type { EntityManager } from 'typeorm';
import { portUses, type CycleModel } from '../../shared/cycle';
import type { WorkOrderKind } from '../../shared/api/work-orders';
import { joinNames } from '../../shared/cycle/messages';
import { DUE_DAYS, EVIDENCE_KINDS, VERB, priorityOf, workOrderCode, workOrderKindOf } from './policy';
import { events, findings, orders } from './repository';

/** Rounds after a calibration within which a new flag reopens the calibrate order. */
export const REOPEN_WITHIN_ROUNDS = 3;

export interface StoredFinding {
  id: string;
  kind: string;
  severity: number;
  instrumentIds: string[];
  instrumentTags: string[];
  equipmentRef: string | null;
  message: string;
}

export interface UnitInstrument {
  id: string;
  tag: string;
  pointRef: string | null;
  equipmentRef: string | null;
}

export interface FindingsContext {
  siteId: string;
  unitId: string;
  roundId: string;
  roundReceivedAt: Date;
  roundSeq: number;
  model: CycleModel;
  instruments: ReadonlyMap<string, UnitInstrument>;
  /** reconciliation suspects of the analysis, by tag */
  suspects: ReadonlySet<string>;
  /** the reconciliation's normalised corrections (z) of the analysis, by tag, where tested */
  z?: ReadonlyMap<string, number>;
  /** tags the sequential evidence names (server/analysis/evidence.ts); absent: every finding may open */
  named?: ReadonlySet<string>;
}

export interface WorkOrderTouch {
  id: string;
  number: string;
  priority: number;
}

export interface WorkOrderChanges {
  opened: WorkOrderTouch[];
  reopened: WorkOrderTouch[];
  attached: WorkOrderTouch[];
}

interface Group {
  key: string;
  kind: WorkOrderKind;
  instrument: UnitInstrument | null;
  equipmentRef: string | null;
  priority: 1 | 2 | 3;
  findings: StoredFinding[];
  /** the instruments a check-group order names */
  groupTags: string[];
  /** may open or reopen an order (else only attach to an open one) */
  mayOpen: boolean;
}

/** Criticality of the equipment an instrument sits on (the most critical around its point). */
export function criticalityOfInstrument(
  model: CycleModel,
  i: { pointRef: string | null; equipmentRef: string | null },
): number {
  let c = 0;
  if (i.pointRef) {
    for (const e of model.equipment)
      if (portUses(e).some((u) => u.point === i.pointRef)) c = Math.max(c, e.criticality);
  }
  if (i.equipmentRef) c = Math.max(c, model.equipment.find((e) => e.id === i.equipmentRef)?.criticality ?? 0);
  return c || 1;
}

/** Of the instruments a finding names, the one its round's reconciliation corrects most (largest |z|). */
function mostCorrected(ctx: FindingsContext, named: UnitInstrument[]): UnitInstrument | undefined {
  let best: UnitInstrument | undefined;
  let bestZ = -1;
  for (const i of named) {
    const z = Math.abs(ctx.z?.get(i.tag) ?? Number.NaN);
    if (Number.isFinite(z) && z > bestZ) [best, bestZ] = [i, z];
  }
  return best;
}

function groupsOf(ctx: FindingsContext, findings: readonly StoredFinding[]): Group[] {
  const byKey = new Map<string, Group>();
  for (const f of findings) {
    let kind = workOrderKindOf(f.kind);
    if (!kind) continue;
    let instrument: UnitInstrument | null = null;
    let equipmentRef: string | null = null;
    let groupTags: string[] = [];
    const fromEvidence = EVIDENCE_KINDS.has(f.kind);
    if (f.instrumentIds.length) {
      const named = f.instrumentIds.map((id) => ctx.instruments.get(id)).filter((x): x is UnitInstrument => !!x);
      if (fromEvidence && named.length > 1) {
        kind = 'check-group';
        groupTags = named.map((i) => i.tag).sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
        instrument = named.find((i) => i.tag === groupTags[0])!;
      } else instrument = named.find((i) => ctx.suspects.has(i.tag)) ?? mostCorrected(ctx, named) ?? named[0] ?? null;
    }
    const mayOpen = !fromEvidence || !ctx.named || f.instrumentTags.some((t) => ctx.named!.has(t));
    if (!instrument) equipmentRef = f.equipmentRef;
    if (!instrument && !equipmentRef) continue;
    const crit = instrument
      ? criticalityOfInstrument(ctx.model, instrument)
      : (ctx.model.equipment.find((e) => e.id === equipmentRef)?.criticality ?? 1);
    const priority = priorityOf(Math.min(3, Math.max(1, Math.round(f.severity))), crit);
    const key = `${kind}|${instrument ? `i:${instrument.tag}` : `e:${equipmentRef}`}`;
    const g = byKey.get(key);
    if (g) {
      g.findings.push(f);
      g.priority = Math.min(g.priority, priority) as 1 | 2 | 3;
      g.mayOpen ||= mayOpen;
    } else byKey.set(key, { key, kind, instrument, equipmentRef, priority, findings: [f], groupTags, mayOpen });
  }
  foldBalancesIntoSuspects(ctx, byKey);
  return [...byKey.values()].sort((a, b) => (a.key < b.key ? -1 : a.key > b.key ? 1 : 0));
}

/** Whether an instrument measures a port of the equipment (or sits on it). */
function onEquipment(model: CycleModel, i: UnitInstrument, equipmentRef: string): boolean {
  if (i.equipmentRef === equipmentRef) return true;
  const e = model.equipment.find((x) => x.id === equipmentRef);
  return !!e && !!i.pointRef && portUses(e).some((u) => u.point === i.pointRef);
}

/**
 * A balance that does not close because one of its own instruments reads wrong is one problem,
 * not two: when the reconciliation names a suspect on the equipment, the balance finding goes
 * with that instrument's order as evidence instead of opening an inspection of the equipment.
 */
function foldBalancesIntoSuspects(ctx: FindingsContext, byKey: Map<string, Group>): void {
  const byTag = new Map([...ctx.instruments.values()].map((i) => [i.tag, i]));
  /** the suspect instruments a group stands for: its instrument, or the suspects among a check-group's */
  const suspectsOf = (g: Group): UnitInstrument[] =>
    g.groupTags.length
      ? g.groupTags
          .filter((t) => ctx.suspects.has(t))
          .map((t) => byTag.get(t)!)
          .filter(Boolean)
      : g.instrument && ctx.suspects.has(g.instrument.tag)
        ? [g.instrument]
        : [];
  const suspectGroups = [...byKey.values()]
    .filter((g) => suspectsOf(g).length > 0)
    .sort((a, b) => (a.key < b.key ? -1 : a.key > b.key ? 1 : 0));
  for (const [key, g] of [...byKey]) {
    if (g.instrument || !g.equipmentRef || g.findings.some((f) => f.kind !== 'balance-not-closed')) continue;
    const into = suspectGroups.find((s) => suspectsOf(s).some((i) => onEquipment(ctx.model, i, g.equipmentRef!)));
    if (!into) continue;
    into.findings.push(...g.findings);
    byKey.delete(key);
  }
}

function titleOf(model: CycleModel, g: Group): string {
  const what = g.findings[0].kind.replace(/-/g, ' ');
  if (g.kind === 'check-group')
    return `${VERB[g.kind]} ${joinNames(g.groupTags)}: the balances cannot tell which reads wrong`.slice(0, 300);
  if (g.instrument) {
    const label = model.instruments.find((i) => i.tag === g.instrument!.tag)?.label;
    return `${VERB[g.kind]} ${g.instrument.tag}${label ? ` (${label})` : ''}: ${what}`.slice(0, 300);
  }
  const label = model.equipment.find((e) => e.id === g.equipmentRef)?.label ?? g.equipmentRef;
  return `${VERB[g.kind]} ${label}: ${what}`.slice(0, 300);
}

const event = events.add;

const attach = (em: EntityManager, workOrderId: string, found: StoredFinding[]) =>
  findings.attach(
    em,
    workOrderId,
    found.map((f) => f.id),
  );

async function markSuspect(em: EntityManager, instrumentId: string): Promise<void> {
  await em.query(
    `UPDATE "instruments" SET "status" = 'suspect', "row_version" = "row_version" + 1, "updated_at" = now() WHERE "id" = $1 AND "status" = 'ok'`,
    [instrumentId],
  );
}

const summaryOf = (g: Group, ctx: FindingsContext) => ({
  roundId: ctx.roundId,
  findingIds: g.findings.map((f) => f.id),
  findingKinds: [...new Set(g.findings.map((f) => f.kind))],
});

interface OpenRow {
  id: string;
  code: string;
  status: string;
  priority: number;
  closed_at: Date | null;
}

/** Locks the site's work-order counter row (made on first use) for the rest of the transaction. */
export async function lockSiteCounter(em: EntityManager, siteId: string): Promise<void> {
  await em.query(`INSERT INTO "work_order_counters" ("site_id") VALUES ($1) ON CONFLICT ("site_id") DO NOTHING`, [
    siteId,
  ]);
  await em.query(`SELECT "last_number" FROM "work_order_counters" WHERE "site_id" = $1 FOR UPDATE`, [siteId]);
}

/** The site's next work-order number (the counter row must be locked: lockSiteCounter). */
async function nextNumber(em: EntityManager, siteId: string): Promise<number> {
  // an UPDATE … RETURNING comes back from TypeORM as [rows, affected]
  const [rows] = (await em.query(
    `UPDATE "work_order_counters" SET "last_number" = "last_number" + 1 WHERE "site_id" = $1 RETURNING "last_number"`,
    [siteId],
  )) as [{ last_number: number }[], number];
  return rows[0].last_number;
}

export async function workOrdersFromFindings(
  em: EntityManager,
  ctx: FindingsContext,
  findings: readonly StoredFinding[],
): Promise<WorkOrderChanges> {
  const out: WorkOrderChanges = { opened: [], reopened: [], attached: [] };
  const suspect = new Set<string>();
  const groups = groupsOf(ctx, findings);
  if (groups.length === 0) return out;
  await lockSiteCounter(em, ctx.siteId);

  for (const g of groups) {
    const summary = summaryOf(g, ctx);
    const note = g.findings.map((f) => f.message).join('\n');
    const open = await orders.openFor(
      em,
      g.instrument
        ? { siteId: ctx.siteId, instrumentId: g.instrument.id }
        : { unitId: ctx.unitId, equipmentRef: g.equipmentRef! },
      g.kind,
    );

    // 1. attach to the open order
    if (open) {
      await attach(em, open.id, g.findings);
      await event(em, open.id, 'evidence', { changes: summary, comment: note });
      let priority = open.priority;
      if (open.status === 'open' && g.priority < open.priority) {
        priority = g.priority;
        await em.query(`UPDATE "work_orders" SET "priority" = $2, "updated_at" = now() WHERE "id" = $1`, [
          open.id,
          priority,
        ]);
        await event(em, open.id, 'priority', {
          changes: { priority: { from: open.priority, to: priority } },
          comment: 'Raised by newer evidence',
        });
      } else await em.query(`UPDATE "work_orders" SET "updated_at" = now() WHERE "id" = $1`, [open.id]);
      out.attached.push({ id: open.id, number: open.code, priority });
      continue;
    }

    // without the evidence for it, a reconciliation finding opens nothing (it stays a flag on the round)
    if (!g.mayOpen) continue;

    // 2. a calibrate order closed lately
    if (g.kind === 'calibrate' && g.instrument) {
      const [done] = (await em.query(
        `SELECT "id", "code", "status", "priority", "closed_at" FROM "work_orders"
          WHERE "site_id" = $1 AND "instrument_id" = $2 AND "kind" = 'calibrate' AND "status" = 'done'
          ORDER BY "closed_at" DESC NULLS LAST LIMIT 1 FOR UPDATE`,
        [ctx.siteId, g.instrument.id],
      )) as OpenRow[];
      if (done?.closed_at) {
        if (ctx.roundReceivedAt.getTime() <= done.closed_at.getTime()) {
          await attach(em, done.id, g.findings);
          await event(em, done.id, 'evidence', {
            changes: { ...summary, beforeClose: true },
            comment: `From a round received before this order was closed; the order stays done.\n${note}`,
          });
          out.attached.push({ id: done.id, number: done.code, priority: done.priority });
          continue;
        }
        const [{ n }] = (await em.query(
          `SELECT count(*)::int AS "n" FROM "rounds" r
            WHERE r."received_at" > $1 AND r."server_seq" <= $2 AND r."status" = 'finished'
              AND EXISTS (SELECT 1 FROM "readings" x WHERE x."round_id" = r."id" AND x."instrument_id" = $3 AND x."value_si" IS NOT NULL)`,
          [done.closed_at, ctx.roundSeq, g.instrument.id],
        )) as { n: number }[];
        if (n <= REOPEN_WITHIN_ROUNDS) {
          const priority = Math.min(done.priority, g.priority);
          await em.query(
            `UPDATE "work_orders" SET "status" = 'open', "closed_at" = NULL, "reopen_count" = "reopen_count" + 1, "priority" = $2, "updated_at" = now()
              WHERE "id" = $1`,
            [done.id, priority],
          );
          await attach(em, done.id, g.findings);
          await event(em, done.id, 'reopened', {
            from: 'done',
            to: 'open',
            changes: { ...summary, roundsSinceClose: n },
            comment: `Reopened: ${g.instrument.tag} was flagged again on its round ${n} of ${REOPEN_WITHIN_ROUNDS} after the calibration.\n${note}`,
          });
          suspect.add(g.instrument.id);
          out.reopened.push({ id: done.id, number: done.code, priority });
          continue;
        }
      }
    }

    // 3. a new order
    const number = await nextNumber(em, ctx.siteId);
    const code = workOrderCode(number);
    const [{ id }] = (await em.query(
      `INSERT INTO "work_orders" ("site_id", "unit_id", "number", "code", "kind", "status", "priority", "title", "instrument_id", "instrument_tag", "equipment_ref", "due_date")
       VALUES ($1, $2, $3, $4, $5, 'open', $6, $7, $8, $9, $10, (now() AT TIME ZONE 'UTC')::date + $11::int)
       RETURNING "id"`,
      [
        ctx.siteId,
        ctx.unitId,
        number,
        code,
        g.kind,
        g.priority,
        titleOf(ctx.model, g),
        g.instrument?.id ?? null,
        g.instrument?.tag ?? null,
        g.instrument ? (g.instrument.equipmentRef ?? null) : g.equipmentRef,
        DUE_DAYS[g.priority],
      ],
    )) as { id: string }[];
    await attach(em, id, g.findings);
    await event(em, id, 'opened', {
      to: 'open',
      changes: { ...summary, kind: g.kind, priority: g.priority },
      comment: note,
    });
    if (g.kind === 'calibrate' && g.instrument) suspect.add(g.instrument.id);
    if (g.kind === 'check-group') for (const f of g.findings) for (const i of f.instrumentIds) suspect.add(i);
    out.opened.push({ id, number: code, priority: g.priority });
  }
  for (const id of [...suspect].sort()) await markSuspect(em, id);
  return out;
}
