import { reconcile, type Constraint } from '@/shared/reconcile';
import { lagrangeNewton, type Mat, type Vec } from './closed-form';

// Successive linearisation must land on the KKT point of the nonlinear WLS problem
// (Narasimhan & Jordache 1999; VDI 2048 part 1): checked against a Lagrange–Newton solution
// with analytic first and second derivatives, computed in the test with plain arrays.

describe('heat exchanger energy balance m·cp·ΔT with the duty unmeasured (bilinear constraints)', () => {
  const cp = 4186; // J/(kg·K), liquid water near 20–90 °C (common practice constant)
  const meas = [
    { id: 'mh', value: 10.2, sigma: 0.15 }, // kg/s
    { id: 'Thi', value: 363.4, sigma: 0.5 }, // K
    { id: 'Tho', value: 331.1, sigma: 0.5 },
    { id: 'mc', value: 15.4, sigma: 0.2 },
    { id: 'Tci', value: 293.0, sigma: 0.3 },
    { id: 'Tco', value: 314.6, sigma: 0.3 },
  ];
  const cons: Constraint[] = [
    { id: 'hot', f: (v) => v.Q - v.mh * cp * (v.Thi - v.Tho) },
    { id: 'cold', f: (v) => v.Q - v.mc * cp * (v.Tco - v.Tci) },
  ];
  const r = reconcile({ measured: meas, unmeasured: [{ id: 'Q', guess: 1e6 }], constraints: cons });

  // z = [mh, Thi, Tho, mc, Tci, Tco, Q]
  const ref = lagrangeNewton({
    zm: [...meas.map((m) => m.value), 0],
    weights: [...meas.map((m) => 1 / m.sigma ** 2), 0],
    z0: [...meas.map((m) => m.value), 1e6],
    g: ([mh, thi, tho, mc, tci, tco, q]) => [q - mh * cp * (thi - tho), q - mc * cp * (tco - tci)],
    jac: ([mh, thi, tho, mc, tci, tco]) => [
      [-cp * (thi - tho), -mh * cp, mh * cp, 0, 0, 0, 1],
      [0, 0, 0, -cp * (tco - tci), mc * cp, -mc * cp, 1],
    ],
    hess: () => {
      const h1: Mat = Array.from({ length: 7 }, () => new Array(7).fill(0));
      const h2: Mat = Array.from({ length: 7 }, () => new Array(7).fill(0));
      h1[0][1] = h1[1][0] = -cp;
      h1[0][2] = h1[2][0] = cp;
      h2[3][5] = h2[5][3] = -cp;
      h2[3][4] = h2[4][3] = cp;
      return [h1, h2];
    },
  });

  test('reconciled values and duty equal the Lagrange–Newton KKT solution', () => {
    meas.forEach((m, i) => expect(r.values[m.id]).toBeCloseTo(ref.z[i], 8));
    expect(r.values.Q / ref.z[6]).toBeCloseTo(1, 11);
    // both energy balances close at the result
    expect(cons[0].f(r.values) / r.values.Q).toBeCloseTo(0, 11);
    expect(cons[1].f(r.values) / r.values.Q).toBeCloseTo(0, 11);
    expect(r.observable).toEqual(['Q']);
    expect(r.dof).toBe(1);
    expect(r.iterations).toBeGreaterThan(1);
    expect(r.iterations).toBeLessThan(15);
  });

  test('σ of the duty equals first-order propagation from the reconciled hot side (GUM §5.1.2)', () => {
    // Q = mh·cp·(Thi − Tho) at the solution; eliminating Q by hand leaves the single constraint
    // h(x) = mh(Thi − Tho) − mc(Tco − Tci) = 0, so cov(x̂) = Σ − Σaᵀ(aΣaᵀ)⁻¹aΣ with a = ∂h/∂x,
    // and var Q = ∇Qᵀ cov(x̂) ∇Q (first-order propagation).
    const x = meas.map((m) => r.values[m.id]);
    const s = meas.map((m) => m.sigma);
    const [mh, thi, tho, mc, tci, tco] = x;
    const gq = [cp * (thi - tho), mh * cp, -mh * cp, 0, 0, 0]; // ∂Q/∂x via the hot side
    const a = [thi - tho, mh, -mh, -(tco - tci), mc, -mc]; // ∂h/∂x
    // cov(x̂) = Σ − Σaᵀ(aΣaᵀ)⁻¹aΣ for the single reduced constraint
    const sa = a.map((ai, i) => ai * s[i] ** 2);
    const asa = a.reduce((acc, ai, i) => acc + ai * sa[i], 0);
    let varQ = 0;
    for (let i = 0; i < 6; i++) {
      for (let j = 0; j < 6; j++) {
        const cij = (i === j ? s[i] ** 2 : 0) - (sa[i] * sa[j]) / asa;
        varQ += gq[i] * cij * gq[j];
      }
    }
    expect(r.sigmas.Q / Math.sqrt(varQ)).toBeCloseTo(1, 6);
    // normalised corrections are all equal when dof = 1 (one reduced constraint)
    const zs = meas.map((m) => r.z[m.id]!);
    zs.forEach((zi) => expect(zi).toBeCloseTo(zs[0], 6));
    expect(r.chiSquare).toBeCloseTo(zs[0] ** 2, 6);
  });
});

describe('mixing node: mass and enthalpy balances m1 + m2 = m3, m1·h1 + m2·h2 = m3·h3 (SI units)', () => {
  // feedwater heater drain joining the condensate, values in kg/s and J/kg
  const meas = [
    { id: 'm1', value: 52.0, sigma: 0.8 },
    { id: 'm2', value: 7.9, sigma: 0.3 },
    { id: 'm3', value: 58.6, sigma: 0.9 },
    { id: 'h1', value: 4.35e5, sigma: 2.0e3 },
    { id: 'h2', value: 6.1e5, sigma: 3.0e3 },
    { id: 'h3', value: 4.66e5, sigma: 2.0e3 },
  ];
  const cons: Constraint[] = [
    { id: 'mass', f: (v) => v.m1 + v.m2 - v.m3 },
    { id: 'energy', f: (v) => v.m1 * v.h1 + v.m2 * v.h2 - v.m3 * v.h3 },
  ];
  test('equals the Lagrange–Newton KKT solution; dof 2; constraint tests at the measured values', () => {
    const r = reconcile({ measured: meas, constraints: cons });
    const ref = lagrangeNewton({
      zm: meas.map((m) => m.value),
      weights: meas.map((m) => 1 / m.sigma ** 2),
      z0: meas.map((m) => m.value),
      g: ([m1, m2, m3, h1, h2, h3]) => [m1 + m2 - m3, m1 * h1 + m2 * h2 - m3 * h3],
      jac: ([m1, m2, m3, h1, h2, h3]) => [
        [1, 1, -1, 0, 0, 0],
        [h1, h2, -h3, m1, m2, -m3],
      ],
      hess: () => {
        const h1: Mat = Array.from({ length: 6 }, () => new Array(6).fill(0));
        const h2: Mat = Array.from({ length: 6 }, () => new Array(6).fill(0));
        for (let k = 0; k < 3; k++) h2[k][k + 3] = h2[k + 3][k] = k === 2 ? -1 : 1;
        return [h1, h2];
      },
    });
    meas.forEach((m, i) => expect(r.values[m.id] / ref.z[i]).toBeCloseTo(1, 10));
    expect(r.dof).toBe(2);
    // χ² = Σ (x̂ − x)²/σ² from the reference solution
    const chi2 = meas.reduce((acc, m, i) => acc + ((ref.z[i] - m.value) / m.sigma) ** 2, 0);
    expect(r.chiSquare).toBeCloseTo(chi2, 6);
    // constraint test: |f(x_m)| / sqrt(∇fᵀΣ∇f) at the measured values
    const x: Vec = meas.map((m) => m.value);
    const s: Vec = meas.map((m) => m.sigma);
    const ge = [x[3], x[4], -x[5], x[0], x[1], -x[2]];
    const fe = x[0] * x[3] + x[1] * x[4] - x[2] * x[5];
    const se = Math.sqrt(ge.reduce((acc, gi, i) => acc + (gi * s[i]) ** 2, 0));
    expect(r.constraintTests.energy).toBeCloseTo(Math.abs(fe) / se, 6);
    const fm = x[0] + x[1] - x[2];
    expect(r.constraintTests.mass).toBeCloseTo(Math.abs(fm) / Math.sqrt(s[0] ** 2 + s[1] ** 2 + s[2] ** 2), 10);
  });

  test('analytic gradient gives the same answer as the finite-difference Jacobian', () => {
    const withGrad: Constraint[] = [
      cons[0],
      { ...cons[1], grad: (v) => ({ m1: v.h1, m2: v.h2, m3: -v.h3, h1: v.m1, h2: v.m2, h3: -v.m3 }) },
    ];
    const a = reconcile({ measured: meas, constraints: cons });
    const b = reconcile({ measured: meas, constraints: withGrad });
    meas.forEach((m) => expect(b.values[m.id] / a.values[m.id]).toBeCloseTo(1, 11));
    expect(b.chiSquare).toBeCloseTo(a.chiSquare, 7);
  });
});

describe('gas flow through a differential-pressure meter: m = C·sqrt(Δp·p/(R·T)) (non-polynomial constraint)', () => {
  // Ideal-gas air (R = 287.05 J/(kg·K), common practice value) through a meter with a fixed
  // flow coefficient C, followed by a second flow meter on the same line. The engine gets the
  // square-root form through finite differences; the reference solves the equivalent logarithmic
  // form ln m − ln C − ½(ln Δp + ln p − ln R − ln T) = 0 with its exact Hessian: same feasible set,
  // same objective, so the same KKT point, by a different path.
  const R = 287.05;
  const C = 0.012; // m²
  const meas = [
    { id: 'm', value: 5.1, sigma: 0.05 }, // kg/s
    { id: 'm2', value: 4.95, sigma: 0.08 }, // kg/s
    { id: 'dp', value: 2.5e4, sigma: 150 }, // Pa
    { id: 'p', value: 6.0e5, sigma: 3e3 }, // Pa
    { id: 'T', value: 300, sigma: 0.5 }, // K
  ];
  test('equals the Lagrange–Newton solution of the log form', () => {
    const r = reconcile({
      measured: meas,
      constraints: [
        { id: 'line', f: (v) => v.m - v.m2 },
        { id: 'meter', f: (v) => v.m - C * Math.sqrt((v.dp * v.p) / (R * v.T)) },
      ],
    });
    const ref = lagrangeNewton({
      zm: meas.map((x) => x.value),
      weights: meas.map((x) => 1 / x.sigma ** 2),
      z0: meas.map((x) => x.value),
      g: ([m, m2, dp, p, t]) => [
        m - m2,
        Math.log(m) - Math.log(C) - 0.5 * (Math.log(dp) + Math.log(p) - Math.log(R) - Math.log(t)),
      ],
      jac: ([m, , dp, p, t]) => [
        [1, -1, 0, 0, 0],
        [1 / m, 0, -0.5 / dp, -0.5 / p, 0.5 / t],
      ],
      hess: ([m, , dp, p, t]) => {
        const h1: Mat = Array.from({ length: 5 }, () => new Array(5).fill(0));
        const h2: Mat = Array.from({ length: 5 }, () => new Array(5).fill(0));
        h2[0][0] = -1 / m ** 2;
        h2[2][2] = 0.5 / dp ** 2;
        h2[3][3] = 0.5 / p ** 2;
        h2[4][4] = -0.5 / t ** 2;
        return [h1, h2];
      },
    });
    meas.forEach((x, i) => expect(r.values[x.id] / ref.z[i]).toBeCloseTo(1, 11));
    const chi2 = meas.reduce((acc, x, i) => acc + ((ref.z[i] - x.value) / x.sigma) ** 2, 0);
    expect(r.chiSquare).toBeCloseTo(chi2, 8);
    expect(r.dof).toBe(2);
  });
});
