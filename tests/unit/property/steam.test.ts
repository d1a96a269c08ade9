/**
 * Property tests (fast-check) of shared/steam (IAPWS-IF97, IAPWS R7-97(2012)).
 *
 *  - Random single-phase (p, T) states of regions 1, 2, 3 and 5, drawn inside each region as IF97
 *    Sect. 2 / Fig. 1 defines it (region 1: 273.15–623.15 K above p_sat(T); region 2: below
 *    p_sat(T), or up to B23 (Eq. (5)) above 623.15 K, to 1073.15 K; region 3: 623.15 K to B23;
 *    region 5: 1073.15–2273.15 K up to 50 MPa), at least 20 mK from the saturation line and the
 *    region borders: pt → h → ph gives the state back, and pt → s → ps.
 *  - Next to the 1073.15 K border on the region-5 side the two regions' equations overlap: IF97's
 *    regions 2 and 5 differ there in h and s, so a (p, h) of region 5 up to ~61 mK above 1073.15 K
 *    is also a region-2 state (measured by a scan of this implementation; ph/ps then answer with
 *    region 2, as shared/steam documents). There the margin is 0.1 K, and the band has its own,
 *    weaker property: a self-consistent state of one of the two regions within 0.1 K.
 *  - Tolerances: T to 1e-6 K; h and s of the answer to 1e-9 relative (of max(|y|, R·T) for h,
 *    max(|s|, R) for s: h and s pass through 0 near the triple point, where a purely relative test
 *    says nothing; common practice).
 *  - Random invalid input (p ≤ 0, T below 273.15 K or above 2273.15 K, p above 100 MPa, or above
 *    50 MPa beyond 1073.15 K, NaN, ±Infinity, h or s beyond the 273.15 K / top-of-range state,
 *    qualities outside 0…1): SteamRangeError naming the input and its value, never a result.
 */
import fc from 'fast-check';
import { fixPropertySeed } from '../../helpers/property-seed';
import {
  P_CRIT,
  P_SAT_623,
  P_SAT_MIN,
  R,
  SteamRangeError,
  T_CRIT,
  b23P,
  b23T,
  ph,
  ps,
  psat,
  pt,
  px,
  regionPT,
  tsat,
  tx,
  type SteamState,
} from '@/shared/steam';

fixPropertySeed();

// a property's run time depends on the cases drawn; leave room on a loaded machine (whole suite on 2 cores)
jest.setTimeout(20_000);

const MPa = 1e6;
/** Margin to the saturation line and the 1/3 and 2/3 borders, K (the brief's 20 mK). */
const D = 0.02;
/** Margin to 1073.15 K on the region-5 side, K (the overlap band measured above, ~61 mK). */
const D5 = 0.1;

const unit = fc.double({ min: 0, max: 1, noNaN: true });
/** log-uniform in [lo, hi] from u in [0, 1] */
const logBetween = (lo: number, hi: number, u: number) =>
  Math.min(hi, Math.max(lo, Math.exp(Math.log(lo) + u * (Math.log(hi) - Math.log(lo)))));
const between = (lo: number, hi: number, u: number) => lo + u * (hi - lo);

type Sample = { p: number; T: number; region: 1 | 2 | 3 | 5 };

const region1 = fc.tuple(unit, unit).map(([a, b]): Sample => {
  const T = between(273.15, 623.15 - D, a);
  return { T, p: logBetween(psat(T + D), 100 * MPa, b), region: 1 };
});

const region2 = fc.tuple(unit, unit).map(([a, b]): Sample => {
  const T = between(273.15, 1073.15 - D, a);
  // below 273.17 K the saturation line 20 mK away lies outside IF97: stay below 600 Pa (T_sat ≈ 272.9 K)
  const pMax = T - D < 273.15 ? 600 : T - D <= 623.15 ? psat(T - D) : Math.min(b23P(T - D), 100 * MPa);
  return { T, p: logBetween(1, pMax, b), region: 2 };
});

const region3 = fc
  .oneof(
    fc.tuple(unit, unit).map(([a, b]) => {
      const T = between(623.15 + D, b23T(100 * MPa) - D, a);
      return { T, p: logBetween(b23P(T + D), 100 * MPa, b) };
    }),
    // the neighbourhood of the critical point, 20–25 MPa and 640–660 K
    fc.tuple(unit, unit).map(([a, b]) => ({ T: between(640, 660, a), p: between(20 * MPa, 25 * MPa, b) })),
  )
  .filter(({ p, T }) => p > b23P(T + D) && T > 623.15 + D && !(p < P_CRIT && Math.abs(T - tsat(p)) < D))
  .map(({ p, T }): Sample => ({ p, T, region: 3 }));

const region5 = fc
  .tuple(unit, unit)
  .map(([a, b]): Sample => ({ T: between(1073.15 + D5, 2273.15, a), p: logBetween(1, 50 * MPa, b), region: 5 }));

const anyRegion = fc.oneof(region1, region2, region3, region5);

const hScale = (st: SteamState) => Math.max(Math.abs(st.h), R * st.T);
const sScale = (st: SteamState) => Math.max(Math.abs(st.s), R);

/** The checks of a solved state against the forward state it came from. */
function sameState(back: SteamState, st: SteamState): void {
  expect(back.region).toBe(st.region);
  expect(Math.abs(back.T - st.T)).toBeLessThanOrEqual(1e-6);
  expect(Math.abs(back.h - st.h)).toBeLessThanOrEqual(1e-9 * hScale(st));
  expect(Math.abs(back.s - st.s)).toBeLessThanOrEqual(1e-9 * sScale(st));
  expect(back.p).toBe(st.p);
}

describe('round trips over random single-phase states (IF97 Sect. 2 regions, ≥ 20 mK from borders)', () => {
  test('the samples are in the region they were drawn for (IF97 Sect. 2, Fig. 1)', () => {
    fc.assert(
      fc.property(anyRegion, ({ p, T, region }) => {
        expect(regionPT(p, T)).toBe(region);
      }),
      { numRuns: 500 },
    );
  });

  test('pt → h → ph: the same T (1e-6 K), h and s (1e-9), region', () => {
    fc.assert(
      fc.property(anyRegion, ({ p, T }) => {
        const st = pt(p, T);
        sameState(ph(p, st.h), st);
      }),
      { numRuns: 500 },
    );
  });

  test('pt → s → ps: the same T (1e-6 K), h and s (1e-9), region', () => {
    fc.assert(
      fc.property(anyRegion, ({ p, T }) => {
        const st = pt(p, T);
        sameState(ps(p, st.s), st);
      }),
      { numRuns: 500 },
    );
  });

  test('region 3 alone (near-critical included): pt → ph and pt → ps', () => {
    fc.assert(
      fc.property(region3, ({ p, T }) => {
        const st = pt(p, T);
        sameState(ph(p, st.h), st);
        sameState(ps(p, st.s), st);
      }),
      { numRuns: 300 },
    );
  });

  test('region-2/5 overlap band (1073.15 K to +0.1 K): ph/ps answer region 2 or 5, within 0.1 K, with h / s met', () => {
    fc.assert(
      fc.property(unit, unit, (a, b) => {
        const T = between(1073.15, 1073.15 + D5, a);
        const p = logBetween(1, 50 * MPa, b);
        const st = pt(p, T);
        for (const [back, y, key, scale] of [
          [ph(p, st.h), st.h, 'h', hScale(st)],
          [ps(p, st.s), st.s, 's', sScale(st)],
        ] as const) {
          expect([2, 5]).toContain(back.region);
          expect(Math.abs(back.T - T)).toBeLessThanOrEqual(D5);
          expect(Math.abs(back[key] - y)).toBeLessThanOrEqual(1e-9 * scale);
          // the answer is a state of its own region: pt of its (p, T) gives the same h (or s)
          const fwd = pt(p, back.T);
          if (fwd.region === back.region) expect(Math.abs(fwd[key] - y)).toBeLessThanOrEqual(1e-9 * scale);
        }
      }),
      { numRuns: 100 },
    );
  });

  test('states a few ulps inside a range limit or region border come back too (273.15000000000003 K is 32 °F in double precision)', () => {
    // (32 + 459.67) · (1/1.8) = 273.15000000000003 in IEEE 754 double: SP 811's °F rule as computed
    expect((32 + 459.67) * (1 / 1.8)).toBe(273.15000000000003);
    const ulp = (x: number) => x * Number.EPSILON;
    /** [T, p] a few ulps inside the edge, on the side of the region that owns the border (IF97 Sect. 2) */
    const edges: Record<string, (k: number, a: number) => [number, number]> = {
      'bottom 273.15 K': (k, a) => [273.15 + k * ulp(273.15), logBetween(1, 100 * MPa, a)],
      'top 2273.15 K': (k, a) => [2273.15 - k * ulp(2273.15), logBetween(1, 50 * MPa, a)],
      '1073.15 K above 50 MPa': (k, a) => [1073.15 - k * ulp(1073.15), between(50 * MPa, 100 * MPa, a)],
      'region 2 below 1073.15 K': (k, a) => [1073.15 - k * ulp(1073.15), logBetween(1, 50 * MPa, a)],
      'region 1 below 623.15 K': (k, a) => [623.15 - k * ulp(623.15), between(P_SAT_623 * 1.001, 100 * MPa, a)],
      'region 2 above B23': (k, a) => {
        const p = between(P_SAT_623 * 1.001, 100 * MPa, a);
        return [b23T(p) + k * ulp(b23T(p)), p];
      },
    };
    fc.assert(
      fc.property(unit, fc.integer({ min: 0, max: 64 }), fc.constantFrom(...Object.keys(edges)), (a, k, edge) => {
        const [T, p] = edges[edge](k, a);
        const st = pt(p, T);
        const fromH = ph(p, st.h);
        const fromS = ps(p, st.s);
        for (const back of [fromH, fromS]) {
          expect(back.region).toBe(st.region);
          expect(Math.abs(back.T - T)).toBeLessThanOrEqual(1e-6);
        }
        expect(Math.abs(fromH.h - st.h)).toBeLessThanOrEqual(1e-9 * hScale(st));
        expect(Math.abs(fromS.s - st.s)).toBeLessThanOrEqual(1e-9 * sScale(st));
      }),
      { numRuns: 600 },
    );
  });

  test('random (p, h) and (p, s) inside the range: a finite state that meets h / s, never a solver failure', () => {
    fc.assert(
      fc.property(unit, unit, fc.boolean(), (a, b, useS) => {
        const p = logBetween(1, 100 * MPa, a);
        // the range at p: from the 273.15 K state to the 2273.15 K state (1073.15 K above 50 MPa)
        const lo = pt(p, 273.15);
        const hi = pt(p, p > 50 * MPa ? 1073.15 : 2273.15);
        const key = useS ? 's' : 'h';
        const y = between(lo[key], hi[key], b);
        const st = useS ? ps(p, y) : ph(p, y);
        for (const k of ['p', 'T', 'v', 'h', 's', 'u'] as const) expect(Number.isFinite(st[k])).toBe(true);
        for (const k of ['cp', 'cv', 'w', 'x'] as const) expect(st[k] === null || Number.isFinite(st[k])).toBe(true);
        expect(Math.abs(st[key] - y)).toBeLessThanOrEqual(1e-9 * (useS ? sScale(st) : hScale(st)));
        expect(st.T).toBeGreaterThanOrEqual(273.15 - 1e-9);
        expect(st.T).toBeLessThanOrEqual(2273.15 + 1e-9);
        if (st.region === 4) {
          expect(st.x).toBeGreaterThanOrEqual(0);
          expect(st.x).toBeLessThanOrEqual(1);
        }
      }),
      { numRuns: 400 },
    );
  });
});

// ---------------------------------------------------------------- refusals

type Call = { input: 'p' | 'T' | 'h' | 's' | 'x'; value: number; run: () => unknown };

function expectRefusal({ input, value, run }: Call): void {
  let result: unknown;
  try {
    result = run();
  } catch (e) {
    expect(e).toBeInstanceOf(SteamRangeError);
    const err = e as SteamRangeError;
    expect(err.input).toBe(input);
    expect(Object.is(err.value, value)).toBe(true);
    expect(err.message.startsWith(`${input} = `)).toBe(true);
    if (!Number.isFinite(value)) expect(err.message).toContain(String(value));
    return;
  }
  throw new Error(`expected SteamRangeError on ${input} = ${value}, got ${JSON.stringify(result)}`);
}

const notFinite = fc.constantFrom(NaN, Infinity, -Infinity);
const validP = fc.double({ min: 1, max: 50 * MPa, noNaN: true });
const validT = fc.double({ min: 273.15, max: 2273.15, noNaN: true });
const badP = fc.oneof(
  notFinite,
  fc.double({ max: 0, noNaN: true }),
  fc.double({ min: 100 * MPa, max: 1e300, noNaN: true, minExcluded: true }),
);
const badT = fc.oneof(
  notFinite,
  fc.double({ max: 273.15, maxExcluded: true, noNaN: true }),
  fc.double({ min: 2273.15, minExcluded: true, noNaN: true }),
);

describe('invalid input → SteamRangeError naming the input and its value (IF97 Sect. 2 range), never a result', () => {
  test('pt with p or T outside IF97 (p ≤ 0, p > 100 MPa, T < 273.15 K, T > 2273.15 K, NaN, ±Infinity)', () => {
    fc.assert(
      fc.property(
        fc.oneof(
          badP.map((p) => ['p', p] as const),
          badT.map((T) => ['T', T] as const),
        ),
        validP,
        validT,
        ([which, bad], p, T) => {
          expectRefusal({ input: which, value: bad, run: () => (which === 'p' ? pt(bad, T) : pt(p, bad)) });
        },
      ),
      { numRuns: 300 },
    );
  });

  test('pt above 50 MPa beyond 1073.15 K (region 5 limit)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 50 * MPa, max: 100 * MPa, minExcluded: true, noNaN: true }),
        fc.double({ min: 1073.15, max: 2273.15, minExcluded: true, noNaN: true }),
        (p, T) => {
          expectRefusal({ input: 'p', value: p, run: () => pt(p, T) });
        },
      ),
      { numRuns: 100 },
    );
  });

  test('ph / ps with p outside IF97, h / s not finite, or beyond the 273.15 K and top-of-range states', () => {
    fc.assert(
      fc.property(
        fc.boolean(),
        fc.double({ min: 1, max: 100 * MPa, noNaN: true }),
        fc.oneof(
          badP.map((v) => ['p', v] as const),
          notFinite.map((v) => ['y', v] as const),
          fc.constantFrom(['below', 0] as const, ['above', 0] as const),
        ),
        fc.double({ min: 1e-12, max: 1e7, noNaN: true }),
        (useS, p, [kind, v], gap) => {
          const name = useS ? 's' : 'h';
          const solve = (pp: number, y: number) => (useS ? ps(pp, y) : ph(pp, y));
          if (kind === 'p') return expectRefusal({ input: 'p', value: v, run: () => solve(v, 1e3) });
          if (kind === 'y') return expectRefusal({ input: name, value: v, run: () => solve(p, v) });
          const edgeState = pt(p, kind === 'below' ? 273.15 : p > 50 * MPa ? 1073.15 : 2273.15);
          const edge = edgeState[name];
          // a step beyond the edge state of at least 1e-9 of its scale (far more than round-off)
          const step = Math.max(gap, 1e-9 * (useS ? sScale(edgeState) : hScale(edgeState)));
          const y = kind === 'below' ? edge - step : edge + step;
          expectRefusal({ input: name, value: y, run: () => solve(p, y) });
        },
      ),
      { numRuns: 300 },
    );
  });

  test('saturation: psat / tx outside 273.15 K … T_c, tsat / px outside 611.213 Pa … p_c, quality outside 0 … 1', () => {
    const badTsat = fc.oneof(
      notFinite,
      fc.double({ max: 273.15, maxExcluded: true, noNaN: true }),
      fc.double({ min: T_CRIT, minExcluded: true, noNaN: true }),
    );
    const badPsat = fc.oneof(
      notFinite,
      fc.double({ max: P_SAT_MIN, maxExcluded: true, noNaN: true }),
      fc.double({ min: P_CRIT, minExcluded: true, noNaN: true }),
    );
    // −0 is excluded: it is the quality 0, a valid input
    const badX = fc.oneof(
      notFinite,
      fc.double({ max: 0, maxExcluded: true, noNaN: true }).filter((x) => !Object.is(x, -0)),
      fc.double({ min: 1, minExcluded: true, noNaN: true }),
    );
    fc.assert(
      fc.property(badTsat, badPsat, badX, fc.double({ min: 0, max: 1, noNaN: true }), (T, p, x, goodX) => {
        expectRefusal({ input: 'T', value: T, run: () => psat(T) });
        expectRefusal({ input: 'T', value: T, run: () => tx(T, goodX) });
        expectRefusal({ input: 'p', value: p, run: () => tsat(p) });
        expectRefusal({ input: 'p', value: p, run: () => px(p, goodX) });
        expectRefusal({ input: 'x', value: x, run: () => px(10 * MPa, x) });
        expectRefusal({ input: 'x', value: x, run: () => tx(400, x) });
      }),
      { numRuns: 200 },
    );
  });

  test('the border the generators lean on: B23 starts on the saturation line at 623.15 K (IF97 Sect. 4 check value p_B23(623.15 K) = 16.5291643 MPa)', () => {
    expect(b23P(623.15) / MPa).toBeCloseTo(16.5291643, 6);
    expect(b23T(16.5291643 * MPa)).toBeCloseTo(623.15, 6);
    expect(P_SAT_623 / MPa).toBeCloseTo(16.5291643, 4);
  });
});
