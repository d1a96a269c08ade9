/**
 * Householder QR with column pivoting (Businger–Golub; Golub & Van Loan, "Matrix Computations",
 * algorithm 5.4.1): A·P = Q·R with |R_00| ≥ |R_11| ≥ … so the numerical rank is where the
 * remaining column norms fall below a relative tolerance. ml-matrix's QrDecomposition has no
 * pivoting, hence this small kernel; everything else goes through ml-matrix.
 *
 * Matrices are dense row-major Float64Arrays. Pure, browser-safe.
 */

export interface PivotedQr {
  readonly rows: number;
  readonly cols: number;
  /** numerical rank */
  readonly rank: number;
  /** perm[k] = original column index at pivoted position k */
  readonly perm: Int32Array;
  /** R by columns (pivoted order): rcols[j][i] = R_ij; zero below the diagonal and below the rank */
  readonly rcols: Float64Array[];
  /** Householder vectors v_k (length rows − k) and factors β_k, k < rank */
  readonly v: Float64Array[];
  readonly beta: Float64Array;
}

/**
 * Factorises a (rows × cols, row-major; not modified). Rank: the first k at which every remaining
 * column has norm ≤ relTol · (largest initial column norm). Works on contiguous columns.
 */
export function pivotedQr(a: Float64Array, rows: number, cols: number, relTol = 1e-9): PivotedQr {
  const col: Float64Array[] = [];
  for (let j = 0; j < cols; j++) {
    const c = new Float64Array(rows);
    for (let i = 0; i < rows; i++) c[i] = a[i * cols + j];
    col.push(c);
  }
  const perm = new Int32Array(cols);
  for (let j = 0; j < cols; j++) perm[j] = j;
  const norm2 = (c: Float64Array, from: number): number => {
    let s = 0;
    for (let i = from; i < rows; i++) s += c[i] * c[i];
    return s;
  };
  // remaining column norms², downdated after each step and recomputed when cancellation would
  // make the downdate inaccurate (the safeguard of LAPACK's xGEQP3)
  const norms = new Float64Array(cols);
  const normsRef = new Float64Array(cols);
  let maxInit = 0;
  for (let j = 0; j < cols; j++) {
    norms[j] = normsRef[j] = norm2(col[j], 0);
    maxInit = Math.max(maxInit, norms[j]);
  }
  const limit = relTol * relTol * maxInit;
  const steps = Math.min(rows, cols);
  const v: Float64Array[] = [];
  const beta = new Float64Array(steps);
  let rank = 0;
  if (maxInit > 0) {
    for (let k = 0; k < steps; k++) {
      let best = k;
      let bestNorm = -1;
      for (let j = k; j < cols; j++) {
        if (norms[j] > bestNorm) {
          bestNorm = norms[j];
          best = j;
        }
      }
      if (bestNorm <= limit) break;
      if (best !== k) {
        const t = col[k];
        col[k] = col[best];
        col[best] = t;
        const tp = perm[k];
        perm[k] = perm[best];
        perm[best] = tp;
        const tn = norms[k];
        norms[k] = norms[best];
        norms[best] = tn;
        const tr = normsRef[k];
        normsRef[k] = normsRef[best];
        normsRef[best] = tr;
      }
      bestNorm = norm2(col[k], k); // exact norm of the pivot column
      const ck = col[k];
      const len = rows - k;
      const vk = new Float64Array(len);
      for (let i = 0; i < len; i++) vk[i] = ck[k + i];
      const nx = Math.sqrt(bestNorm);
      const alpha = vk[0] >= 0 ? -nx : nx;
      vk[0] -= alpha;
      let vtv = 0;
      for (let i = 0; i < len; i++) vtv += vk[i] * vk[i];
      const b = vtv > 0 ? 2 / vtv : 0;
      ck[k] = alpha;
      for (let i = k + 1; i < rows; i++) ck[i] = 0;
      // H = I − β v vᵀ on the remaining columns
      for (let j = k + 1; j < cols; j++) {
        const cj = col[j];
        let s = 0;
        for (let i = 0; i < len; i++) s += vk[i] * cj[k + i];
        s *= b;
        if (s !== 0) for (let i = 0; i < len; i++) cj[k + i] -= s * vk[i];
        const left = norms[j] - cj[k] * cj[k];
        if (left <= 1e-4 * normsRef[j]) {
          norms[j] = normsRef[j] = norm2(cj, k + 1);
        } else norms[j] = left;
      }
      v.push(vk);
      beta[k] = b;
      rank = k + 1;
    }
  }
  // below the rank the remaining block is numerically zero: clear it so R is exactly [R11 R12; 0 0]
  for (let j = rank; j < cols; j++) for (let i = rank; i < rows; i++) col[j][i] = 0;
  return { rows, cols, rank, perm, rcols: col, v, beta };
}

/** b ← Qᵀ·b in place, b being rows × width, row-major. */
export function applyQt(qr: PivotedQr, b: Float64Array, width: number): void {
  const s = new Float64Array(width);
  for (let k = 0; k < qr.rank; k++) {
    const vk = qr.v[k];
    const bk = qr.beta[k];
    const len = vk.length;
    s.fill(0);
    for (let i = 0; i < len; i++) {
      const vi = vk[i];
      if (vi === 0) continue;
      const off = (k + i) * width;
      for (let j = 0; j < width; j++) s[j] += vi * b[off + j];
    }
    for (let j = 0; j < width; j++) s[j] *= bk;
    for (let i = 0; i < len; i++) {
      const vi = vk[i];
      if (vi === 0) continue;
      const off = (k + i) * width;
      for (let j = 0; j < width; j++) b[off + j] -= s[j] * vi;
    }
  }
}

/**
 * Solves R11·y = rhs (R11 = leading rank × rank block of R, upper triangular) for each of
 * `width` right-hand sides stored rank × width row-major. Returns rank × width.
 */
export function solveR11(qr: PivotedQr, rhs: Float64Array, width: number): Float64Array {
  const n = qr.rank;
  const rc = qr.rcols;
  const y = Float64Array.from(rhs);
  for (let i = n - 1; i >= 0; i--) {
    const d = rc[i][i];
    const off = i * width;
    for (let k = i + 1; k < n; k++) {
      const rik = rc[k][i];
      if (rik === 0) continue;
      const ok = k * width;
      for (let j = 0; j < width; j++) y[off + j] -= rik * y[ok + j];
    }
    for (let j = 0; j < width; j++) y[off + j] /= d;
  }
  return y;
}
