/**
 * Uncertainty of the balanced performance figures (shared/cycle/figure-uncertainty.ts):
 *  - GUM law of propagation (JCGM 100:2008, eq. 13) for a figure linear in two reconciled values,
 *    u²(a − b) = var(a) + var(b) − 2·cov(a, b), from the reconciled covariance
 *    (shared/reconcile/sensitivity.ts) — a second, independent route to the same number;
 *  - Monte Carlo per JCGM 101:2008 (GUM Supplement 1, 7.2–7.7: draw the inputs from their
 *    distributions, evaluate the model, take the standard deviation of the outputs), fixed seed,
 *    N = 250: the reconciliation itself is run on every draw;
 *  - a figure from instruments too coarse for it (the condensate pump's efficiency from two
 *    plant thermometers reading a rise of about 0.1 K) is not determinable, and the readings that
 *    carry its variance are named.
 */
import {
  analyseRound,
  buildEquations,
  specSigmaOf,
  type AcceptedReading,
  type PerformanceFigure,
} from '@/shared/cycle';
import { demoDesignReadings, demoUnit } from '@/demo/unit';
import { reconciledStates } from '@/shared/cycle/figure-uncertainty';
import { figureValues } from '@/shared/cycle/performance';
import { reconcile } from '@/shared/reconcile';
import { reconciledSensitivity } from '@/shared/reconcile/sensitivity';
import { lcg } from './helpers';

const B = 101325;
const readings = demoDesignReadings(B);
const a = analyseRound(demoUnit, readings, { barometricPa: B });
const fig = (id: string): PerformanceFigure => {
  const f = a.performance.find((x) => x.id === id);
  if (!f) throw new Error(`no figure ${id}`);
  return f;
};
// σ as the analysis' intake gives it: from the accuracy spec at the instrument's reference value
// (the point's design value or mid-range), never at the reading (shared/cycle/round/base.ts)
const sigmaOf = new Map(
  readings.map((r) => [
    r.instrumentTag,
    specSigmaOf(
      demoUnit,
      demoUnit.instruments.find((i) => i.tag === r.instrumentTag)!,
      B,
    )!,
  ]),
);

/** The analysis' equation system and reconciliation for some readings (σ at the reference values, as the intake gives them). */
function reconciled(values: Map<string, number>) {
  const acc = new Map<string, AcceptedReading>();
  for (const [tag, value] of values) acc.set(tag, { tag, value, sigma: sigmaOf.get(tag)! });
  const eq = buildEquations(demoUnit, acc);
  const input = { measured: eq.measured, unmeasured: eq.unmeasured, constraints: eq.constraints, tolerance: 1e-8 };
  return { eq, input, res: reconcile(input) };
}

const design = new Map(readings.map((r) => [r.instrumentTag, r.valueSI]));

test('every balanced figure of the demo at design has an interval (GUM, k = 1.96)', () => {
  for (const f of a.performance) {
    if (f.value === null) continue;
    expect(f.uncertainty).toBeDefined();
    expect(f.uncertainty!.method).toBe('gum-lpu');
    expect(f.uncertainty!.U).toBeCloseTo(1.96 * f.uncertainty!.u, 12);
  }
});

test('the states rebuilt from the reconciled values are the analysis’ own, to the last digit', () => {
  const { eq, res } = reconciled(design);
  const loose = new Map(eq.notInBalance.map((t) => [t, design.get(t)!]));
  const st = reconciledStates(demoUnit, eq, res.final.values, loose);
  for (const sp of a.statePoints) {
    const mine = st.get(sp.id)!;
    for (const k of ['p', 'T', 'h', 's', 'x', 'm'] as const) expect(mine[k]).toBe(sp.reconciled[k]);
  }
  const power = (gid: string) => (gid === 'gen' ? res.final.values['JI-601'] * 1e6 : null);
  const vals = figureValues(demoUnit, (id) => st.get(id)!, power);
  a.performance.forEach((f, i) => expect(vals[i]).toBe(f.value));
});

describe('figures linear in two reconciled temperatures: u² = var(a) + var(b) − 2·cov(a, b) (JCGM 100:2008, eq. 13)', () => {
  const { input, res } = reconciled(design);
  const s = reconciledSensitivity(input, res);
  test.each([
    ['cw-rise:cond', 'TI-403A', 'TI-402'],
    ['dca:lph', 'TI-207', 'TI-205'],
  ])('%s = %s − %s', (id, ta, tb) => {
    const u2 = s.covariance(ta, ta) + s.covariance(tb, tb) - 2 * s.covariance(ta, tb);
    expect(fig(id).uncertainty!.u).toBeCloseTo(Math.sqrt(u2), 6);
  });
});

describe('Monte Carlo, JCGM 101:2008: 250 draws of every reading around design (Gaussian, its σ; Park–Miller seed 14), reconciled each time', () => {
  const N = 250;
  const ids = ['eta:hp:ms:hpx', 'ttd:cond', 'ttd:lph', 'cycle:efficiency', 'cycle:heat-rate', 'eta:cep'];
  const idx = ids.map((id) => a.performance.findIndex((f) => f.id === id));
  const rnd = lcg(14);
  const gauss = () => Math.sqrt(-2 * Math.log(rnd())) * Math.cos(2 * Math.PI * rnd());
  const draws: number[][] = ids.map(() => []);
  for (let k = 0; k < N; k++) {
    const v = new Map([...design].map(([t, x]) => [t, x + sigmaOf.get(t)! * gauss()]));
    const { eq, res } = reconciled(v);
    const loose = new Map(eq.notInBalance.map((t) => [t, v.get(t)!]));
    // the reconciliation without serial elimination: what the law of propagation describes
    const st = reconciledStates(demoUnit, eq, res.values, loose);
    const vals = figureValues(
      demoUnit,
      (id) => st.get(id)!,
      (gid) => (gid === 'gen' ? res.values['JI-601'] * 1e6 : null),
    );
    idx.forEach((i, n) => {
      const x = vals[i];
      if (x !== null) draws[n].push(x);
    });
  }
  const sd = (xs: number[]) => {
    const m = xs.reduce((p, c) => p + c, 0) / xs.length;
    return Math.sqrt(xs.reduce((p, c) => p + (c - m) ** 2, 0) / (xs.length - 1));
  };
  test.each(ids.slice(0, 5).map((id, n) => [id, n] as const))(
    '%s: the Monte Carlo standard deviation matches u within 15 % (the estimate’s own spread at N = 250 is about 4.5 %)',
    (id, n) => {
      expect(draws[n].length).toBe(N);
      const u = fig(id).uncertainty!.u;
      expect(sd(draws[n]) / u).toBeGreaterThan(0.85);
      expect(sd(draws[n]) / u).toBeLessThan(1.15);
    },
  );
  test('condensate pump efficiency: the draws spread over more than half of 0–100 % too (2.5–97.5 % quantiles)', () => {
    const xs = [...draws[5]].sort((p, c) => p - c);
    const lo = xs[Math.floor(0.025 * xs.length)];
    const hi = xs[Math.ceil(0.975 * xs.length) - 1];
    expect(hi - lo).toBeGreaterThan(0.5);
  });
});

test('too coarse for it: the condensate pump efficiency from TI-401 and TI-205 (a rise of about 0.1 K) is not determinable, and they are named', () => {
  const f = fig('eta:cep');
  const rise =
    a.statePoints.find((p) => p.id === 'cpo')!.reconciled.T! - a.statePoints.find((p) => p.id === 'hw')!.reconciled.T!;
  expect(rise).toBeGreaterThan(0.05);
  expect(rise).toBeLessThan(0.2);
  expect(f.uncertainty!.determinable).toBe(false);
  expect(2 * f.uncertainty!.U).toBeGreaterThan(0.5);
  expect(f.uncertainty!.budget.map((b) => b.tag).slice(0, 2)).toEqual(['TI-205', 'TI-401']);
  expect(f.uncertainty!.reduceBy).toBeGreaterThan(1);
  // the same thermometers give well-determined figures where the difference is large
  expect(fig('rise:lph').uncertainty!.determinable).toBe(true);
  expect(fig('cycle:efficiency').uncertainty!.determinable).toBe(true);
  expect(fig('eta:hp:ms:hpx').uncertainty!.determinable).toBe(true);
});
