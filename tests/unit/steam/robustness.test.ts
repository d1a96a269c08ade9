/**
 * Property tests (common practice, fast-check): over IF97's whole range every call returns finite
 * numbers or throws SteamRangeError, never NaN or another error; the generic power-sum evaluator
 * agrees with a direct summation of its definition.
 */
import fc from 'fast-check';
import { SteamRangeError, ph, ps, pt, px, tx } from '@/shared/steam';
import type { SteamState } from '@/shared/steam';
import { PowerSum } from '@/shared/steam/power-sum';

const SETTINGS = { numRuns: 1500, seed: 97 };

function finiteState(st: SteamState): boolean {
  const core = [st.p, st.T, st.v, st.h, st.s, st.u].every(Number.isFinite);
  const optional = [st.cp, st.cv, st.w].every((v) =>
    st.region === 4 ? v === null : Number.isFinite(v) && (v as number) > 0,
  );
  const x = st.region === 4 ? st.x !== null && st.x >= 0 && st.x <= 1 : st.x === null;
  return core && optional && x && st.v > 0 && st.T >= 273.15 - 1e-9;
}

/** Runs f; true when it returns a finite state or throws SteamRangeError. */
function wellBehaved(f: () => SteamState, check?: (st: SteamState) => boolean): boolean {
  let st: SteamState;
  try {
    st = f();
  } catch (e) {
    if (e instanceof SteamRangeError) return true;
    throw e;
  }
  return finiteState(st) && (check ? check(st) : true);
}

const logP = fc.double({ min: Math.log(1), max: Math.log(120e6), noNaN: true }).map(Math.exp);

describe('robustness over the whole range (fast-check)', () => {
  test('pt: finite state or SteamRangeError for any p in 1 Pa-120 MPa, T in 250-2400 K', () => {
    fc.assert(
      fc.property(logP, fc.double({ min: 250, max: 2400, noNaN: true }), (p, T) => wellBehaved(() => pt(p, T))),
      SETTINGS,
    );
  });

  test('ph: finite state with h met to 1e-9, or SteamRangeError, for h in -0.2-8 MJ/kg', () => {
    fc.assert(
      fc.property(logP, fc.double({ min: -0.2e6, max: 8e6, noNaN: true }), (p, h) =>
        wellBehaved(
          () => ph(p, h),
          (st) => Math.abs(st.h - h) <= 1e-9 * Math.max(Math.abs(h), 1e3),
        ),
      ),
      SETTINGS,
    );
  });

  test('ps: finite state with s met to 1e-9, or SteamRangeError, for s in -0.1-14 kJ/(kg·K)', () => {
    fc.assert(
      fc.property(logP, fc.double({ min: -100, max: 14e3, noNaN: true }), (p, s) =>
        wellBehaved(
          () => ps(p, s),
          (st) => Math.abs(st.s - s) <= 1e-9 * Math.max(Math.abs(s), 1),
        ),
      ),
      SETTINGS,
    );
  });

  test('ph and ps near the critical point (±0.5 MPa, the whole region-3 dome)', () => {
    const p = fc.double({ min: 21.5e6, max: 22.6e6, noNaN: true });
    fc.assert(
      fc.property(p, fc.double({ min: 1.8e6, max: 2.4e6, noNaN: true }), (pp, h) =>
        wellBehaved(
          () => ph(pp, h),
          (st) => Math.abs(st.h / h - 1) <= 1e-9,
        ),
      ),
      SETTINGS,
    );
    fc.assert(
      fc.property(p, fc.double({ min: 4.0e3, max: 4.9e3, noNaN: true }), (pp, s) =>
        wellBehaved(
          () => ps(pp, s),
          (st) => Math.abs(st.s / s - 1) <= 1e-9,
        ),
      ),
      SETTINGS,
    );
  });

  test('px and tx: finite wet states for any quality 0…1 on the whole saturation line', () => {
    const x = fc.double({ min: 0, max: 1, noNaN: true });
    fc.assert(
      fc.property(fc.double({ min: 611.3, max: 22.064e6, noNaN: true }), x, (p, q) => wellBehaved(() => px(p, q))),
      SETTINGS,
    );
    fc.assert(
      fc.property(fc.double({ min: 273.15, max: 647.096, noNaN: true }), x, (T, q) => wellBehaved(() => tx(T, q))),
      SETTINGS,
    );
  });
});

describe('PowerSum, the one evaluator of every IF97 sum (common practice: check against its definition)', () => {
  test('value and first and second derivatives equal a direct summation of Σ n x^I y^J', () => {
    const row = fc.record({
      I: fc.integer({ min: -12, max: 32 }),
      J: fc.integer({ min: -41, max: 58 }),
      n: fc.double({ min: -1, max: 1, noNaN: true }),
    });
    fc.assert(
      fc.property(
        fc.array(row, { minLength: 1, maxLength: 40 }),
        fc.double({ min: 0.3, max: 1.7, noNaN: true }),
        fc.double({ min: 0.3, max: 1.7, noNaN: true }),
        (rows, x, y) => {
          const sum = new PowerSum(rows);
          const out = new Float64Array(6);
          sum.derivs(x, y, out);
          const ref = [0, 0, 0, 0, 0, 0];
          let scale = 0;
          for (const { I, J, n } of rows) {
            const t = n * x ** I * y ** J;
            ref[0] += t;
            ref[1] += (I * t) / x;
            ref[2] += (I * (I - 1) * t) / (x * x);
            ref[3] += (J * t) / y;
            ref[4] += (J * (J - 1) * t) / (y * y);
            ref[5] += (I * J * t) / (x * y);
            scale += (Math.abs(t) * (1 + I * I + J * J)) / Math.min(x, y) ** 2;
          }
          const tol = 1e-13 * scale + 1e-300;
          return ref.every((r, k) => Math.abs(out[k] - r) <= tol) && Math.abs(sum.value(x, y) - ref[0]) <= tol;
        },
      ),
      { numRuns: 400, seed: 5 },
    );
  });

  test('quarter exponents (region 2a T(p,s), IF97 Eq. (25)) compile with a scale of 4', () => {
    const rows = [
      { I: -1.5, J: 2, n: 0.7 },
      { I: 0.25, J: -3, n: -1.1 },
      { I: 1.25, J: 0, n: 0.3 },
    ];
    const sum = new PowerSum(rows, 4);
    const x = 2.3;
    const y = 0.8;
    const direct = rows.reduce((a, r) => a + r.n * x ** r.I * y ** r.J, 0);
    expect(sum.value(Math.sqrt(Math.sqrt(x)), y)).toBeCloseTo(direct, 12);
    expect(() => new PowerSum(rows)).toThrow(/not integers/);
  });
});
