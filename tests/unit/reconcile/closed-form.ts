/**
 * Independent reference computations for the reconciliation tests, written with plain arrays
 * (no ml-matrix, none of the engine's code path):
 *  - the closed-form linear WLS solution x̂ = x − ΣAᵀ(AΣAᵀ)⁻¹(Ax − b) with its covariances
 *    (Kuehn & Davidson 1961; Narasimhan & Jordache 1999; VDI 2048 part 1);
 *  - a Lagrange–Newton solution of the nonlinear KKT system
 *    W(z − z_m) + J(z)ᵀλ = 0, g(z) = 0 with the full Hessian of the Lagrangian.
 */

export type Mat = number[][];
export type Vec = number[];

export const T = (a: Mat): Mat => a[0].map((_, j) => a.map((row) => row[j]));
export const mul = (a: Mat, b: Mat): Mat =>
  a.map((row) => b[0].map((_, j) => row.reduce((s, aik, k) => s + aik * b[k][j], 0)));
export const mulv = (a: Mat, x: Vec): Vec => a.map((row) => row.reduce((s, aij, j) => s + aij * x[j], 0));
export const diag = (d: Vec): Mat => d.map((di, i) => d.map((_, j) => (i === j ? di : 0)));

/** Gaussian elimination with partial pivoting, solves A·X = B for a matrix B. */
export function solve(a: Mat, b: Mat): Mat {
  const n = a.length;
  const m = a.map((row, i) => [...row, ...b[i]]);
  const w = m[0].length;
  for (let k = 0; k < n; k++) {
    let p = k;
    for (let i = k + 1; i < n; i++) if (Math.abs(m[i][k]) > Math.abs(m[p][k])) p = i;
    [m[k], m[p]] = [m[p], m[k]];
    if (Math.abs(m[k][k]) < 1e-300) throw new Error('singular');
    for (let i = 0; i < n; i++) {
      if (i === k) continue;
      const f = m[i][k] / m[k][k];
      for (let j = k; j < w; j++) m[i][j] -= f * m[k][j];
    }
  }
  return m.map((row, i) => row.slice(n).map((v) => v / m[i][i]));
}
export const solvev = (a: Mat, b: Vec): Vec =>
  solve(
    a,
    b.map((v) => [v]),
  ).map((r) => r[0]);

export interface ClosedForm {
  xhat: Vec;
  /** covariance of the reconciled values Σ − ΣAᵀ(AΣAᵀ)⁻¹AΣ */
  cov: Mat;
  /** covariance of the corrections ΣAᵀ(AΣAᵀ)⁻¹AΣ */
  ve: Mat;
  chi2: number;
  z: Vec;
}

/** x̂ = x − ΣAᵀ(AΣAᵀ)⁻¹(Ax − b); A must have full row rank. */
export function closedForm(a: Mat, b: Vec, x: Vec, sigma: Mat): ClosedForm {
  const sat = mul(sigma, T(a));
  const s = mul(a, sat);
  const r = mulv(a, x).map((v, i) => v - b[i]);
  const lam = solvev(s, r);
  const corr = mulv(sat, lam);
  const xhat = x.map((v, i) => v - corr[i]);
  const ve = mul(sat, solve(s, T(sat)));
  const cov = sigma.map((row, i) => row.map((v, j) => v - ve[i][j]));
  const chi2 = r.reduce((acc, ri, i) => acc + ri * lam[i], 0);
  const z = corr.map((c, i) => Math.abs(c) / Math.sqrt(ve[i][i]));
  return { xhat, cov, ve, chi2, z };
}

export const covFromSigmas = (s: Vec, rho: { i: number; j: number; rho: number }[] = []): Mat => {
  const c = diag(s.map((v) => v * v));
  for (const { i, j, rho: r } of rho) {
    c[i][j] = r * s[i] * s[j];
    c[j][i] = r * s[i] * s[j];
  }
  return c;
};

export interface NlpProblem {
  /** measured values for the first nm entries of z; the remaining ones are unmeasured */
  zm: Vec;
  /** 1/σ² for measured, 0 for unmeasured */
  weights: Vec;
  g: (z: Vec) => Vec;
  jac: (z: Vec) => Mat;
  /** Hessians ∇²g_k */
  hess: (z: Vec) => Mat[];
  z0: Vec;
}

/** Newton on the KKT system of min ½Σ w_i (z_i − zm_i)² s.t. g(z) = 0. */
export function lagrangeNewton(p: NlpProblem, iters = 50): { z: Vec; lambda: Vec; iterations: number } {
  let z = [...p.z0];
  const m = p.g(z).length;
  const n = z.length;
  let lambda = new Array(m).fill(0);
  for (let it = 1; it <= iters; it++) {
    const g = p.g(z);
    const j = p.jac(z);
    const hs = p.hess(z);
    const h: Mat = diag(p.weights);
    hs.forEach((hk, k) => hk.forEach((row, a) => row.forEach((v, b) => (h[a][b] += lambda[k] * v))));
    const grad = z.map((zi, i) => p.weights[i] * (zi - p.zm[i]) + j.reduce((s, row, k) => s + row[i] * lambda[k], 0));
    const kkt: Mat = [
      ...h.map((row, a) => [...row, ...j.map((r) => r[a])]),
      ...j.map((row) => [...row, ...new Array(m).fill(0)]),
    ];
    const rhs = [...grad.map((v) => -v), ...g.map((v) => -v)];
    const step = solvev(kkt, rhs);
    z = z.map((zi, i) => zi + step[i]);
    lambda = lambda.map((l, k) => l + step[n + k]);
    const size = Math.max(...step.slice(0, n).map((s, i) => Math.abs(s) / Math.max(1, Math.abs(z[i]))));
    if (size < 1e-14) return { z, lambda, iterations: it };
  }
  return { z, lambda, iterations: iters };
}
