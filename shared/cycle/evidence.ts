/**
 * Sequential evidence per instrument, over its own rounds: when a reconciliation finding becomes a
 * work order.
 *
 * Statistic: the signed normalised correction of the instrument in each of its own rounds,
 * u = (reading − reconciled)/σ(correction) (VDI 2048-1 individual test value with its sign; under
 * no fault N(0, 1), positive reads high). A bias b on the instrument moves its mean to
 * b·√W_jj/σ_j (W_jj = 1 − (σ̂_j/σ_j)², its redundancy).
 *
 * Test: Page's two-sided CUSUM (E. S. Page, "Continuous inspection schemes", Biometrika 41, 1954),
 *   S⁺_n = max(0, S⁺_{n−1} + u_n − k),  S⁻_n = max(0, S⁻_{n−1} − u_n − k),  alarm at max(S⁺, S⁻) ≥ h,
 * with k = 1 and h = 6, the CUSUM tuned for a shift of 2 in u (k = δ/2). Average run lengths by
 * Siegmund's approximation (D. Siegmund, "Sequential Analysis", 1985, eq. 2.57; from memory),
 * ARL(μ) ≈ (e^{−2Δb} + 2Δb − 1)/(2Δ²), Δ = μ − k, b = h + 1.166:
 *   no fault (μ = 0), one side: ≈ 8.3·10⁵ rounds; both sides ≈ 4·10⁵ — over 90 days of 3 rounds a
 *   day and ~32 redundant instruments (8 640 instrument-rounds) about 0.02 false alarms;
 *   μ = 2: ≈ 6.7 rounds; μ = 5: 2 rounds (the first S⁺ ≈ 4, the second ≈ 8).
 * The Monte Carlo test (tests/unit/cycle/detection.test.ts) and `npm run bench -- detection`
 * measure these on the demo unit.
 *
 * Fast path: a gross error, |u| ≥ GROSS_Z in one round on a redundant instrument, opens an order at
 * once (two-sided tail 5.7·10⁻⁷ per instrument-round: ~0.005 false in those 8 640).
 *
 * Reset: the evidence counts the instrument's own rounds after its last calibration (a calibration
 * record closes the loop); a reading another round borrows is not that round's evidence, so each
 * reading counts once.
 *
 * Attribution: a bias on one instrument moves the others' statistics by their correction
 * correlation ρ. Of the instruments in alarm, the one with the strongest evidence is named; another
 * in alarm whose corrections correlate with it by |ρ| ≥ EXPLAINED_CORRELATION and whose evidence
 * is weaker is explained by it (its rounds are attached, no order of its own). Near-inseparable
 * instruments (|ρ| ≥ GROUP_CORRELATION of shared/reconcile) are named together.
 *
 * Pure and deterministic.
 */
import { GROUP_CORRELATION } from '../reconcile';

/** A pair of instruments whose corrections correlate (RoundAnalysis reconciliation.correlatedCorrections). */
export interface CorrelatedPair {
  a: string;
  b: string;
  rho: number;
}

export const CUSUM_K = 1;
export const CUSUM_H = 6;
export const GROSS_Z = 5;
export const EXPLAINED_CORRELATION = 0.3;

export interface CusumState {
  hi: number;
  lo: number;
  /** own rounds counted */
  rounds: number;
}

export const CUSUM_START: CusumState = Object.freeze({ hi: 0, lo: 0, rounds: 0 });

/**
 * One step of Page's two-sided CUSUM. Each round's statistic is clipped to ±GROSS_Z first (a
 * Huber-type limit on one observation's weight): a one-off slip is the fast path's business, and
 * without the clip a single 20σ typing error would hold the sum above h for 15 rounds.
 */
export function cusumStep(s: CusumState, u: number): CusumState {
  const c = Math.max(-GROSS_Z, Math.min(GROSS_Z, u));
  return { hi: Math.max(0, s.hi + c - CUSUM_K), lo: Math.max(0, s.lo - c - CUSUM_K), rounds: s.rounds + 1 };
}

/** The CUSUM over a series (oldest first); non-finite entries are skipped. */
export function cusumOver(us: readonly number[]): CusumState {
  let s: CusumState = CUSUM_START;
  for (const u of us) if (Number.isFinite(u)) s = cusumStep(s, u);
  return s;
}

export const cusumValue = (s: CusumState) => Math.max(s.hi, s.lo);

export interface InstrumentEvidence {
  tag: string;
  /** this round's signed normalised correction, null where not tested */
  u: number | null;
  /** the CUSUM after this round */
  state: CusumState;
}

export interface EvidenceDecision {
  /** the instruments named (one, or a near-inseparable group, strongest first) */
  tags: string[];
  reason: 'gross' | 'sustained';
  /** |u| for 'gross', the CUSUM for 'sustained' */
  statistic: number;
  /** own rounds the CUSUM has counted */
  rounds: number;
  /** instruments in alarm explained by this one */
  explains: string[];
}

/** The instruments the evidence names after one round; `pairs`: the round's correlated corrections. */
export function decideEvidence(
  evidence: readonly InstrumentEvidence[],
  pairs: readonly CorrelatedPair[],
): EvidenceDecision[] {
  const byPair = new Map<string, number>();
  for (const p of pairs) byPair.set(p.a < p.b ? `${p.a}|${p.b}` : `${p.b}|${p.a}`, Math.abs(p.rho));
  const rho = (a: string, b: string) => byPair.get(a < b ? `${a}|${b}` : `${b}|${a}`) ?? 0;
  const strength = (e: InstrumentEvidence) => {
    const gross = e.u !== null && Math.abs(e.u) >= GROSS_Z;
    const c = cusumValue(e.state);
    return { gross, c, alarm: gross || c >= CUSUM_H, score: Math.max(c, gross ? Math.abs(e.u!) : 0) };
  };
  const inAlarm = evidence
    .map((e) => ({ e, ...strength(e) }))
    .filter((x) => x.alarm)
    .sort((a, b) => b.score - a.score || (a.e.tag < b.e.tag ? -1 : a.e.tag > b.e.tag ? 1 : 0));
  const used = new Set<string>();
  const out: EvidenceDecision[] = [];
  for (const x of inAlarm) {
    if (used.has(x.e.tag)) continue;
    used.add(x.e.tag);
    const group = [x.e.tag];
    const explains: string[] = [];
    for (const y of inAlarm) {
      if (used.has(y.e.tag)) continue;
      const r = rho(x.e.tag, y.e.tag);
      if (r >= GROUP_CORRELATION) group.push(y.e.tag);
      else if (r >= EXPLAINED_CORRELATION) explains.push(y.e.tag);
      else continue;
      used.add(y.e.tag);
    }
    // a near-inseparable partner not (yet) in alarm is named too: the balances cannot tell which
    for (const e of evidence)
      if (!group.includes(e.tag) && !used.has(e.tag) && rho(x.e.tag, e.tag) >= GROUP_CORRELATION) group.push(e.tag);
    out.push({
      tags: group,
      reason: x.gross ? 'gross' : 'sustained',
      statistic: x.gross ? Math.abs(x.e.u!) : x.c,
      rounds: x.e.state.rounds,
      explains,
    });
  }
  return out;
}
