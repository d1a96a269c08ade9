/**
 * The rules of work orders as data: which finding opens which kind of order, how urgent it is,
 * and which status moves the flow allows. Pure (no database), so the tables can be read here.
 *
 * Finding kind → work-order kind (a finding of a kind not listed opens nothing: it is about the
 * round's data — missing, duplicate or unreadable readings, an unknown tag — not about the plant):
 *
 *   gross-error, gauge-read-as-absolute, absolute-read-as-gauge,
 *   sustained-bias (server/analysis/evidence.ts)                → calibrate  (the instrument)
 *     … naming a group the balances cannot tell apart          → check-group (both, one order)
 *   stuck-value                                                 → repair     (the instrument)
 *   out-of-range, outside-if97, phase-mismatch                  → inspect    (the instrument)
 *   balance-not-closed                                          → inspect    (the equipment)
 *   condenser-ttd-high (server/analysis/plant-checks.ts)        → clean      (the condenser)
 *
 * The statistical policy (README "How findings become work orders"): the reconciliation's findings
 * (EVIDENCE_KINDS) open an order only for an instrument the sequential evidence names
 * (shared/cycle/evidence.ts: a gross error at once, else Page's CUSUM over its own rounds);
 * otherwise they are attached to an order already open, or stay on the round as flags.
 *
 * Priority (1 most urgent) from the finding's severity (the same direction: 1 urgent, 2 attend to,
 * 3 note; shared/cycle/severity.ts) and the criticality of the equipment (1–3, the cycle model's;
 * for an instrument, the most critical equipment on its point):
 *
 *                  criticality 1   criticality 2   criticality 3
 *   severity 1           2               1               1
 *   severity 2           3               2               2
 *   severity 3           3               3               3
 *
 * Default due date after opening, by priority: 1 → 2 days, 2 → 14 days, 3 → 60 days (common
 * practice for maintenance backlogs; the planner sets another at triage or scheduling).
 */
import type { WorkOrderAction, WorkOrderKind, WorkOrderStatus } from '../../shared/api/work-orders';
import { CLOSED_STATUSES } from '../entities/work-order';

export const KIND_OF_FINDING: Readonly<Record<string, WorkOrderKind>> = Object.freeze({
  'gross-error': 'calibrate',
  'gauge-read-as-absolute': 'calibrate',
  'absolute-read-as-gauge': 'calibrate',
  'sustained-bias': 'calibrate',
  'stuck-value': 'repair',
  'out-of-range': 'inspect',
  'outside-if97': 'inspect',
  'phase-mismatch': 'inspect',
  'balance-not-closed': 'inspect',
  'condenser-ttd-high': 'clean',
});

/** Reconciliation findings that open an order only for an instrument the sequential evidence names. */
export const EVIDENCE_KINDS: ReadonlySet<string> = new Set([
  'gross-error',
  'gauge-read-as-absolute',
  'absolute-read-as-gauge',
  'sustained-bias',
]);

/** Finding kinds that count as a flag on an instrument (instrument health): those that open work. */
export const FLAG_KINDS: readonly string[] = Object.keys(KIND_OF_FINDING);

export function workOrderKindOf(findingKind: string): WorkOrderKind | null {
  return KIND_OF_FINDING[findingKind] ?? null;
}

/** PRIORITY_TABLE[severity − 1][criticality − 1] */
export const PRIORITY_TABLE: readonly (readonly (1 | 2 | 3)[])[] = [
  [2, 1, 1],
  [3, 2, 2],
  [3, 3, 3],
];

function level(x: number, what: string): number {
  if (!Number.isInteger(x) || x < 1 || x > 3) throw new RangeError(`${what} must be 1, 2 or 3, got ${String(x)}`);
  return x;
}

export function priorityOf(severity: number, criticality: number): 1 | 2 | 3 {
  return PRIORITY_TABLE[level(severity, 'severity') - 1][level(criticality, 'criticality') - 1];
}

export const DUE_DAYS: Readonly<Record<1 | 2 | 3, number>> = Object.freeze({ 1: 2, 2: 14, 3: 60 });

export const VERB: Readonly<Record<WorkOrderKind, string>> = Object.freeze({
  calibrate: 'Calibrate',
  repair: 'Repair',
  inspect: 'Inspect',
  clean: 'Clean',
  'check-group': 'Check',
});

/** Status moves an action makes: from which statuses, to which. */
export const TRANSITIONS: Readonly<
  Partial<Record<WorkOrderAction, { from: readonly WorkOrderStatus[]; to: WorkOrderStatus | null }>>
> = Object.freeze({
  triage: { from: ['open'], to: 'triaged' },
  schedule: { from: ['triaged', 'scheduled'], to: 'scheduled' },
  start: { from: ['scheduled'], to: 'in-progress' },
  close: { from: ['in-progress'], to: 'done' },
  cancel: { from: ['open', 'triaged', 'scheduled', 'in-progress'], to: 'cancelled' },
  assign: { from: ['open', 'triaged', 'scheduled', 'in-progress'], to: null },
  merge: { from: ['open', 'triaged', 'scheduled', 'in-progress'], to: null },
});

export const FLOW_TEXT = 'open → triaged → scheduled → in-progress → done, or cancelled';

/** The statuses an order ends in (one list, with the entity; ./repository.ts builds its open-order SQL from it). */
export { CLOSED_STATUSES };

export function isClosed(s: WorkOrderStatus): boolean {
  return CLOSED_STATUSES.includes(s);
}

/** null when allowed, else the reason (for a 409). */
export function refusal(action: WorkOrderAction, from: WorkOrderStatus): string | null {
  const t = TRANSITIONS[action];
  if (!t || t.from.includes(from)) return null;
  return `${action} needs the work order to be ${t.from.join(' or ')}; it is ${from} (flow: ${FLOW_TEXT})`;
}

/** Every action the flow allows from a status (comment always). */
export function allowedActions(from: WorkOrderStatus): WorkOrderAction[] {
  const out: WorkOrderAction[] = [];
  for (const a of ['triage', 'assign', 'schedule', 'start', 'close', 'cancel', 'merge'] as const)
    if (refusal(a, from) === null) out.push(a);
  out.push('comment');
  return out;
}

/** "WO-0001" */
export function workOrderCode(n: number): string {
  return `WO-${String(n).padStart(4, '0')}`;
}
