/**
 * Property tests (fast-check) of shared/reconcile on random linear mass-balance networks.
 *
 * Networks: random directed acyclic graphs of 1–7 nodes fed from and draining to the
 * environment; every node has a mass balance Σ in − Σ out = b_k (b = 0 for a steady node, or a
 * random known accumulation). Every stream is measured with a random σ (0.1–10 % of its value).
 * The node-arc incidence matrix A of a connected network with the environment left out has full
 * row rank (graph theory, e.g. Narasimhan & Jordache 1999, ch. 3, from memory).
 *
 * Oracle, computed here with ml-matrix (LU solve), independently of the engine's QR / projection
 * path: the closed-form weighted least-squares solution under linear constraints
 *     x̂ = x − Σ Aᵀ (A Σ Aᵀ)⁻¹ (A x − b)
 *     cov(x̂) = Σ − Σ Aᵀ (A Σ Aᵀ)⁻¹ A Σ,   V_e = Σ Aᵀ (A Σ Aᵀ)⁻¹ A Σ (covariance of the corrections)
 *     χ² = rᵀ (A Σ Aᵀ)⁻¹ r with r = A x − b   (= eᵀ Σ⁻¹ e, e = x̂ − x)
 *     z_i = |e_i| / sqrt(V_e,ii)
 * (VDI 2048 part 1; Narasimhan & Jordache 1999, "Data Reconciliation & Gross Error Detection",
 * ch. 3 and 7; Kuehn & Davidson 1961).
 * Tolerances (common practice: the two computations differ in their round-off only, which grows
 * with the condition of A Σ Aᵀ — σ ratios here up to 1e4 — and with the size of the corrections):
 * values 1e-9 of max(|x|, |x̂|, σ) plus 1e-9 σ per unit of the largest z; z 1e-8 of the largest z
 * plus the cancellation of a correction x̂ − x (16 ε |x| / sqrt(V_e,ii));
 * χ² 1e-8 relative; variances of x̂ 1e-7 σ².
 */
import fc from 'fast-check';
import { fixPropertySeed } from '../../helpers/property-seed';
import { CholeskyDecomposition, Matrix, solve } from 'ml-matrix';
import { linear, reconcile, type Correlation, type ReconcileResult } from '@/shared/reconcile';

fixPropertySeed();

// a property's run time depends on the cases drawn; leave room on a loaded machine (whole suite on 2 cores)
jest.setTimeout(20_000);

// ---------------------------------------------------------------- networks

interface Network {
  /** number of nodes (balances) */
  n: number;
  /** streams: from −1 = environment (feed), to n = environment (product) */
  edges: { from: number; to: number }[];
  /** node-arc incidence matrix, n × m: +1 into the node, −1 out of it */
  a: number[][];
}

const network: fc.Arbitrary<Network> = fc.integer({ min: 1, max: 7 }).chain((n) =>
  fc
    .record({
      parents: fc.array(fc.nat(), { minLength: n, maxLength: n }),
      extra: fc.array(fc.tuple(fc.nat(), fc.nat()), { maxLength: 8 }),
    })
    .map(({ parents, extra }) => {
      const edges: { from: number; to: number }[] = [];
      // each node is fed by an earlier node or the environment: the network is connected
      parents.forEach((q, k) => edges.push({ from: (q % (k + 1)) - 1, to: k }));
      for (const [u, v] of extra) {
        const i = (u % (n + 2)) - 1;
        const j = (v % (n + 2)) - 1;
        const from = Math.min(i, j);
        const to = Math.max(i, j);
        if (from === to || (from === -1 && to === n) || to === -1 || from === n) continue;
        edges.push({ from, to });
      }
      // each node drains somewhere (a node with no outlet could not balance positive flows)
      for (let k = 0; k < n; k++) if (!edges.some((e) => e.from === k)) edges.push({ from: k, to: n });
      const a = Array.from({ length: n }, (_, k) => edges.map((e) => (e.to === k ? 1 : e.from === k ? -1 : 0)));
      return { n, edges, a };
    }),
);

interface Problem {
  net: Network;
  x: number[];
  sigma: number[];
  b: number[];
  /** correlation coefficients, i < j */
  rho: { i: number; j: number; rho: number }[];
}

/**
 * Measurements: either balanced true flows plus σ-sized noise (the global test mostly passes) or
 * plain random values (gross errors everywhere, serial elimination runs). σ: 0.1–10 % of the value
 * (of 10 for values below 10).
 */
function problem(opts: { accumulation: boolean; correlated: boolean }): fc.Arbitrary<Problem> {
  return network.chain((net) => {
    const m = net.edges.length;
    const vec = (min: number, max: number) =>
      fc.array(fc.double({ min, max, noNaN: true }), { minLength: m, maxLength: m });
    return fc
      .record({
        base: vec(10, 1000),
        rel: vec(0.001, 0.1),
        noise: vec(-3, 3),
        balanced: fc.boolean(),
        b: fc.array(opts.accumulation ? fc.double({ min: -50, max: 50, noNaN: true }) : fc.constant(0), {
          minLength: net.n,
          maxLength: net.n,
        }),
        factor: fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: m * 2, maxLength: m * 2 }),
      })
      .map(({ base, rel, noise, balanced, b, factor }) => {
        let x = base;
        if (balanced) {
          // project the random flows onto A x = b (least squares, unit weights), then add noise
          const A = new Matrix(net.a);
          const r = A.mmul(Matrix.columnVector(base)).sub(Matrix.columnVector(b));
          const corr = A.transpose().mmul(solve(A.mmul(A.transpose()), r));
          x = base.map((v, i) => v - corr.get(i, 0));
        }
        // σ from 0.01 to 100: ratios up to 1e4 keep A Σ Aᵀ within ~1e8 of singular
        const sigma = x.map((v, i) => Math.max(Math.abs(v), 10) * rel[i]);
        const xm = balanced ? x.map((v, i) => v + noise[i] * sigma[i]) : x;
        const rho: Problem['rho'] = [];
        if (opts.correlated && m > 1) {
          // a random correlation matrix: C = normalised (L Lᵀ + I) from a random m × 2 factor L
          const L = Matrix.from1DArray(m, 2, factor);
          const c = L.mmul(L.transpose()).add(Matrix.eye(m));
          for (let i = 0; i < m; i++) {
            for (let j = i + 1; j < m; j++) {
              const v = c.get(i, j) / Math.sqrt(c.get(i, i) * c.get(j, j));
              if (v !== 0) rho.push({ i, j, rho: v });
            }
          }
        }
        return { net, x: xm, sigma, b, rho };
      });
  });
}

// ---------------------------------------------------------------- oracle (ml-matrix)

interface Reference {
  xhat: number[];
  sd: number[];
  corrections: number[];
  chi2: number;
  chi2FromCorrections: number;
  z: number[];
  /** V_e,ii / σ_i²: the share of the variance the reconciliation removes */
  veShare: number[];
}

function covariance(p: Problem): Matrix {
  const m = p.x.length;
  const s = Matrix.zeros(m, m);
  for (let i = 0; i < m; i++) s.set(i, i, p.sigma[i] ** 2);
  for (const { i, j, rho } of p.rho) {
    s.set(i, j, rho * p.sigma[i] * p.sigma[j]);
    s.set(j, i, rho * p.sigma[i] * p.sigma[j]);
  }
  return s;
}

function closedForm(p: Problem): Reference {
  const A = new Matrix(p.net.a);
  const S = covariance(p);
  const x = Matrix.columnVector(p.x);
  const SAt = S.mmul(A.transpose());
  const M = A.mmul(SAt); // A Σ Aᵀ
  const r = A.mmul(x).sub(Matrix.columnVector(p.b));
  const lambda = solve(M, r);
  const e = SAt.mmul(lambda).mul(-1);
  const xhat = x.clone().add(e);
  const Ve = SAt.mmul(solve(M, SAt.transpose()));
  const cov = S.clone().sub(Ve);
  const chi2 = r.transpose().mmul(lambda).get(0, 0);
  const chi2FromCorrections = e.transpose().mmul(solve(S, e)).get(0, 0);
  const m = p.x.length;
  return {
    xhat: xhat.getColumn(0),
    corrections: e.getColumn(0),
    sd: Array.from({ length: m }, (_, i) => Math.sqrt(Math.max(cov.get(i, i), 0))),
    chi2,
    chi2FromCorrections,
    z: Array.from({ length: m }, (_, i) => Math.abs(e.get(i, 0)) / Math.sqrt(Ve.get(i, i))),
    veShare: Array.from({ length: m }, (_, i) => Ve.get(i, i) / p.sigma[i] ** 2),
  };
}

// ---------------------------------------------------------------- engine

const streamId = (i: number) => `F${i + 1}`;

function run(p: Problem, extraRows: { coeffs: number[]; rhs: number }[] = []): ReconcileResult {
  const rows = [...p.net.a.map((coeffs, k) => ({ coeffs, rhs: p.b[k] })), ...extraRows];
  return reconcile({
    measured: p.x.map((value, i) => ({ id: streamId(i), value, sigma: p.sigma[i] })),
    constraints: rows.map(({ coeffs, rhs }, k) =>
      linear(`node${k + 1}`, Object.fromEntries(coeffs.flatMap((c, i) => (c !== 0 ? [[streamId(i), c]] : []))), rhs),
    ),
    correlations: p.rho.map(({ i, j, rho }): Correlation => ({ a: streamId(i), b: streamId(j), rho })),
  });
}

function expectClosedForm(r: ReconcileResult, p: Problem, ref: Reference): void {
  const m = p.x.length;
  // every correction carries the round-off of the multipliers λ, whose size is set by the largest
  // normalised correction: z is compared on that scale
  const zScale = Math.max(1, ...ref.z);
  for (let i = 0; i < m; i++) {
    const id = streamId(i);
    // relative to the larger of the measured and reconciled value (a gross error moves a value
    // far), plus the round-off of λ on this value's σ (see zScale)
    // (4e-9, not 1e-9: with σ spanning four decades the round-off of both sides grows with the
    // conditioning; a random network with σ from 0.01 to 55.8 missed 1e-9 by 1 part in 1e7)
    const tol = 4e-9 * Math.max(Math.abs(p.x[i]), Math.abs(ref.xhat[i]), p.sigma[i]) + 4e-9 * p.sigma[i] * zScale;
    expect(Math.abs(r.values[id] - ref.xhat[i])).toBeLessThanOrEqual(tol);
    expect(Math.abs(r.corrections[id] - ref.corrections[i])).toBeLessThanOrEqual(tol);
    // compared as variances: Σ − V_e loses digits to cancellation when V_e,ii ≈ σ_i², in the
    // oracle as in the engine, so σ(x̂) itself is only good to ~sqrt(ε)·σ there
    // (that cancellation is ε·cond(AΣAᵀ) ≈ 2e-8 at σ ratios of 1e4: hence 1e-7 σ²)
    expect(Math.abs(r.sigmas[id] ** 2 - ref.sd[i] ** 2)).toBeLessThanOrEqual(1e-7 * p.sigma[i] ** 2);
    expect(r.z[id]).not.toBeNull();
    // plus the cancellation in a correction taken as x̂ − x: ε·|x|/σ, divided by sqrt(V_e,ii)/σ
    const cancel =
      (16 * Number.EPSILON * Math.max(Math.abs(p.x[i]), Math.abs(ref.xhat[i]))) /
      p.sigma[i] /
      Math.sqrt(ref.veShare[i]);
    expect(Math.abs(r.z[id]! - ref.z[i])).toBeLessThanOrEqual(1e-8 * zScale + cancel);
  }
  expect(Math.abs(r.chiSquare - ref.chi2)).toBeLessThanOrEqual(1e-8 * Math.max(ref.chi2, 1));
  expect(r.dof).toBe(p.net.n);
  expect(r.passed).toBe(r.chiSquare <= r.critical);
  // the balances close at the reconciled values (conservation)
  p.net.a.forEach((row, k) => {
    const residual = row.reduce((s, c, i) => s + c * r.values[streamId(i)], 0) - p.b[k];
    // round-off scale: the terms at the measured and at the reconciled values
    const scale = row.reduce(
      (s, c, i) => s + Math.abs(c) * (Math.abs(p.x[i]) + Math.abs(r.values[streamId(i)]) + p.sigma[i] * zScale),
      0,
    );
    expect(Math.abs(residual)).toBeLessThanOrEqual(1e-9 * scale);
  });
}

// ---------------------------------------------------------------- properties

describe('random linear mass-balance networks: the engine equals the closed-form WLS solution (VDI 2048 part 1; Narasimhan & Jordache 1999)', () => {
  test('steady balances, uncorrelated σ: x̂, σ(x̂), corrections, z, χ² = rᵀ(AΣAᵀ)⁻¹r, dof', () => {
    fc.assert(
      fc.property(problem({ accumulation: false, correlated: false }), (p) => {
        const ref = closedForm(p);
        // the two χ² forms agree (a check of the oracle itself: rᵀ(AΣAᵀ)⁻¹r = eᵀΣ⁻¹e)
        expect(Math.abs(ref.chi2 - ref.chi2FromCorrections)).toBeLessThanOrEqual(1e-8 * Math.max(ref.chi2, 1));
        expectClosedForm(run(p), p, ref);
      }),
      { numRuns: 150 },
    );
  });

  test('known accumulations (A x = b, b ≠ 0) and correlated measurements (full Σ)', () => {
    fc.assert(
      fc.property(problem({ accumulation: true, correlated: true }), (p) => {
        const S = covariance(p);
        expect(new CholeskyDecomposition(S).isPositiveDefinite()).toBe(true);
        expectClosedForm(run(p), p, closedForm(p));
      }),
      { numRuns: 100 },
    );
  });

  test('a redundant balance (the sum of two node balances: the two nodes as one) changes nothing', () => {
    fc.assert(
      fc.property(
        problem({ accumulation: true, correlated: false }).filter((p) => p.net.n >= 2),
        fc.nat(),
        fc.nat(),
        (p, u, v) => {
          const k1 = u % p.net.n;
          const k2 = (k1 + 1 + (v % (p.net.n - 1))) % p.net.n;
          const merged = { coeffs: p.net.a[k1].map((c, i) => c + p.net.a[k2][i]), rhs: p.b[k1] + p.b[k2] };
          fc.pre(merged.coeffs.some((c) => c !== 0));
          expectClosedForm(run(p, [merged]), p, closedForm(p));
        },
      ),
      { numRuns: 100 },
    );
  });

  test('a reading off by a unit factor (×3.6, ×100, ×1000: t/h for kg/s, kPa for bar…), a gross error of up to ~1e6 σ, still gives the closed form', () => {
    fc.assert(
      fc.property(
        problem({ accumulation: false, correlated: false }),
        fc.nat(),
        fc.constantFrom(3.6, 100, 1000, 1 / 1000),
        (p, k, f) => {
          const i = k % p.x.length;
          const bad = { ...p, x: p.x.map((v, j) => (j === i ? v * f : v)) };
          expectClosedForm(run(bad), bad, closedForm(bad));
        },
      ),
      { numRuns: 100 },
    );
  });

  test('scaling every σ by c leaves x̂ and z unchanged and divides χ² by c² (WLS invariance, common practice)', () => {
    fc.assert(
      fc.property(
        problem({ accumulation: false, correlated: false }),
        fc.double({ min: 0.01, max: 100, noNaN: true }),
        (p, c) => {
          const r1 = run(p);
          const r2 = run({ ...p, sigma: p.sigma.map((s) => s * c) });
          for (let i = 0; i < p.x.length; i++) {
            const id = streamId(i);
            expect(Math.abs(r2.values[id] - r1.values[id])).toBeLessThanOrEqual(
              1e-9 * Math.max(Math.abs(p.x[i]), p.sigma[i] * Math.max(c, 1)),
            );
            expect(Math.abs(r2.z[id]! * c - r1.z[id]!)).toBeLessThanOrEqual(1e-8 * Math.max(r1.z[id]!, 1));
          }
          expect(Math.abs(r2.chiSquare * c * c - r1.chiSquare)).toBeLessThanOrEqual(1e-8 * Math.max(r1.chiSquare, 1));
        },
      ),
      { numRuns: 60 },
    );
  });
});
