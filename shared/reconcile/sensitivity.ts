/**
 * The reconciled values as a linear function of the measurements, at the solution reconcile()
 * returned: the gain S = ∂x̂/∂x_m (and ∂û/∂x_m for the observable unmeasured variables), hence
 * the full covariance of the reconciled values cov = S·Σ·Sᵀ and the redundancy matrix R = I − S.
 *
 * reconcile() returns only the standard deviation of each reconciled value; a figure computed
 * from several of them (an efficiency from four temperatures and pressures) needs their
 * covariances too. This module computes them from reconcile()'s input and result alone, without
 * touching the solver: the constraints are linearised once at the returned values
 * (f + A·Δx + B·Δu = 0, analytic gradients where the constraint has them, else central
 * differences), the unmeasured variables are projected out (Householder QR with column pivoting of B, as reconcile() does: G = the rows of Qᵀ·A
 * beyond the rank of B), and
 *   S_ξ = I − C·Gᵀ·(G·C·Gᵀ)⁻¹·G       (σ-scaled measured variables, C their correlation matrix;
 *                                     G a row-independent subset of the reduced constraints),
 *   ∂û/∂x_m = −R11⁻¹·T1·S_x           (observable unmeasured variables: the basic ones of the
 *                                     pivoted QR of B, T1 the leading rows of Qᵀ·A),
 * which is the linearised WLS estimator of VDI 2048 part 1 (cov(x̂) = Σ − Σ·Gᵀ(G·Σ·Gᵀ)⁻¹G·Σ) and
 * of Narasimhan & Jordache, Data Reconciliation and Gross Error Detection (2000), ch. 3.
 * The diagonal of S·Σ·Sᵀ reproduces reconcile()'s sigmas (tests/unit/reconcile/sensitivity.test.ts).
 *
 * `pass`: 'final' (default) is the reconciliation with the suspects of serial elimination treated
 * as unmeasured (what the analysis' state points and figures are built from); 'main' keeps every
 * measurement.
 *
 * Pure TypeScript, no Node built-ins.
 */
import { CholeskyDecomposition, Matrix } from 'ml-matrix';
import type { Constraint, ReconcileInput, ReconcileResult } from './index';
import { applyQt, pivotedQr, solveR11 } from './pivoted-qr';

export interface ReconciledSensitivity {
  /** measurements the reconciliation used (inputs), in input order */
  inputs: string[];
  /** their standard deviations */
  inputSigmas: Float64Array;
  /** their correlation matrix (row-major, inputs × inputs), null when uncorrelated */
  inputCorrelation: Float64Array | null;
  /** reconciled measured values (same order as inputs), then the observable unmeasured variables */
  outputs: string[];
  /** ∂ output_k / ∂ input_j, row-major outputs × inputs */
  gain: Float64Array;
  /** covariance of two reconciled values (either id from `outputs`) */
  covariance(a: string, b: string): number;
  /** redundancy number r_ii = 1 − ∂x̂_i/∂x_m,i of a measurement (0: no balance checks it; 1: the rest fixes it alone) */
  redundancy(id: string): number;
  /**
   * Minimal detectable bias of a measurement (Baarda 1968): the bias ∇ that moves its normalised
   * correction z_i = |e_i|/√V_e,ii by δ0, i.e. ∇ = δ0·√V_e,ii / (V_e·Σ⁻¹)_ii — for uncorrelated
   * measurements δ0·σ_i/√r_ii. Same unit as the measurement; null when no balance checks it.
   */
  minimalDetectableBias(id: string, delta0: number): number | null;
}

const FD_STEP = Math.cbrt(2.220446049250313e-16);
/** reconcile()'s own rank tolerance */
const RANK_TOL = 1e-9;

function gradientOf(c: Constraint, at: Record<string, number>, ids: string[]): Record<string, number> {
  if (c.grad) return c.grad(at);
  const out: Record<string, number> = {};
  for (const id of ids) {
    const h = FD_STEP * Math.max(Math.abs(at[id]), 1);
    const up = { ...at, [id]: at[id] + h };
    const dn = { ...at, [id]: at[id] - h };
    const d = (c.f(up) - c.f(dn)) / (2 * h);
    if (d !== 0) out[id] = d;
  }
  return out;
}

/** The linearised reconciliation at reconcile()'s solution: gain, covariance and redundancy. */
export function reconciledSensitivity(
  input: ReconcileInput,
  result: ReconcileResult,
  pass: 'main' | 'final' = 'final',
): ReconciledSensitivity {
  const removed = new Set(pass === 'final' ? result.suspects : []);
  const values = pass === 'final' ? result.final.values : result.values;
  const active = input.measured.filter((m) => !removed.has(m.id));
  const inputs = active.map((m) => m.id);
  const n = inputs.length;
  const sig = Float64Array.from(active.map((m) => m.sigma));
  const unmeasured = [
    ...(input.unmeasured ?? []).map((u) => ({ id: u.id, guess: u.guess ?? 1 })),
    ...input.measured.filter((m) => removed.has(m.id)).map((m) => ({ id: m.id, guess: m.value })),
  ];
  const q = unmeasured.length;
  const at: Record<string, number> = {};
  inputs.forEach((id) => (at[id] = values[id]));
  // an unobservable variable is not returned: its starting guess stands in for it
  for (const u of unmeasured) at[u.id] = u.id in values ? values[u.id] : u.guess;
  const col = new Map<string, { kind: 'm' | 'u'; i: number }>();
  inputs.forEach((id, i) => col.set(id, { kind: 'm', i }));
  unmeasured.forEach((u, j) => col.set(u.id, { kind: 'u', i: j }));
  const allIds = [...inputs, ...unmeasured.map((u) => u.id)];

  const cons = input.constraints;
  const m = cons.length;
  // rows scaled by the norm of their σ-scaled gradient; unmeasured columns by their norm
  const aS = new Matrix(m, n);
  const bRaw = new Matrix(m, q);
  for (let r = 0; r < m; r++) {
    const g = gradientOf(cons[r], at, allIds);
    let norm = 0;
    for (const [id, d] of Object.entries(g)) {
      const ref = col.get(id);
      if (!ref || !Number.isFinite(d)) continue;
      if (ref.kind === 'm') {
        aS.set(r, ref.i, d * sig[ref.i]);
        norm += (d * sig[ref.i]) ** 2;
      } else {
        bRaw.set(r, ref.i, d);
        norm += d * d;
      }
    }
    const w = norm > 0 ? 1 / Math.sqrt(norm) : 0;
    for (let i = 0; i < n; i++) aS.set(r, i, aS.get(r, i) * w);
    for (let j = 0; j < q; j++) bRaw.set(r, j, bRaw.get(r, j) * w);
  }
  const cScale = new Float64Array(q);
  const bS = new Matrix(m, q);
  for (let j = 0; j < q; j++) {
    let s = 0;
    for (let r = 0; r < m; r++) s += bRaw.get(r, j) ** 2;
    cScale[j] = s > 0 ? 1 / Math.sqrt(s) : 1;
    for (let r = 0; r < m; r++) bS.set(r, j, bRaw.get(r, j) * cScale[j]);
  }
  // correlation of the active measurements
  let corr: Matrix | null = null;
  const idx = new Map(inputs.map((id, i) => [id, i]));
  for (const c of input.correlations ?? []) {
    const i = idx.get(c.a);
    const j = idx.get(c.b);
    if (i === undefined || j === undefined || c.rho === 0) continue;
    corr ??= Matrix.eye(n);
    corr.set(i, j, c.rho);
    corr.set(j, i, c.rho);
  }
  // project the unmeasured variables out: B_s·P = Q·[R11 R12; 0 0] (Householder QR with column
  // pivoting, as reconcile() does); the last m − rank rows of Qᵀ·A_s are the reduced constraints G
  const qrB = q > 0 ? pivotedQr(Float64Array.from(bS.to1DArray()), m, q, RANK_TOL) : null;
  const rB = qrB?.rank ?? 0;
  const qa = Float64Array.from(aS.to1DArray());
  if (qrB) applyQt(qrB, qa, n);
  const nr = m - rB;
  // a row-independent subset of G: pivoted QR of Gᵀ
  const gt = new Float64Array(n * nr);
  for (let r = 0; r < nr; r++) for (let i = 0; i < n; i++) gt[i * nr + r] = qa[(rB + r) * n + i];
  const qrG = pivotedQr(gt, n, nr, RANK_TOL);
  const dof = qrG.rank;
  const gSel = new Matrix(dof, n);
  for (let k = 0; k < dof; k++) {
    const r = qrG.perm[k];
    for (let i = 0; i < n; i++) gSel.set(k, i, qa[(rB + r) * n + i]);
  }
  let sXi = Matrix.eye(n);
  if (dof > 0) {
    const cg = corr ? corr.mmul(gSel.transpose()) : gSel.transpose();
    const mMat = gSel.mmul(cg);
    const chol = new CholeskyDecomposition(mMat.add(mMat.transpose()).mul(0.5));
    if (!chol.isPositiveDefinite())
      throw new RangeError('the reduced constraint matrix G·C·Gᵀ is numerically singular');
    sXi = Matrix.eye(n).sub(cg.mmul(chol.solve(gSel)));
  }
  // outputs: measured (original units), then observable unmeasured (basic variables of the QR whose
  // value the measured ones fix: reconcile() returns a value for exactly those)
  const obs = unmeasured.map((u, j) => ({ id: u.id, j })).filter((u) => u.id in values);
  const outputs = [...inputs, ...obs.map((u) => u.id)];
  const gain = new Float64Array(outputs.length * n);
  for (let k = 0; k < n; k++) for (let j = 0; j < n; j++) gain[k * n + j] = (sig[k] * sXi.get(k, j)) / sig[j];
  if (obs.length > 0 && qrB && rB > 0) {
    // R11·Δη_basic = −T1·Δξ, T1 = the first rank rows of Qᵀ·A_s; Δξ = S_ξ·Δξ_m; Δu = cScale·Δη
    const t1s = new Matrix(rB, n);
    for (let r = 0; r < rB; r++) for (let i = 0; i < n; i++) t1s.set(r, i, qa[r * n + i]);
    const rhs = Float64Array.from(t1s.mmul(sXi).to1DArray());
    const y = solveR11(qrB, rhs, n);
    const rowOf = new Map<number, number>();
    for (let r = 0; r < rB; r++) rowOf.set(qrB.perm[r], r);
    obs.forEach((u, k) => {
      const r = rowOf.get(u.j);
      if (r === undefined) return;
      for (let j = 0; j < n; j++) gain[(n + k) * n + j] = (-cScale[u.j] * y[r * n + j]) / sig[j];
    });
  }
  const outIdx = new Map(outputs.map((id, k) => [id, k]));
  const corrData = corr ? Float64Array.from(corr.to1DArray()) : null;
  const covariance = (a: string, b: string): number => {
    const ka = outIdx.get(a);
    const kb = outIdx.get(b);
    if (ka === undefined || kb === undefined)
      throw new RangeError(`"${ka === undefined ? a : b}" is not a reconciled value of this pass`);
    let s = 0;
    for (let i = 0; i < n; i++) {
      const gi = gain[ka * n + i] * sig[i];
      if (gi === 0) continue;
      if (!corrData) s += gi * gain[kb * n + i] * sig[i];
      else for (let j = 0; j < n; j++) s += gi * corrData[i * n + j] * gain[kb * n + j] * sig[j];
    }
    return s;
  };
  const redundancy = (id: string): number => {
    const i = idx.get(id);
    if (i === undefined) throw new RangeError(`"${id}" is not a measurement of this pass`);
    const r = 1 - sXi.get(i, i);
    return r < 1e-12 ? 0 : r;
  };
  const minimalDetectableBias = (id: string, delta0: number): number | null => {
    const r = redundancy(id);
    if (r === 0) return null;
    const i = idx.get(id)!;
    // (R·C)_ii in σ units, R = I − S_ξ
    let rc = r;
    if (corr) {
      rc = 0;
      for (let j = 0; j < n; j++) rc += ((i === j ? 1 : 0) - sXi.get(i, j)) * corr.get(j, i);
    }
    return rc > 0 ? (delta0 * sig[i] * Math.sqrt(rc)) / r : null;
  };
  return {
    inputs,
    inputSigmas: sig,
    inputCorrelation: corrData,
    outputs,
    gain,
    covariance,
    redundancy,
    minimalDetectableBias,
  };
}
