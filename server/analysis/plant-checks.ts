/**
 * Findings the server adds to the engine's (shared/cycle analyseRound), and the ones it leaves out.
 *
 * condenser-ttd-high: the condenser's terminal temperature difference (saturation temperature of
 * the exhaust − cooling-water outlet temperature, from the reconciled state) above its design value
 * + CONDENSER_TTD_MARGIN_K. The design value comes from the model's nominal points (exhaust pressure
 * → saturation temperature with IAPWS-IF97, cooling-water outlet temperature); a condenser without
 * both nominal values is not checked. A TTD growing at a steady load is the classic sign of fouled
 * tubes (or air in-leakage), which is why the order it opens is "clean". The 3 K margin is common
 * practice for condenser performance monitoring, not a standard's number. A TTD whose 95 % interval
 * says it is not determinable from the instruments (shared/cycle/figure-uncertainty.ts) is not
 * checked; the message carries the interval.
 *
 * missing-reading findings are dropped for instruments the round's route does not read (a route
 * covers part of the unit; the rest is read on other routes).
 */
import type { CycleModel, Finding, PerformanceFigure } from '../../shared/cycle';
import { NOTE } from '../../shared/cycle/severity';
import { tsat } from '../../shared/steam';

export const CONDENSER_TTD_MARGIN_K = 3;

/** A finding as the server stores it: the engine's shape, with a kind the engine does not make allowed. */
export interface ServerFinding extends Omit<Finding, 'kind'> {
  kind: string;
}

function designTtd(model: CycleModel, condenserId: string): number | null {
  const c = model.equipment.find((e) => e.id === condenserId);
  if (!c || c.kind !== 'condenser') return null;
  const steam = model.points.find((p) => p.id === c.ports.steamIn)?.nominal?.p;
  const cwo = model.points.find((p) => p.id === c.ports.coolingOut)?.nominal?.T;
  if (typeof steam !== 'number' || typeof cwo !== 'number') return null;
  try {
    const t = tsat(steam) - cwo;
    return Number.isFinite(t) ? t : null;
  } catch {
    return null;
  }
}

export function condenserChecks(model: CycleModel, performance: readonly PerformanceFigure[]): ServerFinding[] {
  const out: ServerFinding[] = [];
  for (const f of performance) {
    if (f.kind !== 'condenser-ttd' || !f.equipmentId || typeof f.value !== 'number' || !Number.isFinite(f.value))
      continue;
    // a TTD the instruments cannot determine says nothing about the tubes
    if (f.uncertainty && !f.uncertainty.determinable) continue;
    const design = designTtd(model, f.equipmentId);
    if (design === null) continue;
    const limit = design + CONDENSER_TTD_MARGIN_K;
    if (f.value <= limit) continue;
    const label = model.equipment.find((e) => e.id === f.equipmentId)?.label ?? f.equipmentId;
    out.push({
      kind: 'condenser-ttd-high',
      severity: 2,
      instrumentTags: [],
      instrumentIds: [],
      equipmentId: f.equipmentId,
      message: `${label}: terminal temperature difference ${f.value.toFixed(1)} K${f.uncertainty ? ` ± ${f.uncertainty.U.toFixed(1)} K (95 %)` : ''} against ${design.toFixed(1)} K at design, more than the ${CONDENSER_TTD_MARGIN_K} K allowed over design: the tubes may be fouled (or air is leaking in).`,
      evidence: {
        ttd: f.value,
        ttdU95: f.uncertainty?.U ?? null,
        measuredTtd: f.measured,
        designTtd: design,
        limit,
        marginK: CONDENSER_TTD_MARGIN_K,
      },
    });
  }
  return out;
}

/** The round's findings as stored: route-aware missing readings, plus the server's plant checks. */
export function serverFindings(
  model: CycleModel,
  findings: readonly Finding[],
  performance: readonly PerformanceFigure[],
  routeTags: ReadonlySet<string>,
): ServerFinding[] {
  const kept: ServerFinding[] = findings.filter(
    (f) => f.kind !== 'missing-reading' || f.instrumentTags.some((t) => routeTags.has(t)),
  );
  return [...kept, ...condenserChecks(model, performance)];
}

/**
 * instrument-out-of-service: one note per model instrument whose row in the instrument master is
 * out of service (shared/cycle/instrument-master.ts). Its readings were left out of the
 * reconciliation; the note says so, and whether this round's route reads it.
 */
export function outOfServiceFindings(tags: readonly string[], routeTags: ReadonlySet<string>): ServerFinding[] {
  return tags.map((tag) => ({
    kind: 'instrument-out-of-service',
    severity: NOTE,
    instrumentTags: [tag],
    instrumentIds: [],
    message: `${tag} is out of service: its readings are not reconciled and no balance checks them in this analysis.`,
    evidence: { status: 'out-of-service', onRoute: routeTags.has(tag) },
  }));
}
