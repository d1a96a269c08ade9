/**
 * The covariance of reconciled values (shared/reconcile/sensitivity.ts) against closed forms
 * derived by hand from VDI 2048 part 1 (cov(x̂) = Σ − ΣAᵀ(AΣAᵀ)⁻¹AΣ for linear constraints
 * A·x = 0) and against reconcile()'s own σ on the nonlinear demo unit.
 */
import { analyseRound, buildEquations, type AcceptedReading } from '@/shared/cycle';
import { demoDesignReadings, demoUnit } from '@/demo/unit';
import { linear, reconcile } from '@/shared/reconcile';
import { reconciledSensitivity } from '@/shared/reconcile/sensitivity';
import { sigmaFor } from '@/shared/uncertainty';

describe('one splitter a = b + c, σ = 1, 2, 2 (closed form by hand)', () => {
  // AΣAᵀ = 1 + 4 + 4 = 9, ΣAᵀ = (1, −4, −4):
  // cov = diag(1, 4, 4) − (1/9)·[[1, −4, −4], [−4, 16, 16], [−4, 16, 16]]
  const input = {
    measured: [
      { id: 'a', value: 10.3, sigma: 1 },
      { id: 'b', value: 6.1, sigma: 2 },
      { id: 'c', value: 3.9, sigma: 2 },
    ],
    constraints: [linear('split', { a: 1, b: -1, c: -1 })],
  };
  const r = reconcile(input);
  const s = reconciledSensitivity(input, r);

  test('covariances', () => {
    expect(s.covariance('a', 'a')).toBeCloseTo(1 - 1 / 9, 12);
    expect(s.covariance('b', 'b')).toBeCloseTo(4 - 16 / 9, 12);
    expect(s.covariance('a', 'b')).toBeCloseTo(4 / 9, 12);
    expect(s.covariance('b', 'c')).toBeCloseTo(-16 / 9, 12);
  });

  test('redundancy numbers r_ii = σ_i²·(AᵀA)_ii/(AΣAᵀ): 1/9, 4/9, 4/9; they sum to the dof (1)', () => {
    expect(s.redundancy('a')).toBeCloseTo(1 / 9, 12);
    expect(s.redundancy('b')).toBeCloseTo(4 / 9, 12);
    expect(s.redundancy('a') + s.redundancy('b') + s.redundancy('c')).toBeCloseTo(r.dof, 12);
  });

  test('the gain reproduces the reconciled values: x̂ = S·x_m (linear, rhs 0)', () => {
    for (const [k, id] of s.outputs.entries()) {
      const v = input.measured.reduce((acc, m, j) => acc + s.gain[k * 3 + j] * m.value, 0);
      expect(v).toBeCloseTo(r.values[id], 12);
    }
  });
});

test('an unmeasured variable u = b (a = u + c): cov(u, a) = cov(b̂, â) = 4/9, var(u) = 20/9 (closed form by hand)', () => {
  const input = {
    measured: [
      { id: 'a', value: 10.3, sigma: 1 },
      { id: 'b', value: 6.1, sigma: 2 },
      { id: 'c', value: 3.9, sigma: 2 },
    ],
    unmeasured: [{ id: 'u', guess: 5 }],
    constraints: [linear('split', { a: 1, u: -1, c: -1 }), linear('same', { u: 1, b: -1 })],
  };
  const r = reconcile(input);
  const s = reconciledSensitivity(input, r);
  expect(s.covariance('u', 'u')).toBeCloseTo(20 / 9, 10);
  expect(s.covariance('u', 'a')).toBeCloseTo(4 / 9, 10);
  expect(Math.sqrt(s.covariance('u', 'u'))).toBeCloseTo(r.sigmas.u, 10);
  expect(s.redundancy('b')).toBeCloseTo(4 / 9, 10);
});

test('correlated inputs: σ = 1, 1 twins with ρ = 0.5 read the same value; var = (1 + ρ)/2 = 0.75 (closed form by hand)', () => {
  const input = {
    measured: [
      { id: 'x', value: 1, sigma: 1 },
      { id: 'y', value: 1.2, sigma: 1 },
    ],
    constraints: [linear('twin', { x: 1, y: -1 })],
    correlations: [{ a: 'x', b: 'y', rho: 0.5 }],
  };
  const r = reconcile(input);
  const s = reconciledSensitivity(input, r);
  expect(s.covariance('x', 'x')).toBeCloseTo(0.75, 12);
  expect(Math.sqrt(s.covariance('x', 'x'))).toBeCloseTo(r.sigmas.x, 12);
});

test('demo unit at design (nonlinear IF97 balances): the diagonal equals reconcile()’s σ of every reconciled value', () => {
  const b = 101_325;
  const readings = demoDesignReadings(b);
  const acc = new Map<string, AcceptedReading>();
  for (const r of readings) {
    const i = demoUnit.instruments.find((x) => x.tag === r.instrumentTag)!;
    const sig = sigmaFor(i.accuracy, r.valueSI);
    acc.set(i.tag, { tag: i.tag, value: r.valueSI, sigma: sig });
  }
  const eq = buildEquations(demoUnit, acc);
  const input = { measured: eq.measured, unmeasured: eq.unmeasured, constraints: eq.constraints, tolerance: 1e-8 };
  const res = reconcile(input);
  const s = reconciledSensitivity(input, res);
  expect(s.outputs.length).toBeGreaterThan(eq.measured.length);
  for (const id of s.outputs) {
    const sd = Math.sqrt(Math.max(0, s.covariance(id, id)));
    expect(Math.abs(sd - res.final.sigmas[id])).toBeLessThanOrEqual(
      1e-6 * Math.max(res.final.sigmas[id], 1e-9) + 1e-12,
    );
  }
  // analyseRound runs on the same system: it stays a valid analysis
  expect(analyseRound(demoUnit, readings, { barometricPa: b }).reconciliation.ok).toBe(true);
});
