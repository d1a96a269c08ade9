/**
 * The covariances reconcile() hands on (the a-posteriori covariance of the reconciled values, the
 * covariance of the corrections), VDI 2048's removal rule and the groups of near-inseparable
 * measurements.
 *
 * Sources: the closed-form linear WLS covariances S_x̂ = Σ − ΣAᵀ(AΣAᵀ)⁻¹AΣ and
 * V_e = ΣAᵀ(AΣAᵀ)⁻¹AΣ (VDI 2048-1; Narasimhan & Jordache 1999), computed independently with plain
 * arrays (closed-form.ts); the network is the heat exchanger with bypass of the linear tests
 * (Narasimhan & Jordache 1999, data from memory). Removal only of measurements that fail the
 * individual test: VDI 2048-1:2017.
 */
import { correlationIn, linear, reconcile, GROUP_CORRELATION } from '@/shared/reconcile';
import { closedForm, covFromSigmas, type Mat } from './closed-form';

const ids = (n: number, p = 'F') => Array.from({ length: n }, (_, i) => `${p}${i + 1}`);
const fromMatrix = (m: Mat, cols: string[], rowNames: string[]) =>
  m.map((row, k) =>
    linear(rowNames[k], Object.fromEntries(row.map((c, i) => [cols[i], c]).filter(([, c]) => c !== 0))),
  );

const names = ids(6);
const x = [101.91, 64.45, 34.65, 64.2, 36.44, 98.88];
const s = [1.0, 0.64, 0.36, 0.64, 0.36, 1.0];
const a: Mat = [
  [1, -1, -1, 0, 0, 0],
  [0, 1, 0, -1, 0, 0],
  [0, 0, 1, 0, -1, 0],
  [0, 0, 0, 1, 1, -1],
];
const ref = closedForm(a, [0, 0, 0, 0], x, covFromSigmas(s));
const r = reconcile({
  measured: names.map((id, i) => ({ id, value: x[i], sigma: s[i] })),
  constraints: fromMatrix(a, names, ['split', 'hx', 'valve', 'mix']),
});
const at = (cov: { ids: string[]; matrix: number[] }, i: string, j: string) =>
  cov.matrix[cov.ids.indexOf(i) * cov.ids.length + cov.ids.indexOf(j)];

test('covariance of the reconciled values equals Σ − ΣAᵀ(AΣAᵀ)⁻¹AΣ, off the diagonal too', () => {
  expect(r.covariance.ids).toEqual(names);
  names.forEach((p, i) => names.forEach((q, j) => expect(at(r.covariance, p, q)).toBeCloseTo(ref.cov[i][j], 10)));
});

test('covariance of the corrections equals ΣAᵀ(AΣAᵀ)⁻¹AΣ; their correlation is V_ij/√(V_ii V_jj)', () => {
  names.forEach((p, i) =>
    names.forEach((q, j) => expect(at(r.correctionCovariance, p, q)).toBeCloseTo(ref.ve[i][j], 10)),
  );
  expect(correlationIn(r.correctionCovariance, 'F1', 'F6')).toBeCloseTo(
    ref.ve[0][5] / Math.sqrt(ref.ve[0][0] * ref.ve[5][5]),
    10,
  );
  expect(correlationIn(r.correctionCovariance, 'F1', 'nope')).toBeNull();
});

test('an observable unmeasured variable: its covariance with the measured ones is that of the reconciled value it equals (F2 = F4)', () => {
  const m = ['F1', 'F3', 'F4', 'F5', 'F6'];
  const res = reconcile({
    measured: m.map((id) => ({ id, value: x[names.indexOf(id)], sigma: s[names.indexOf(id)] })),
    unmeasured: [{ id: 'F2' }],
    constraints: [
      linear('split', { F1: 1, F2: -1, F3: -1 }),
      linear('hx', { F2: 1, F4: -1 }),
      linear('valve', { F3: 1, F5: -1 }),
      linear('mix', { F4: 1, F5: 1, F6: -1 }),
    ],
  });
  expect(res.covariance.ids).toEqual([...m, 'F2']);
  for (const q of [...m, 'F2']) expect(at(res.covariance, 'F2', q)).toBeCloseTo(at(res.covariance, 'F4', q), 9);
  expect(Math.sqrt(at(res.covariance, 'F2', 'F2'))).toBeCloseTo(res.sigmas.F2, 10);
});

test('VDI 2048 removal: a failed global test with no measurement over the individual limit removes nothing', () => {
  // six meters of one flow, σ 1, errors ±1.5 in turn: χ² = 6·1.5² = 13.5 > χ²(0.95, 5) = 11.07 (χ² table),
  // while each z = 1.5/√(1 − 1/6) = 1.64 < 1.96 (V_e,ii = 1 − 1/n for n equal meters of one flow)
  const m = ids(6, 'M');
  const res = reconcile({
    measured: m.map((id, i) => ({ id, value: 100 + (i % 2 ? -1.5 : 1.5), sigma: 1 })),
    constraints: m.slice(1).map((id, i) => linear(`eq${i}`, { [m[i]]: 1, [id]: -1 })),
  });
  expect(res.passed).toBe(false);
  expect(res.chiSquare).toBeCloseTo(13.5, 9);
  for (const id of m) expect(res.z[id]).toBeCloseTo(1.5 / Math.sqrt(5 / 6), 9);
  expect(res.suspects).toEqual([]);
  expect(res.final.passed).toBe(false);
});

test('inseparable measurements are one group: two meters of one flow that nothing else checks (ρ = −1)', () => {
  const res = reconcile({
    measured: [
      { id: 'A', value: 130, sigma: 1 },
      { id: 'B', value: 100, sigma: 1 },
      { id: 'C', value: 100, sigma: 1 },
      { id: 'D', value: 100.5, sigma: 1 },
    ],
    constraints: [linear('ab', { A: 1, B: -1 }), linear('cd', { C: 1, D: -1 })],
  });
  expect(correlationIn(res.correctionCovariance, 'A', 'B')).toBeCloseTo(-1, 12);
  expect(correlationIn(res.correctionCovariance, 'A', 'C')).toBeCloseTo(0, 12);
  expect(res.suspects).toHaveLength(1);
  expect([...res.suspectGroups[0]].sort()).toEqual(['A', 'B']);
  // its signed test value: (measured − reconciled)/σ(correction), positive reads high
  const first = res.suspects[0];
  expect(Math.abs(res.eliminatedU[first])).toBeCloseTo(30 / Math.sqrt(2), 9);
  expect(GROUP_CORRELATION).toBe(0.95);
});
