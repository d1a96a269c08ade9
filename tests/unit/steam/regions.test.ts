/**
 * Region choice on both sides of every IF97 border (IAPWS R7-97(2012) Sect. 2, Fig. 1 and the
 * B23 equation, Sect. 4), continuity across the borders within the release's stated
 * inconsistencies, and the phase names.
 */
import {
  P_CRIT,
  P_SAT_623,
  P_SAT_MIN,
  T_CRIT,
  b23P,
  b23T,
  ph,
  ps,
  psat,
  pt,
  px,
  regionPH,
  regionPS,
  regionPT,
  tsat,
} from '@/shared/steam';

const MPa = 1e6;
const up = (x: number, r = 1e-9) => x * (1 + r);
const down = (x: number, r = 1e-9) => x * (1 - r);

describe('regionPT: both sides of every border (IF97 Sect. 2, Fig. 1)', () => {
  test('the range ends: 273.15 K, 1073.15 K, 2273.15 K, 50 MPa and 100 MPa are inside', () => {
    expect(regionPT(1 * MPa, 273.15)).toBe(1);
    expect(regionPT(100 * MPa, 273.15)).toBe(1);
    expect(regionPT(100 * MPa, 1073.15)).toBe(2);
    expect(regionPT(50 * MPa, 2273.15)).toBe(5);
    expect(regionPT(1, 300)).toBe(2); // 1 Pa: vapour
  });

  test('saturation line below 623.15 K: 1 above p_sat(T), 2 below', () => {
    for (const T of [273.15, 280, 373.15, 450, 550, 600, 623.15]) {
      expect(regionPT(up(psat(T)), T)).toBe(1);
      expect(regionPT(down(psat(T)), T)).toBe(2);
    }
    // on the line itself the liquid equation applies
    expect(regionPT(psat(500), 500)).toBe(1);
  });

  test('623.15 K above p_sat(623.15 K): 1 at and below, 3 above', () => {
    for (const p of [up(P_SAT_623, 1e-6), 20 * MPa, 50 * MPa, 100 * MPa]) {
      expect(regionPT(p, 623.15)).toBe(1);
      expect(regionPT(p, up(623.15))).toBe(3);
    }
  });

  test('B23 (Eqs. (5), (6)): 3 below T_B23(p), 2 at and above it', () => {
    for (const p of [17 * MPa, 22.064 * MPa, 30 * MPa, 60 * MPa, 100 * MPa]) {
      const T = b23T(p);
      expect(regionPT(p, down(T))).toBe(3);
      expect(regionPT(p, up(T))).toBe(2);
    }
    for (const T of [630, 700, 800, 863]) {
      expect(regionPT(up(b23P(T)), T)).toBe(3);
      expect(regionPT(down(b23P(T)), T)).toBe(2);
    }
  });

  test('1073.15 K: 2 at and below, 5 above (up to 50 MPa)', () => {
    for (const p of [1e3, 1 * MPa, 30 * MPa, 50 * MPa]) {
      expect(regionPT(p, 1073.15)).toBe(2);
      expect(regionPT(p, up(1073.15))).toBe(5);
    }
  });
});

describe('regionPH and regionPS: both sides of every border in h and s', () => {
  const d = 1e-7;
  const sides = (p: number, y: number, kind: 'h' | 's', below: number, above: number) => {
    const f = kind === 'h' ? regionPH : regionPS;
    expect([f(p, down(y, d)), f(p, up(y, d))]).toEqual([below, above]);
  };

  test('at 1 MPa: liquid | wet | vapour | region 5 (h′, h″, h(1073.15 K))', () => {
    const p = 1 * MPa;
    const L = px(p, 0);
    const V = px(p, 1);
    const b25 = pt(p, 1073.15);
    for (const k of ['h', 's'] as const) {
      sides(p, L[k], k, 1, 4);
      sides(p, V[k], k, 4, 2);
      sides(p, b25[k], k, 2, 5);
    }
  });

  test('at 20 MPa: region 1 | 3 at 623.15 K, 3 | wet | 3 on the region-3 dome, 3 | 2 at B23', () => {
    const p = 20 * MPa;
    const b13 = pt(p, 623.15);
    const L = px(p, 0);
    const V = px(p, 1);
    const b23 = pt(p, b23T(p));
    for (const k of ['h', 's'] as const) {
      sides(p, b13[k], k, 1, 3);
      sides(p, L[k], k, 3, 4);
      sides(p, V[k], k, 4, 3);
      sides(p, b23[k], k, 3, 2);
    }
  });

  test('at 16.5 MPa (just below p_sat(623.15 K)) the dome is bounded by regions 1 and 2', () => {
    const p = 16.5 * MPa;
    for (const k of ['h', 's'] as const) {
      sides(p, px(p, 0)[k], k, 1, 4);
      sides(p, px(p, 1)[k], k, 4, 2);
    }
  });

  test('above the critical pressure (30 MPa) no wet states: 1 | 3 | 2 | 5', () => {
    const p = 30 * MPa;
    for (const k of ['h', 's'] as const) {
      sides(p, pt(p, 623.15)[k], k, 1, 3);
      sides(p, pt(p, b23T(p))[k], k, 3, 2);
      sides(p, pt(p, 1073.15)[k], k, 2, 5);
    }
    // between them region 3 holds h from liquid-like to vapour-like values
    expect(regionPH(p, 2.0e6)).toBe(3);
  });

  test('below p_sat(273.15 K) only vapour: regions 2 and 5', () => {
    const p = 0.5 * P_SAT_MIN;
    expect(regionPH(p, pt(p, 273.15).h)).toBe(2);
    expect(regionPS(p, pt(p, 1500).s)).toBe(5);
  });
});

describe('continuity across region borders within the release’s stated inconsistencies', () => {
  // IF97 Sect. 10 (Prague values, typed from memory of the release): along region borders the
  // equations agree within |Δv/v| 0.05 %, |Δh| 0.2 kJ/kg, |Δs| 0.2 J/(kg·K), |Δcp/cp| 1 %, |Δw/w| 1 %.
  const within = (a: ReturnType<typeof pt>, b: ReturnType<typeof pt>) => ({
    v: Math.abs(a.v / b.v - 1) <= 5e-4,
    h: Math.abs(a.h - b.h) <= 200,
    s: Math.abs(a.s - b.s) <= 0.2,
    cp: Math.abs((a.cp as number) / (b.cp as number) - 1) <= 0.01,
    w: Math.abs((a.w as number) / (b.w as number) - 1) <= 0.01,
  });
  const ALL = { v: true, h: true, s: true, cp: true, w: true };

  test('regions 1/3 at 623.15 K, 16.53-100 MPa', () => {
    for (let p = up(P_SAT_623, 1e-6); p <= 100 * MPa; p += 1.3 * MPa) {
      const a = pt(p, 623.15);
      const b = pt(p, up(623.15));
      expect([a.region, b.region]).toEqual([1, 3]);
      expect(within(a, b)).toEqual(ALL);
    }
  });

  test('regions 2/3 along B23, 16.53-100 MPa', () => {
    for (let p = up(P_SAT_623, 1e-6); p <= 100 * MPa; p += 1.3 * MPa) {
      const T = b23T(p);
      const a = pt(p, up(T));
      const b = pt(p, down(T));
      expect([a.region, b.region]).toEqual([2, 3]);
      expect(within(a, b)).toEqual(ALL);
    }
  });

  test('regions 2/5 at 1073.15 K, 1 kPa-50 MPa', () => {
    for (let p = 1e3; p <= 50 * MPa; p *= 1.4) {
      const a = pt(p, 1073.15);
      const b = pt(p, up(1073.15));
      expect([a.region, b.region]).toEqual([2, 5]);
      expect(within(a, b)).toEqual(ALL);
    }
  });

  test('saturated ends equal the single-phase states beside the line (same equations)', () => {
    for (const p of [1e3, 0.1 * MPa, 5 * MPa, 16 * MPa, 18 * MPa, 21 * MPa, 22 * MPa]) {
      const T = tsat(p);
      const L = px(p, 0);
      const V = px(p, 1);
      const l = pt(up(p, 1e-12), T);
      const v = pt(down(p, 1e-12), T);
      expect(Math.abs(L.h - l.h)).toBeLessThan(1e-6 * l.h);
      expect(Math.abs(V.h - v.h)).toBeLessThan(1e-6 * v.h);
      expect(Math.abs(L.v / l.v - 1)).toBeLessThan(1e-6);
      expect(Math.abs(V.v / v.v - 1)).toBeLessThan(1e-6);
    }
  });

  test('the wet region closes at the critical point: h′ and h″ meet, v′ < v″ below it', () => {
    for (const p of [16.6, 19, 21, 22, 22.06].map((x) => x * MPa)) {
      expect(px(p, 0).v).toBeLessThan(px(p, 1).v);
    }
    const L = px(P_CRIT, 0);
    const V = px(P_CRIT, 1);
    expect(Math.abs(L.h - V.h)).toBeLessThan(10); // J/kg, against ~2.09e6
    expect(Math.abs(L.v / V.v - 1)).toBeLessThan(1e-5);
    expect(Math.abs(tsat(P_CRIT) - T_CRIT)).toBeLessThan(1e-6);
  });
});

describe('phase names', () => {
  test('liquid, vapour, supercritical and two-phase (common practice: supercritical when p ≥ p_c and T ≥ T_c)', () => {
    expect(pt(25 * MPa, 600).phase).toBe('liquid');
    expect(pt(21 * MPa, 640).phase).toBe('liquid'); // region 3, above p_sat(640 K) = 20.27 MPa
    expect(pt(20 * MPa, 640).phase).toBe('vapour'); // region 3, below it
    expect(pt(10 * MPa, 700).phase).toBe('vapour');
    expect(pt(15 * MPa, 700).phase).toBe('vapour');
    expect(pt(25 * MPa, 700).phase).toBe('supercritical');
    expect(pt(25 * MPa, 650).phase).toBe('supercritical');
    expect(pt(30 * MPa, 1500).phase).toBe('supercritical');
    expect(pt(1 * MPa, 1500).phase).toBe('vapour');
    expect(px(1 * MPa, 0.5).phase).toBe('two-phase');
    expect(ph(1 * MPa, 2e6).phase).toBe('two-phase');
    expect(ps(20 * MPa, 4.3e3).phase).toBe('two-phase');
  });

  test('single-phase states have x = null; wet states have x and null cp, cv, w (never NaN)', () => {
    const single = pt(1 * MPa, 400);
    expect(single.x).toBeNull();
    expect(Number.isFinite(single.cp)).toBe(true);
    for (const wet of [px(1 * MPa, 0), px(1 * MPa, 0.3), px(1 * MPa, 1), ph(20 * MPa, 2e6)]) {
      expect(wet.region).toBe(4);
      expect(wet.x).not.toBeNull();
      expect([wet.cp, wet.cv, wet.w]).toEqual([null, null, null]);
      expect(Number.isFinite(wet.u)).toBe(true);
    }
    expect(px(1 * MPa, 0).x).toBe(0);
    expect(px(1 * MPa, 1).x).toBe(1);
  });
});
