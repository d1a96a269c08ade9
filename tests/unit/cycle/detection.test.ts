/**
 * The statistical policy of findings on the demo unit, by Monte Carlo (tests/helpers/detection.ts:
 * design-point rounds with Gaussian noise at exactly the σ the analysis assigns, unclipped; fixed
 * seeds, small N). The full table: `npm run bench -- detection`.
 *
 * Sources: VDI 2048-1:2017 (global χ² test at 95 %, individual test of the normalised corrections,
 * elimination of measurements failing the individual test); the false-alarm bound follows because a
 * round names an instrument only when its global test fails (probability α = 5 % without a fault).
 * Page, "Continuous inspection schemes", Biometrika 41 (1954) for the CUSUM; Siegmund,
 * "Sequential Analysis" (1985), eq. 2.57 for its average run lengths (from memory). Binomial
 * tolerances: normal approximation, one-sided 99 % (z = 2.326), common practice.
 */
import { base, biased, binomialUpper, faultFree, sequence } from '@/tests/helpers/detection';

const W = (tag: string) => {
  const i = base.instruments.find((x) => x.tag === tag)!;
  return 1 - (i.reconciledSigma! / i.sigma!) ** 2;
};
const rec = base.reconciliation.ok ? base.reconciliation : null;
const grouped = new Set(
  (rec?.correlatedCorrections ?? []).filter((p) => Math.abs(p.rho) >= 0.95).flatMap((p) => [p.a, p.b]),
);
/** redundant, well checked (the balances see at least half its error, W ≥ 0.5) and in no group */
const SEPARABLE = base.instruments
  .filter((i) => i.redundant && W(i.tag) >= 0.5 && !grouped.has(i.tag))
  .map((i) => i.tag);

test('the separable, well-checked instruments of the demo unit are the expected ones (from its correction covariance)', () => {
  expect(SEPARABLE).toEqual([
    'FI-101',
    'FI-102',
    'FI-201',
    'TI-203',
    'PI-301',
    'PI-302',
    'TI-301',
    'PI-401',
    'FI-501',
    'TI-403A',
    'TI-403B',
  ]);
});

test('fault-free rounds: any instrument blamed in ≤ 5 % of rounds (+ binomial tolerance), only when the global test fails (VDI 2048)', () => {
  const r = faultFree(250, 1);
  expect(r.blamedRounds / r.rounds).toBeLessThanOrEqual(binomialUpper(0.05, r.rounds));
  // the twin and saturation checks no longer test a second time: every blame comes from the reconciliation
  expect(Object.keys(r.byKind)).toEqual(r.blamedRounds ? ['gross-error'] : []);
  expect(r.blamedRounds).toBeLessThanOrEqual(r.globalFailed);
  // the noise is the analysis' own: χ²/dof near 1 (its mean is 1 for a calibrated test)
  expect(Math.abs(r.meanChi2PerDof - 1)).toBeLessThan(0.15);
});

test('a 10σ bias on each separable, well-checked instrument is named (alone) in ≥ 95 % of rounds', () => {
  let named = 0;
  let total = 0;
  for (const tag of SEPARABLE) {
    const r = biased(tag, 10, 20, 31);
    expect(r.named - r.asGroup).toBeGreaterThanOrEqual(17); // 95 % less the binomial tolerance at N = 20
    named += r.named - r.asGroup;
    total += r.rounds;
  }
  expect(named / total).toBeGreaterThanOrEqual(0.95);
});

test('an inseparable pair is reported as a pair: a 10σ bias on FI-401 names FI-401 or TI-402 together, never TI-402 alone', () => {
  const r = biased('FI-401', 10, 20, 5);
  expect(r.named).toBeGreaterThanOrEqual(17);
  expect(r.asGroup).toBe(r.named);
  expect(r.misattributed).toBeLessThanOrEqual(1);
});

describe("sequential evidence before a work order (Page's CUSUM, k = 1, h = 6; gross errors at |u| ≥ 5 at once)", () => {
  test('90 days of fault-free rounds (270): no work order', () => {
    expect(sequence(270, 11).orders).toEqual([]);
  });
  test('a sustained bias of 2 in its test value is named within ≤ 10 of its rounds (median; ARL by Siegmund ≈ 6.7)', () => {
    const firsts = SEPARABLE.flatMap((tag, k) =>
      [1, 2].map(
        (s) => sequence(12, 500 + 10 * k + s, { tag, sigmas: 2 / Math.sqrt(W(tag)) }).firstNamed.get(tag) ?? Infinity,
      ),
    );
    const sorted = [...firsts].sort((a, b) => a - b);
    expect(sorted[Math.floor(sorted.length / 2)]).toBeLessThanOrEqual(10);
    expect(firsts.filter((x) => x <= 10).length / firsts.length).toBeGreaterThanOrEqual(0.7);
  });
  test('a sustained bias of 5 in its test value is named within ≤ 2 of its rounds', () => {
    const firsts = SEPARABLE.flatMap((tag, k) =>
      [1, 2].map(
        (s) => sequence(3, 700 + 10 * k + s, { tag, sigmas: 5 / Math.sqrt(W(tag)) }).firstNamed.get(tag) ?? Infinity,
      ),
    );
    expect(firsts.filter((x) => x <= 2).length / firsts.length).toBeGreaterThanOrEqual(0.9);
  });
});
