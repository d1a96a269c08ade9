/**
 * The one evaluator of IAPWS-IF97 power sums.
 *
 * Every basic and backward equation of IAPWS-IF97 and its supplementary releases is a sum
 *   f(x, y) = Σ nᵢ · x^Iᵢ · y^Jᵢ
 * over rows {I, J, n}, where x and y are the region's shifted reduced variables
 * (for region 1: x = 7.1 − π, y = τ − 1.222; region 3: x = δ, y = τ; …). The region modules
 * supply x and y, and turn the sum and its derivatives into properties.
 *
 * Powers are built by repeated multiplication into preallocated tables (no Math.pow in the
 * loop, no allocation per call). Exponents that are multiples of a fraction (region 2a T(p,s)
 * uses quarters) are compiled with a scale: the caller then passes x^(1/scale).
 */

/** One row of a coefficient table, as printed in the releases. */
export interface Term {
  readonly I: number;
  readonly J: number;
  readonly n: number;
}

/** Indices into the derivative vector filled by {@link PowerSum.derivs}. */
export const F = 0;
export const FX = 1;
export const FXX = 2;
export const FY = 3;
export const FYY = 4;
export const FXY = 5;

/** A scratch vector for {@link PowerSum.derivs}: [f, f_x, f_xx, f_y, f_yy, f_xy]. */
export function derivVector(): Float64Array {
  return new Float64Array(6);
}

/**
 * table[k − min] = base^k for min ≤ k ≤ max (min ≤ 0 ≤ max): repeated multiplication in two
 * interleaved chains (even and odd k), which halves the dependent-multiply latency.
 */
function fillPowers(table: Float64Array, base: number, min: number, max: number): void {
  const o = -min;
  table[o] = 1;
  if (max >= 1) {
    const b2 = base * base;
    let even = b2;
    let odd = base;
    table[o + 1] = base;
    for (let k = 2; k <= max; k += 2) {
      odd *= b2;
      table[o + k] = even;
      if (k < max) table[o + k + 1] = odd;
      even *= b2;
    }
  }
  if (min <= -1) {
    const inv = 1 / base;
    const i2 = inv * inv;
    let even = i2;
    let odd = inv;
    table[o - 1] = inv;
    for (let k = 2; k <= o; k += 2) {
      odd *= i2;
      table[o - k] = even;
      if (k < o) table[o - k - 1] = odd;
      even *= i2;
    }
  }
}

export class PowerSum {
  readonly size: number;
  /** per term: n, J, J(J − 1) */
  private readonly coef: Float64Array;
  /** per term: index of y^J in yp */
  private readonly jx: Int32Array;
  /** per group of equal I: I, I(I − 1) */
  private readonly gI: Float64Array;
  /** per group: index of x^I in xp, first term, end of terms */
  private readonly gx: Int32Array;
  private readonly groups: number;
  /** lowest/highest exponent held in the power tables (the tables always hold exponent 0) */
  private readonly iMin: number;
  private readonly iMax: number;
  private readonly jMin: number;
  private readonly jMax: number;
  private readonly xp: Float64Array;
  private readonly yp: Float64Array;

  /**
   * @param rows the release's table
   * @param iScale multiply every I by this before compiling (the caller passes x^(1/iScale))
   * @param jScale the same for J
   */
  constructor(rows: readonly Term[], iScale = 1, jScale = 1) {
    const terms = rows
      .map((r) => ({ I: r.I * iScale, J: r.J * jScale, n: r.n }))
      .sort((a, b) => a.I - b.I || a.J - b.J);
    for (const t of terms) {
      if (!Number.isInteger(t.I) || !Number.isInteger(t.J)) {
        throw new Error(`power-sum: exponents ${t.I}, ${t.J} are not integers after scaling`);
      }
    }
    const m = terms.length;
    this.size = m;
    // the power tables always hold exponent 0
    this.iMin = Math.min(0, ...terms.map((t) => t.I));
    this.iMax = Math.max(0, ...terms.map((t) => t.I));
    this.jMin = Math.min(0, ...terms.map((t) => t.J));
    this.jMax = Math.max(0, ...terms.map((t) => t.J));
    this.xp = new Float64Array(this.iMax - this.iMin + 1);
    this.yp = new Float64Array(this.jMax - this.jMin + 1);

    this.coef = new Float64Array(3 * m);
    this.jx = new Int32Array(m);
    const distinct = [...new Set(terms.map((t) => t.I))];
    this.groups = distinct.length;
    this.gI = new Float64Array(2 * distinct.length);
    this.gx = new Int32Array(3 * distinct.length);
    let k = 0;
    distinct.forEach((I, gi) => {
      this.gI[2 * gi] = I;
      this.gI[2 * gi + 1] = I * (I - 1);
      this.gx[3 * gi] = I - this.iMin;
      this.gx[3 * gi + 1] = k;
      while (k < m && terms[k].I === I) {
        const { J, n } = terms[k];
        this.coef[3 * k] = n;
        this.coef[3 * k + 1] = J;
        this.coef[3 * k + 2] = J * (J - 1);
        this.jx[k] = J - this.jMin;
        k++;
      }
      this.gx[3 * gi + 2] = k;
    });
  }

  /** f(x, y) = Σ n x^I y^J. */
  value(x: number, y: number): number {
    const { coef, jx, gx, xp, yp } = this;
    fillPowers(xp, x, this.iMin, this.iMax);
    fillPowers(yp, y, this.jMin, this.jMax);
    let f = 0;
    for (let gi = 0, G = this.groups; gi < G; gi++) {
      let s = 0;
      for (let k = gx[3 * gi + 1], end = gx[3 * gi + 2]; k < end; k++) s += coef[3 * k] * yp[jx[k]];
      f += xp[gx[3 * gi]] * s;
    }
    return f;
  }

  /**
   * Fills out = [f, f_x, f_xx, f_y, f_yy, f_xy] at (x, y). Derivatives are taken with respect to
   * the variables as passed; x and y must be non-zero, which holds inside every IF97 region.
   */
  derivs(x: number, y: number, out: Float64Array): void {
    const { coef, jx, gI, gx, xp, yp } = this;
    fillPowers(xp, x, this.iMin, this.iMax);
    fillPowers(yp, y, this.jMin, this.jMax);
    let f = 0;
    let fx = 0;
    let fxx = 0;
    let fy = 0;
    let fyy = 0;
    let fxy = 0;
    for (let gi = 0, G = this.groups; gi < G; gi++) {
      // inner sums over the terms of one I: Σ n y^J, Σ J n y^J, Σ J(J−1) n y^J
      let s0 = 0;
      let s1 = 0;
      let s2 = 0;
      for (let k = gx[3 * gi + 1], end = gx[3 * gi + 2]; k < end; k++) {
        const t = coef[3 * k] * yp[jx[k]];
        s0 += t;
        s1 += coef[3 * k + 1] * t;
        s2 += coef[3 * k + 2] * t;
      }
      const xi = xp[gx[3 * gi]];
      const a = xi * s0;
      const b = xi * s1;
      const I = gI[2 * gi];
      f += a;
      fx += I * a;
      fxx += gI[2 * gi + 1] * a;
      fy += b;
      fyy += xi * s2;
      fxy += I * b;
    }
    const ix1 = 1 / x;
    const iy1 = 1 / y;
    out[F] = f;
    out[FX] = fx * ix1;
    out[FXX] = fxx * ix1 * ix1;
    out[FY] = fy * iy1;
    out[FYY] = fyy * iy1 * iy1;
    out[FXY] = fxy * ix1 * iy1;
  }
}
