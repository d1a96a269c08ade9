/**
 * `npm run bench -- detection`: what the round analysis' findings are worth on the demo unit, by
 * Monte Carlo (tests/helpers/detection.ts: design-point rounds, Gaussian noise at the analysis'
 * own σ, unclipped; fixed seeds). Not a timing: the figures are rates and counts.
 *
 *  - false blame: fault-free rounds whose findings name an instrument (target: ≤ 5 %, the
 *    reconciliation's global test at 95 %);
 *  - per redundant instrument: W_jj (the share of its error the balances see), its group
 *    (|ρ| ≥ 0.95, named together), single-round detection at 3/5/10σ (σ of the reading),
 *    misattribution at 10σ (another instrument blamed, not it), and rounds until the sequential
 *    evidence names it at a bias of 2 and 5 in its own test value (b = 2σ/√W, 5σ/√W; median of
 *    a few sequences);
 *  - minimal detectable bias of the single-round individual test (Baarda's reliability, from the
 *    correction covariance): MDB_j = (z_{1−α/2} + z_{1−β})·σ_j/√W_jj = 2.80·σ_j/√W_jj at α = 5 %,
 *    power 80 %, in SI. The detectability map (issue 14 item 6, helper 14b) computes it for
 *    screens; this column is this side's figure from the same covariance.
 */
import { base, biased, faultFree, sequence } from '../tests/helpers/detection';

const GROUP_RHO = 0.95;

export async function run(): Promise<void> {
  const rounds = Number(process.env.TR_DETECTION_ROUNDS ?? 400);
  const ff = faultFree(rounds, 1);
  console.log(
    `fault-free rounds: ${ff.rounds}; any instrument blamed: ${ff.blamedRounds} (${((100 * ff.blamedRounds) / ff.rounds).toFixed(1)} %); global test failed: ${ff.globalFailed}; mean χ²/dof ${ff.meanChi2PerDof.toFixed(3)}`,
  );
  console.log(`  by kind: ${JSON.stringify(ff.byKind)}`);
  const seq = sequence(270, 11);
  console.log(`fault-free sequence of 270 rounds (90 days × 3): work orders the evidence opens: ${seq.orders.length}`);

  const rec = base.reconciliation;
  const groups = new Map<string, string[]>();
  if (rec.ok)
    for (const p of rec.correlatedCorrections)
      if (Math.abs(p.rho) >= GROUP_RHO)
        for (const [x, y] of [
          [p.a, p.b],
          [p.b, p.a],
        ])
          groups.set(x, [...(groups.get(x) ?? []), y]);
  const n = Number(process.env.TR_DETECTION_PER_CELL ?? 40);
  const header = ['tag', 'W', 'group', '3σ', '5σ', '10σ', 'wrong@10σ', 'rounds@u2', 'rounds@u5', 'MDB (SI)', 'MDB/σ'];
  const rows: string[][] = [];
  const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
  for (const i of base.instruments.filter((x) => x.redundant)) {
    const W = 1 - (i.reconciledSigma! / i.sigma!) ** 2;
    const d = [3, 5, 10].map((s) => biased(i.tag, s, n, 7 + s));
    const r2 = [1, 2, 3, 4, 5].map(
      (k) => sequence(20, 100 + k, { tag: i.tag, sigmas: 2 / Math.sqrt(W) }).firstNamed.get(i.tag) ?? Infinity,
    );
    const r5 = [1, 2, 3, 4, 5].map(
      (k) => sequence(4, 200 + k, { tag: i.tag, sigmas: 5 / Math.sqrt(W) }).firstNamed.get(i.tag) ?? Infinity,
    );
    const mdb = (2.8 * i.sigma!) / Math.sqrt(W);
    rows.push([
      i.tag,
      W.toFixed(2),
      (groups.get(i.tag) ?? []).join(' ') || '—',
      ...d.map((x) => `${((100 * x.named) / x.rounds).toFixed(0)} %`),
      `${((100 * d[2].misattributed) / d[2].rounds).toFixed(0)} %`,
      Number.isFinite(median(r2)) ? String(median(r2)) : '> 20',
      Number.isFinite(median(r5)) ? String(median(r5)) : '> 4',
      mdb.toPrecision(3),
      (2.8 / Math.sqrt(W)).toFixed(1),
    ]);
  }
  const widths = header.map((h, k) => Math.max(h.length, ...rows.map((r) => r[k].length)));
  const line = (r: string[]) => r.map((c, k) => c.padEnd(widths[k])).join('  ');
  console.log(
    `\nper redundant instrument (${n} rounds per cell; rounds@uX: median first round the evidence names it, of 5 sequences):`,
  );
  console.log(line(header));
  for (const r of rows) console.log(line(r));
}
