import fc from 'fast-check';
import { linear, reconcile } from '@/shared/reconcile';
import { closedForm, covFromSigmas, type Mat } from './closed-form';

const ids = (n: number, p = 'F') => Array.from({ length: n }, (_, i) => `${p}${i + 1}`);

/** incidence matrix rows → linear() constraints (rhs 0) */
const fromMatrix = (a: Mat, names: string[], rowNames: string[]) =>
  a.map((row, k) =>
    linear(rowNames[k], Object.fromEntries(row.map((c, i) => [names[i], c]).filter(([, c]) => c !== 0))),
  );

describe('linear flow network: heat exchanger with bypass (Narasimhan & Jordache 1999, data from memory)', () => {
  // Values recalled from memory of Narasimhan & Jordache (1999), "Data Reconciliation & Gross
  // Error Detection": heat exchanger with a bypass — splitter, exchanger, bypass valve, mixer,
  // six streams, measured 101.91, 64.45, 34.65, 64.20, 36.44, 98.88 with σ = 1 % of the true
  // flows 100, 64, 36, 64, 36, 100. The expected results are not taken from the book but
  // recomputed independently by the closed form x̂ = x − ΣAᵀ(AΣAᵀ)⁻¹Ax (plain arrays, see
  // closed-form.ts), so a faulty recollection of the data cannot make the check pass wrongly.
  const names = ids(6);
  const x = [101.91, 64.45, 34.65, 64.2, 36.44, 98.88];
  const s = [1.0, 0.64, 0.36, 0.64, 0.36, 1.0];
  const a: Mat = [
    [1, -1, -1, 0, 0, 0], // splitter
    [0, 1, 0, -1, 0, 0], // exchanger
    [0, 0, 1, 0, -1, 0], // bypass valve
    [0, 0, 0, 1, 1, -1], // mixer
  ];
  const ref = closedForm(a, [0, 0, 0, 0], x, covFromSigmas(s));
  const r = reconcile({
    measured: names.map((id, i) => ({ id, value: x[i], sigma: s[i] })),
    constraints: fromMatrix(a, names, ['split', 'hx', 'valve', 'mix']),
  });

  test('reconciled values, σ, corrections equal the closed form', () => {
    names.forEach((id, i) => {
      expect(r.values[id]).toBeCloseTo(ref.xhat[i], 10);
      expect(r.corrections[id]).toBeCloseTo(ref.xhat[i] - x[i], 10);
      expect(r.sigmas[id]).toBeCloseTo(Math.sqrt(ref.cov[i][i]), 10);
      expect(r.z[id]).toBeCloseTo(ref.z[i], 8);
    });
    // the balances close (conservation, common practice check)
    expect(r.values.F1 - r.values.F2 - r.values.F3).toBeCloseTo(0, 10);
    expect(r.values.F4 + r.values.F5 - r.values.F6).toBeCloseTo(0, 10);
  });

  test('global test: χ² = eᵀΣ⁻¹e equals rᵀ(AΣAᵀ)⁻¹r, dof 4, critical χ²(0.95, 4) = 9.488 (χ² table)', () => {
    expect(r.chiSquare).toBeCloseTo(ref.chi2, 9);
    expect(r.dof).toBe(4);
    expect(r.critical).toBeCloseTo(9.488, 3);
    expect(r.passed).toBe(ref.chi2 <= 9.4877);
    expect(r.iterations).toBeLessThanOrEqual(2);
    expect(r.redundant).toEqual(names);
  });

  test('constraint test |r_k|/sqrt((AΣAᵀ)_kk) at the measured values (nodal/constraint test, Narasimhan & Jordache 1999)', () => {
    a.forEach((row, k) => {
      const rk = row.reduce((acc, c, i) => acc + c * x[i], 0);
      const skk = row.reduce((acc, c, i) => acc + c * c * s[i] * s[i], 0);
      expect(r.constraintTests[['split', 'hx', 'valve', 'mix'][k]]).toBeCloseTo(Math.abs(rk) / Math.sqrt(skk), 10);
    });
  });
});

describe('VDI 2048 part 1 conventions on a two-meter case', () => {
  // The worked example of VDI 2048 part 1 could not be reconstructed from memory with confidence,
  // so this checks its conventions on the smallest redundant case, solved by hand: one flow
  // measured by two meters, 95 % intervals U given, σ = U/1.96 (VDI 2048). Closed form:
  // x̂ = (x_a/σa² + x_b/σb²)/(1/σa² + 1/σb²), χ² = (x_a − x_b)²/(σa² + σb²),
  // |v_i|/sqrt(Var v_i) = |x_a − x_b|/sqrt(σa² + σb²) for both, held against 1.96.
  const Ua = 2.0; // kg/s, 95 %
  const Ub = 3.0;
  const sa = Ua / 1.96;
  const sb = Ub / 1.96;
  const xa = 101.0;
  const xb = 97.5;
  const r = reconcile({
    measured: [
      { id: 'feedwater_a', value: xa, sigma: sa },
      { id: 'feedwater_b', value: xb, sigma: sb },
    ],
    constraints: [linear('same_flow', { feedwater_a: 1, feedwater_b: -1 })],
  });
  test('weighted mean, its σ, χ² and normalised corrections by hand', () => {
    const w = 1 / sa ** 2 + 1 / sb ** 2;
    const mean = (xa / sa ** 2 + xb / sb ** 2) / w;
    expect(r.values.feedwater_a).toBeCloseTo(mean, 12);
    expect(r.values.feedwater_b).toBeCloseTo(mean, 12);
    expect(r.sigmas.feedwater_a).toBeCloseTo(Math.sqrt(1 / w), 12);
    const chi2 = (xa - xb) ** 2 / (sa ** 2 + sb ** 2);
    expect(r.chiSquare).toBeCloseTo(chi2, 12);
    const zz = Math.abs(xa - xb) / Math.sqrt(sa ** 2 + sb ** 2);
    expect(r.z.feedwater_a).toBeCloseTo(zz, 12);
    expect(r.z.feedwater_b).toBeCloseTo(zz, 12);
    expect(r.zCritical).toBeCloseTo(1.96, 2); // VDI 2048: |v_i|/sqrt(Var v_i) ≤ 1.96 at 95 %
    expect(r.dof).toBe(1);
    expect(r.passed).toBe(chi2 <= 3.841);
  });
});

describe('χ² critical values against published χ² tables (e.g. NIST/SEMATECH e-Handbook, table 1.3.6.7.4)', () => {
  // k + 1 meters on one flow give k independent constraints, hence dof = k
  const chain = (k: number, confidence?: number) =>
    reconcile({
      measured: Array.from({ length: k + 1 }, (_, i) => ({ id: `m${i}`, value: 50 + (i % 2) * 0.1, sigma: 1 })),
      constraints: Array.from({ length: k }, (_, i) => linear(`eq${i}`, { [`m${i}`]: 1, [`m${i + 1}`]: -1 })),
      confidence,
    });
  test.each([
    [1, 0.95, 3.841],
    [2, 0.95, 5.991],
    [3, 0.95, 7.815],
    [5, 0.95, 11.07],
    [10, 0.95, 18.307],
    [1, 0.99, 6.635],
    [5, 0.99, 15.086],
    [2, 0.9, 4.605],
  ])('χ²(%p dof) at %p = %p', (k, conf, table) => {
    const r = chain(k, conf);
    expect(r.dof).toBe(k);
    expect(r.critical).toBeCloseTo(table, 3);
  });
  test('normal quantiles (standard normal table): two-sided 95 % → 1.960, 99 % → 2.576, 90 % → 1.645', () => {
    expect(chain(1, 0.95).zCritical).toBeCloseTo(1.96, 3);
    expect(chain(1, 0.99).zCritical).toBeCloseTo(2.576, 3);
    expect(chain(1, 0.9).zCritical).toBeCloseTo(1.645, 3);
  });
});

describe('unmeasured variables: observable and unobservable (Crowe, Campos & Hrymak 1983 classification)', () => {
  // Network: node A splits F1 into F2 and F3, node B joins them into F4, node C splits F4 into F5
  // and F6. Measured F1, F4, F5; unmeasured F2, F3 (parallel: only their sum is known →
  // unobservable), F6 (= F4 − F5 → observable). Reduced constraint by hand: F1 − F4 = 0, so F1 and
  // F4 are redundant, F5 is not.
  const r = reconcile({
    measured: [
      { id: 'F1', value: 100.8, sigma: 1.0 },
      { id: 'F4', value: 98.9, sigma: 1.5 },
      { id: 'F5', value: 40.2, sigma: 0.8 },
    ],
    unmeasured: [{ id: 'F2' }, { id: 'F3', guess: 30 }, { id: 'F6' }],
    constraints: [
      linear('A', { F1: 1, F2: -1, F3: -1 }),
      linear('B', { F2: 1, F3: 1, F4: -1 }),
      linear('C', { F4: 1, F5: -1, F6: -1 }),
    ],
  });
  test('classification', () => {
    expect(r.redundant).toEqual(['F1', 'F4']);
    expect(r.observable).toEqual(['F6']);
    expect(r.unobservable.sort()).toEqual(['F2', 'F3']);
    expect(r.values.F2).toBeUndefined();
    expect(r.values.F3).toBeUndefined();
    expect(r.z.F5).toBeNull();
    expect(r.dof).toBe(1);
  });
  test('values and σ by hand: weighted mean of F1, F4; F6 = F̂4 − F5 with σ² = σ²(F̂4) + σ5²', () => {
    const w = 1 / 1 ** 2 + 1 / 1.5 ** 2;
    const mean = (100.8 / 1 + 98.9 / 1.5 ** 2) / w;
    expect(r.values.F1).toBeCloseTo(mean, 10);
    expect(r.values.F4).toBeCloseTo(mean, 10);
    expect(r.sigmas.F4).toBeCloseTo(Math.sqrt(1 / w), 10);
    expect(r.values.F5).toBe(40.2);
    expect(r.corrections.F5).toBe(0);
    expect(r.sigmas.F5).toBeCloseTo(0.8, 12);
    expect(r.values.F6).toBeCloseTo(mean - 40.2, 10);
    expect(r.sigmas.F6).toBeCloseTo(Math.sqrt(1 / w + 0.8 ** 2), 10);
    // constraints A and B read unmeasured variables, C too: no stand-alone constraint test
    expect(r.constraintTests).toEqual({});
  });

  test('observable unmeasured stream in the heat exchanger network equals the hand-eliminated closed form', () => {
    // F2 unmeasured: the exchanger gives F2 = F4, so the reduced constraints are
    // F1 − F3 − F4 = 0, F3 − F5 = 0, F4 + F5 − F6 = 0 on the measured F1, F3, F4, F5, F6.
    const x = [101.91, 34.65, 64.2, 36.44, 98.88];
    const s = [1.0, 0.36, 0.64, 0.36, 1.0];
    const names = ['F1', 'F3', 'F4', 'F5', 'F6'];
    const reduced: Mat = [
      [1, -1, -1, 0, 0],
      [0, 1, 0, -1, 0],
      [0, 0, 1, 1, -1],
    ];
    const ref = closedForm(reduced, [0, 0, 0], x, covFromSigmas(s));
    const res = reconcile({
      measured: names.map((id, i) => ({ id, value: x[i], sigma: s[i] })),
      unmeasured: [{ id: 'F2' }],
      constraints: [
        linear('split', { F1: 1, F2: -1, F3: -1 }),
        linear('hx', { F2: 1, F4: -1 }),
        linear('valve', { F3: 1, F5: -1 }),
        linear('mix', { F4: 1, F5: 1, F6: -1 }),
      ],
    });
    names.forEach((id, i) => {
      expect(res.values[id]).toBeCloseTo(ref.xhat[i], 10);
      expect(res.sigmas[id]).toBeCloseTo(Math.sqrt(ref.cov[i][i]), 10);
      expect(res.z[id]).toBeCloseTo(ref.z[i], 8);
    });
    expect(res.values.F2).toBeCloseTo(ref.xhat[2], 10);
    expect(res.sigmas.F2).toBeCloseTo(Math.sqrt(ref.cov[2][2]), 10);
    expect(res.chiSquare).toBeCloseTo(ref.chi2, 9);
    expect(res.dof).toBe(3);
    expect(res.observable).toEqual(['F2']);
    // valve and mix read only measured streams
    expect(Object.keys(res.constraintTests).sort()).toEqual(['mix', 'valve']);
  });
});

describe('correlated measurements (VDI 2048 part 1: full covariance matrix)', () => {
  // Same flow measured by three meters; meters a and b share a reference (ρ = 0.6).
  // Closed form with the full Σ (plain arrays).
  test('values, σ, χ² equal the closed form with off-diagonal Σ', () => {
    const x = [50.4, 50.9, 49.6];
    const s = [0.5, 0.4, 0.6];
    const sigma = covFromSigmas(s, [{ i: 0, j: 1, rho: 0.6 }]);
    const a: Mat = [
      [1, -1, 0],
      [0, 1, -1],
    ];
    const ref = closedForm(a, [0, 0], x, sigma);
    const r = reconcile({
      measured: ['a', 'b', 'c'].map((id, i) => ({ id, value: x[i], sigma: s[i] })),
      constraints: [linear('ab', { a: 1, b: -1 }), linear('bc', { b: 1, c: -1 })],
      correlations: [{ a: 'a', b: 'b', rho: 0.6 }],
    });
    ['a', 'b', 'c'].forEach((id, i) => {
      expect(r.values[id]).toBeCloseTo(ref.xhat[i], 10);
      expect(r.sigmas[id]).toBeCloseTo(Math.sqrt(ref.cov[i][i]), 10);
      expect(r.z[id]).toBeCloseTo(ref.z[i], 8);
    });
    expect(r.chiSquare).toBeCloseTo(ref.chi2, 10);
    // the correlation matters: without it the answer differs
    const un = closedForm(a, [0, 0], x, covFromSigmas(s));
    expect(Math.abs(un.xhat[0] - ref.xhat[0])).toBeGreaterThan(1e-3);
  });
});

describe('serial elimination finds a 10σ gross error (serial elimination with the measurement test, Narasimhan & Jordache 1999)', () => {
  // 7 streams, 4 nodes (common practice test network, every column distinct so a single
  // error is identifiable): S1→N1; N1→N2 (S2), N1→N3 (S3), N2→N3 (S4), N2→N4 (S5), N3→N4 (S6); N4→S7.
  const names = ids(7, 'S');
  const truth = [100, 60, 40, 20, 40, 60, 100];
  const s = truth.map((t) => Math.max(0.5, 0.02 * t));
  const noise = [0.3, -0.5, 0.2, 0.4, -0.6, 0.1, -0.2]; // in σ, fixed, all below 1σ
  const a: Mat = [
    [1, -1, -1, 0, 0, 0, 0],
    [0, 1, 0, -1, -1, 0, 0],
    [0, 0, 1, 1, 0, -1, 0],
    [0, 0, 0, 0, 1, 1, -1],
  ];
  const cons = fromMatrix(a, names, ['N1', 'N2', 'N3', 'N4']);
  test('no gross error: global test passes, no suspect', () => {
    const r = reconcile({
      measured: names.map((id, i) => ({ id, value: truth[i] + noise[i] * s[i], sigma: s[i] })),
      constraints: cons,
    });
    expect(r.passed).toBe(true);
    expect(r.suspects).toEqual([]);
    expect(r.final.chiSquare).toBe(r.chiSquare);
  });
  test.each(names.map((id, i) => [id, i]))('10σ error on %s is named first and removed; final passes', (id, j) => {
    const x = truth.map((t, i) => t + noise[i] * s[i] + (i === j ? 10 * s[i] : 0));
    const r = reconcile({ measured: names.map((nm, i) => ({ id: nm, value: x[i], sigma: s[i] })), constraints: cons });
    expect(r.passed).toBe(false);
    const ref = closedForm(a, [0, 0, 0, 0], x, covFromSigmas(s));
    expect(r.chiSquare).toBeCloseTo(ref.chi2, 8);
    // the largest normalised correction points at the faulty meter
    const zmax = Math.max(...ref.z);
    expect(ref.z[j]).toBe(zmax);
    expect(r.suspects[0]).toBe(id);
    expect(r.final.passed).toBe(true);
    expect(r.final.dof).toBe(3);
    // with the meter unmeasured its value is estimated from the others (within 3σ of the truth)
    expect(Math.abs(r.final.values[id] - truth[j])).toBeLessThan(3 * s[j]);
    // final equals the closed form with the suspect eliminated by hand: use a row k with
    // a_kj ≠ 0 to remove S_j from the other rows, drop row k and column j
    const k = a.findIndex((row) => row[j] !== 0);
    const red: Mat = a
      .filter((_, i) => i !== k)
      .map((row) => row.map((v, c) => v - (row[j] / a[k][j]) * a[k][c]).filter((_, c) => c !== j));
    const keep = names.map((_, i) => i).filter((i) => i !== j);
    const fin = closedForm(
      red,
      new Array(red.length).fill(0),
      keep.map((i) => x[i]),
      covFromSigmas(keep.map((i) => s[i])),
    );
    keep.forEach((i, c) => expect(r.final.values[names[i]]).toBeCloseTo(fin.xhat[c], 8));
    expect(r.final.chiSquare).toBeCloseTo(fin.chi2, 8);
    expect(r.final.chiSquare).toBeLessThan(r.final.critical);
  });
});

describe('random linear networks: engine equals the closed form (property test, fast-check)', () => {
  test('x̂, σ and χ² agree for random full-row-rank incidence matrices', () => {
    fc.assert(
      fc.property(fc.integer({ min: 3, max: 9 }), fc.integer({ min: 0, max: 1_000_000 }), (n, seed) => {
        let st = seed + 1;
        const rnd = () => (st = (st * 16807) % 2147483647) / 2147483647;
        const m = Math.max(1, Math.floor(n / 2));
        // constraint k ties variable k to a random mix of the others (full row rank by construction)
        const a: Mat = Array.from({ length: m }, (_, k) =>
          Array.from({ length: n }, (_, i) => (i === k ? 1 : i >= m && rnd() < 0.6 ? -(0.2 + rnd()) : 0)),
        );
        for (let k = 0; k < m; k++) a[k][m + (k % (n - m))] = -(0.5 + rnd());
        const x = Array.from({ length: n }, () => 10 + 90 * rnd());
        const s = Array.from({ length: n }, () => 0.1 + 2 * rnd());
        const names = ids(n, 'v');
        const ref = closedForm(a, new Array(m).fill(0), x, covFromSigmas(s));
        const r = reconcile({
          measured: names.map((id, i) => ({ id, value: x[i], sigma: s[i] })),
          constraints: fromMatrix(a, names, ids(m, 'c')),
        });
        names.forEach((id, i) => {
          expect(r.values[id]).toBeCloseTo(ref.xhat[i], 8);
          expect(r.sigmas[id]).toBeCloseTo(Math.sqrt(ref.cov[i][i]), 8);
        });
        expect(r.chiSquare).toBeCloseTo(ref.chi2, 6);
        expect(r.dof).toBe(m);
      }),
      { numRuns: 60 },
    );
  });
});
