/**
 * The T–s saturation dome. Reference values: IAPWS-IF97 saturated states as tabulated in steam
 * tables (e.g. at 100 °C / 0.101418 MPa: s' = 1.3072 kJ/(kg·K), s'' = 7.3541 kJ/(kg·K); at the
 * critical point T = 647.096 K, s = 4.412 kJ/(kg·K) — IAPWS-95 critical entropy, quoted from memory).
 */
import { isobarInDome, saturationDome, ticks } from '@/shared/charts/ts-diagram';

test('the dome starts at the triple point on the liquid side and ends there on the vapour side', () => {
  const d = saturationDome(40);
  expect(d[0].T).toBeCloseTo(273.16, 6);
  expect(d[0].s).toBeCloseTo(0, 1); // s' ≈ 0 at the triple point (reference state of the tables)
  expect(d[d.length - 1].T).toBeCloseTo(273.16, 6);
  expect(d[d.length - 1].s / 1000).toBeCloseTo(9.155, 2); // s'' at 0.01 °C, steam tables
});

test('its top is the critical point (647.096 K, s ≈ 4.41 kJ/(kg·K))', () => {
  const d = saturationDome(40);
  const top = d.reduce((a, b) => (b.T > a.T ? b : a));
  expect(top.T).toBeCloseTo(647.096, 2);
  expect(top.s / 1000).toBeCloseTo(4.41, 1);
});

test('liquid side rises in s and T; vapour side falls in s as T falls (a closed dome)', () => {
  const d = saturationDome(40);
  const mid = d.findIndex((p) => p.T === Math.max(...d.map((x) => x.T)));
  for (let i = 1; i <= mid; i++) {
    expect(d[i].T).toBeGreaterThanOrEqual(d[i - 1].T);
    expect(d[i].s).toBeGreaterThan(d[i - 1].s);
  }
  for (let i = mid + 1; i < d.length; i++) expect(d[i].T).toBeLessThanOrEqual(d[i - 1].T);
});

test('the isobar at 0.101418 MPa spans s′ = 1.3072 to s″ = 7.3541 kJ/(kg·K) at 373.15 K (steam tables)', () => {
  const b = isobarInDome(0.101418e6);
  expect(b.T).toBeCloseTo(373.15, 2);
  expect(b.sF / 1000).toBeCloseTo(1.3072, 3);
  expect(b.sG / 1000).toBeCloseTo(7.3541, 3);
});

test('ticks fall on 1-2-5 steps (common practice for chart axes)', () => {
  expect(ticks(0, 9, 6)).toEqual([0, 2, 4, 6, 8]);
  expect(ticks(273.15, 873.15, 6)).toEqual([300, 400, 500, 600, 700, 800]);
  expect(ticks(5, 5)).toEqual([5]);
});

test('project maps a value linearly between the pixel ends, and a flat scale to its start', async () => {
  const { project } = await import('@/shared/charts/ts-diagram');
  expect(project(5, { min: 0, max: 10, from: 40, to: 340 })).toBe(190);
  expect(project(300, { min: 273.15, max: 873.15, from: 300, to: 20 })).toBeCloseTo(300 - (26.85 / 600) * 280, 9);
  expect(project(1, { min: 1, max: 1, from: 7, to: 9 })).toBe(7);
});
