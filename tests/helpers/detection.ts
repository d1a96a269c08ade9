/**
 * Monte Carlo harness for the statistical policy of the round analysis (shared/cycle analyseRound)
 * on the demo unit: rounds made from the design point with independent Gaussian noise at exactly
 * the σ the analysis assigns each reading (unclipped), optionally one instrument biased.
 *
 * "Blamed": a finding of a kind that feeds a work order on an instrument (server/work-orders/
 * policy.ts KIND_OF_FINDING minus the equipment kinds) names the instrument.
 *
 * Used by tests/unit/cycle/detection.test.ts (small N) and bench/detection.bench.ts (the table).
 * Deterministic: mulberry32 (server/seed/history-generator.ts) and Box–Muller.
 */
import {
  analyseRound,
  cusumStep,
  CUSUM_START,
  decideEvidence,
  type CusumState,
  type InstrumentEvidence,
  type RoundAnalysis,
  type RoundReading,
} from '@/shared/cycle';
import { demoDesignReadings, demoUnit } from '@/demo/unit';
import { EVIDENCE_KINDS, KIND_OF_FINDING, workOrderKindOf } from '@/server/work-orders/policy';
import { serverFindings } from '@/server/analysis/plant-checks';
import { mulberry32, normals } from '@/server/seed/history-generator';

export const B = 101325;
export const design: RoundReading[] = demoDesignReadings(B).map((r) => ({
  instrumentTag: r.instrumentTag,
  valueSI: r.valueSI,
}));
export const base: RoundAnalysis = analyseRound(demoUnit, design, { barometricPa: B });
export const sigmaOf = new Map(base.instruments.map((i) => [i.tag, i.sigma ?? 0]));

/** Finding kinds that blame an instrument (open or feed an order on it). */
export const BLAME_KINDS: ReadonlySet<string> = new Set(
  Object.entries(KIND_OF_FINDING)
    .filter(([k]) => k !== 'balance-not-closed' && k !== 'condenser-ttd-high')
    .map(([k]) => k),
);

/** Standard normal deviates (Box–Muller over mulberry32, the demo history's own generator). */
export function gaussian(seed: number): () => number {
  return normals(mulberry32(seed));
}

/** One noisy round; `bias` adds bias.sigmas × σ to one instrument. */
export function noisyRound(n: () => number, bias?: { tag: string; sigmas: number }): RoundReading[] {
  return design.map((r) => {
    const s = sigmaOf.get(r.instrumentTag!) ?? 0;
    const b = bias && bias.tag === r.instrumentTag ? bias.sigmas * s : 0;
    return { instrumentTag: r.instrumentTag, valueSI: r.valueSI + s * n() + b };
  });
}

/** Instruments a round's findings blame, and by which kinds. */
export function blamed(a: RoundAnalysis): { tags: Set<string>; kinds: Set<string> } {
  const tags = new Set<string>();
  const kinds = new Set<string>();
  for (const f of a.findings) {
    if (!BLAME_KINDS.has(f.kind) || f.instrumentTags.length === 0) continue;
    kinds.add(f.kind);
    for (const t of f.instrumentTags) tags.add(t);
  }
  return { tags, kinds };
}

export interface FaultFreeSummary {
  rounds: number;
  blamedRounds: number;
  byKind: Record<string, number>;
  globalFailed: number;
  meanChi2PerDof: number;
}

export function faultFree(rounds: number, seed: number): FaultFreeSummary {
  const n = gaussian(seed);
  let blamedRounds = 0;
  let globalFailed = 0;
  let chi = 0;
  const byKind: Record<string, number> = {};
  for (let k = 0; k < rounds; k++) {
    const a = analyseRound(demoUnit, noisyRound(n), { barometricPa: B });
    const b = blamed(a);
    if (b.tags.size) blamedRounds++;
    for (const kind of b.kinds) byKind[kind] = (byKind[kind] ?? 0) + 1;
    if (a.reconciliation.ok) {
      if (!a.reconciliation.passed) globalFailed++;
      chi += a.reconciliation.chiSquare / a.reconciliation.dof;
    }
  }
  return { rounds, blamedRounds, byKind, globalFailed, meanChi2PerDof: chi / rounds };
}

export interface BiasSummary {
  tag: string;
  sigmas: number;
  rounds: number;
  /** rounds whose findings name the biased instrument (alone or in a group) */
  named: number;
  /** rounds whose findings name it in a group finding */
  asGroup: number;
  /** rounds where another instrument, not it, is blamed */
  misattributed: number;
}

export function biased(tag: string, sigmas: number, rounds: number, seed: number): BiasSummary {
  const n = gaussian(seed);
  let named = 0;
  let asGroup = 0;
  let misattributed = 0;
  for (let k = 0; k < rounds; k++) {
    const sign = k % 2 === 0 ? 1 : -1;
    const a = analyseRound(demoUnit, noisyRound(n, { tag, sigmas: sign * sigmas }), { barometricPa: B });
    const b = blamed(a);
    if (b.tags.has(tag)) {
      named++;
      if (
        a.findings.some((f) => BLAME_KINDS.has(f.kind) && f.instrumentTags.includes(tag) && f.instrumentTags.length > 1)
      )
        asGroup++;
    } else if (b.tags.size) misattributed++;
  }
  return { tag, sigmas, rounds, named, asGroup, misattributed };
}

/** Upper tolerance of a binomial proportion: p + z·√(p(1−p)/n) (normal approximation; z = 2.326 is one-sided 99 %). */
export function binomialUpper(p: number, n: number, z = 2.326): number {
  return p + z * Math.sqrt((p * (1 - p)) / n);
}

/** The evidence statistic u of each tested, redundant instrument (InstrumentResult.u). */
export function signedU(a: RoundAnalysis): Map<string, number> {
  const out = new Map<string, number>();
  for (const i of a.instruments) if (i.u !== null && i.redundant) out.set(i.tag, i.u);
  return out;
}

/**
 * Rounds of one sequence (the same instruments each round): the first round (1-based) where the
 * evidence names each instrument, by shared/cycle/evidence.ts.
 */
export function sequence(
  rounds: number,
  seed: number,
  bias?: { tag: string; sigmas: number },
): { firstNamed: Map<string, number>; orders: { round: number; tags: string[]; reason: string }[] } {
  const n = gaussian(seed);
  let states = new Map<string, CusumState>();
  const firstNamed = new Map<string, number>();
  const orders: { round: number; tags: string[]; reason: string }[] = [];
  const opened = new Set<string>();
  for (let k = 1; k <= rounds; k++) {
    const a = analyseRound(demoUnit, noisyRound(n, bias), { barometricPa: B });
    const us = signedU(a);
    const next = new Map<string, CusumState>();
    const ev: InstrumentEvidence[] = [];
    for (const [tag, u] of us) {
      const s = cusumStep(states.get(tag) ?? CUSUM_START, u);
      next.set(tag, s);
      ev.push({ tag, u, state: s });
    }
    states = next;
    const pairs = a.reconciliation.ok ? a.reconciliation.correlatedCorrections : [];
    for (const d of decideEvidence(ev, pairs)) {
      for (const t of d.tags) if (!firstNamed.has(t)) firstNamed.set(t, k);
      const key = d.tags.join('|');
      if (!opened.has(key)) {
        opened.add(key);
        orders.push({ round: k, tags: d.tags, reason: d.reason });
      }
    }
  }
  return { firstNamed, orders };
}

export interface SimulatedOrder {
  /** 0-based index of the round (shift) that opened it */
  round: number;
  kind: string;
  /** instrument tags (a check-group order names them all) or the equipment id */
  target: string;
  why: string;
}

/**
 * The work orders a sequence of analysed rounds would open under the server's policy
 * (server/work-orders/policy.ts and from-findings.ts, server/analysis/evidence.ts and
 * plant-checks.ts) with every order left open: the same rules, without the database. Each
 * round's readings are its own (no borrowing), so every instrument's evidence counts each round once.
 */
export function simulateOrders(analyses: readonly RoundAnalysis[], model = demoUnit): SimulatedOrder[] {
  let states = new Map<string, CusumState>();
  const open = new Set<string>();
  const out: SimulatedOrder[] = [];
  analyses.forEach((a, round) => {
    const ev: InstrumentEvidence[] = [];
    const next = new Map<string, CusumState>();
    for (const [tag, u] of signedU(a)) {
      const s = cusumStep(states.get(tag) ?? CUSUM_START, u);
      next.set(tag, s);
      ev.push({ tag, u, state: s });
    }
    for (const [tag, s] of states) if (!next.has(tag)) next.set(tag, s);
    states = next;
    const decisions = decideEvidence(ev, a.reconciliation.ok ? a.reconciliation.correlatedCorrections : []);
    const named = new Set(decisions.flatMap((d) => d.tags));
    const findings: {
      kind: string;
      instrumentTags: string[];
      equipmentId?: string;
      evidence: Record<string, unknown>;
    }[] = [
      ...serverFindings(model, a.findings, a.performance, new Set(model.instruments.map((i) => i.tag))),
      ...decisions
        .filter((d) => d.reason === 'sustained')
        .map((d) => ({ kind: 'sustained-bias', instrumentTags: d.tags, evidence: {} })),
    ];
    const suspects = new Set(a.reconciliation.ok ? a.reconciliation.suspects : []);
    for (const f of findings) {
      let kind = workOrderKindOf(f.kind);
      if (!kind) continue;
      const fromEvidence = EVIDENCE_KINDS.has(f.kind);
      if (fromEvidence && !f.instrumentTags.some((t) => named.has(t))) continue;
      if (f.kind === 'balance-not-closed' && Array.isArray(f.evidence.explainedBy) && f.evidence.explainedBy.length)
        continue;
      let target: string;
      if (f.instrumentTags.length) {
        if (fromEvidence && f.instrumentTags.length > 1) {
          kind = 'check-group';
          target = [...f.instrumentTags].sort().join('+');
        } else target = f.instrumentTags.find((t) => suspects.has(t)) ?? f.instrumentTags[0];
      } else target = f.equipmentId ?? '?';
      const key = `${kind}|${target}`;
      if (open.has(key)) continue;
      open.add(key);
      out.push({ round, kind, target, why: f.kind });
    }
  });
  return out;
}
