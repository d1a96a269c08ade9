/**
 * The covariances the round analysis gives the reconciliation: σ from the instrument's reference
 * value (not from the possibly biased reading), and the barometric pressure as one common input of
 * every gauge and vacuum reading.
 *
 * Sources: GUM (JCGM 100:2008) §5.2 — correlated input quantities: two readings that share one
 * input (here p_abs = p_g + b, p_abs = b − p_vac, ∂/∂b = 1) have covariance u²(b); VDI 2048-1 — the
 * measurement uncertainties are stated before the values are known (the covariance matrix is an
 * input). The design point is the demo unit's (IAPWS-IF97, every balance closing).
 */
import { analyseRound, type RoundReading } from '@/shared/cycle';
import { demoDesignReadings, demoUnit } from '@/demo/unit';
import { sigmaFor } from '@/shared/uncertainty';
import { plain, withValue } from './helpers';
import { gaussian, noisyRound } from '@/tests/helpers/detection';

const B = 101325;
const design = plain(demoDesignReadings(B));
const onBaro = new Set(
  demoUnit.instruments.filter((i) => i.quantity === 'pressure' && i.pressureReference !== 'absolute').map((i) => i.tag),
);
const sigmaOf = (a: ReturnType<typeof analyseRound>, tag: string) => a.instruments.find((i) => i.tag === tag)!.sigma!;

test('σ comes from the reference value: a flow meter reading 20 % high keeps the σ of its design flow (0.5 % of reading spec)', () => {
  const at = analyseRound(demoUnit, design, { barometricPa: B });
  const high = analyseRound(
    demoUnit,
    withValue(design, 'FI-101', (v) => v * 1.2),
    { barometricPa: B },
  );
  expect(sigmaOf(high, 'FI-101')).toBe(sigmaOf(at, 'FI-101'));
  const fi = demoUnit.instruments.find((i) => i.tag === 'FI-101')!;
  const nominal = demoUnit.points.find((p) => p.id === fi.point)!.nominal!.m!;
  expect(sigmaOf(at, 'FI-101')).toBeCloseTo(sigmaFor(fi.accuracy, nominal), 12);
});

describe('the barometric pressure, one common input of every gauge and vacuum reading (GUM §5.2)', () => {
  const sb = 300;
  test('each gauge and vacuum reading carries u(b) in its σ; absolute gauges and thermometers do not', () => {
    const a = analyseRound(demoUnit, design, { barometricPa: B, options: { barometricSigmaPa: sb } });
    const a0 = analyseRound(demoUnit, design, { barometricPa: B });
    expect(a.reconciliation.ok).toBe(true);
    for (const t of onBaro) expect(sigmaOf(a, t)).toBeCloseTo(Math.hypot(sigmaOf(a0, t), sb), 9);
    expect(sigmaOf(a, 'PI-402')).toBe(sigmaOf(a0, 'PI-402'));
    expect(sigmaOf(a, 'TI-301')).toBe(sigmaOf(a0, 'TI-301'));
  });
  test('a barometer misread by 3 u(b) shifts every gauge alike: correlated, it costs less χ² than the same σ taken as independent errors', () => {
    const shifted: RoundReading[] = design.map((r) =>
      onBaro.has(r.instrumentTag!) ? { ...r, valueSI: r.valueSI + 3 * sb } : r,
    );
    const correlated = analyseRound(demoUnit, shifted, { barometricPa: B, options: { barometricSigmaPa: sb } });
    const sig = new Map(correlated.instruments.map((i) => [i.tag, i.sigma!]));
    // the same σ given with each reading and no barometric σ: the engine has no correlation to pass
    const independent = analyseRound(
      demoUnit,
      shifted.map((r) => (onBaro.has(r.instrumentTag!) ? { ...r, sigma: sig.get(r.instrumentTag!)! } : r)),
      { barometricPa: B },
    );
    expect(correlated.reconciliation.ok && independent.reconciliation.ok).toBe(true);
    if (!correlated.reconciliation.ok || !independent.reconciliation.ok) return;
    expect(correlated.reconciliation.chiSquare).toBeLessThan(independent.reconciliation.chiSquare);
    expect(correlated.findings.filter((f) => f.kind === 'gross-error')).toEqual([]);
  });
});

test('balance rows from the reconciliation’s covariance: on fault-free rounds each row’s mean (r/σ)² is 1 (± 3 standard errors of a χ²₁ mean)', () => {
  // r/σ of a balance with the readings put back is −∇f·e/√(∇fᵀV_e∇f): standard normal without a fault (VDI 2048-1)
  const n = gaussian(3);
  const N = 150;
  const acc = new Map<string, { s: number; k: number }>();
  for (let r = 0; r < N; r++) {
    const a = analyseRound(demoUnit, noisyRound(n), { barometricPa: B });
    for (const eb of a.balances) {
      for (const row of eb.rows) {
        if (row.test === null || !row.measured) continue;
        const x = acc.get(row.id) ?? { s: 0, k: 0 };
        x.s += row.test ** 2;
        x.k++;
        acc.set(row.id, x);
      }
    }
  }
  expect(acc.size).toBeGreaterThanOrEqual(5);
  for (const [, x] of acc) {
    expect(x.k).toBe(N);
    expect(Math.abs(x.s / x.k - 1)).toBeLessThan(3 * Math.sqrt(2 / N));
  }
});
