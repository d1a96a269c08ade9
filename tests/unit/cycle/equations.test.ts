/**
 * Plant equations of the demo unit: what becomes a variable and a constraint, the analytic
 * gradients against central differences (common practice), and the IF97 wrappers that keep the
 * iteration smooth across the saturation line.
 */
import { buildEquations, propsPT, propsSat, SCALE, type AcceptedReading } from '@/shared/cycle';
import { demoDesignReadings, demoUnit } from '@/demo/unit';
import { reconcile } from '@/shared/reconcile';
import { pt, px, tsat } from '@/shared/steam';
import { sigmaFor } from '@/shared/uncertainty';

const B = 101325;
const readings = new Map<string, AcceptedReading>(
  demoDesignReadings(B).map((r) => {
    const i = demoUnit.instruments.find((x) => x.tag === r.instrumentTag)!;
    return [r.instrumentTag, { tag: r.instrumentTag, value: r.valueSI, sigma: sigmaFor(i.accuracy, r.valueSI) }];
  }),
);
const eq = buildEquations(demoUnit, readings);

describe('variables and constraints of the demo unit', () => {
  test('unmeasured: the three flows nobody reads and the LP exhaust quality', () => {
    expect(eq.unmeasured.map((u) => u.id).sort()).toEqual(['m@lpe', 'm@lpi', 'm@lpx', 'x@lpx']);
    // guesses from the nominal values, in internal units (kg/s, quality)
    expect(eq.unmeasured.find((u) => u.id === 'x@lpx')!.guess).toBeCloseTo(0.9054, 4);
  });
  test('one flow per stream: boiler, superheater, HP section and feed pump carry one flow, read twice', () => {
    // named after the stream's first reading in point order (fw comes first)
    expect(eq.points.fw.m).toBe('FI-102');
    expect(eq.points.ms.m).toBe('FI-102');
    expect(eq.points.dao.m).toBe('FI-102');
    expect(eq.info['stream:FI-102:FI-101']).toMatchObject({ kind: 'stream', deps: ['FI-102', 'FI-101'] });
    expect(eq.info['mass:cep']).toBeUndefined(); // one stream through the pump: holds by construction
    expect(eq.info['mass:hdr']).toMatchObject({ kind: 'mass' });
  });
  test('pressures: gauges, the points that take another point’s pressure, the assumed ones', () => {
    expect(eq.points.hw.p).toEqual({ var: 'PI-401' });
    expect(eq.points.hw.pressureSource).toBe('same-as');
    expect(eq.points.mu.pressureSource).toBe('assumed');
    expect(eq.points.mu.p).toEqual({ value: 0.6 });
    expect(eq.points.cwi.p).toEqual({ value: 0.25 });
  });
  test('saturation, enthalpy-equality, energy, duty, power and twin constraints are all there', () => {
    const ids = Object.keys(eq.info);
    for (const id of [
      'sat:drum',
      'sat:dao',
      'sat:hw',
      'enthalpy:proc',
      'enthalpy:das2',
      'energy:lph',
      'energy:da',
      'duty:cond',
      'power:gen',
    ]) {
      expect(ids).toContain(id);
    }
    for (const t of [
      'twin:PI-301:PI-302',
      'twin:PI-401:PI-402',
      'twin:TI-102A:TI-102B',
      'twin:TI-403A:TI-403B',
      'twin:JI-601:JI-602',
    ])
      expect(ids).toContain(t);
    // the HP exhaust's enthalpy is the header's: no constraint for lpi and das (no thermometer of their own)
    expect(ids).not.toContain('enthalpy:lpi');
    expect(ids).not.toContain('enthalpy:das');
  });
  test('levels and the feed-pump discharge read no balance', () => {
    expect(eq.notInBalance).toEqual(['PI-103', 'TI-103', 'LI-101', 'LI-301', 'LI-401', 'LI-201']);
  });
  test('internal units are scaled: MPa, kJ/kg, MW (measured σ scaled with them)', () => {
    const p = eq.measured.find((m) => m.id === 'PI-301')!;
    expect(p.value).toBeCloseTo(0.45, 12);
    expect(p.sigma).toBeCloseTo(readings.get('PI-301')!.sigma / SCALE.p, 15);
    const j = eq.measured.find((m) => m.id === 'JI-601')!;
    expect(j.value).toBeCloseTo(21.87, 1);
  });
});

describe('analytic gradients agree with central differences (common practice)', () => {
  const v: Record<string, number> = {};
  for (const m of eq.measured) v[m.id] = m.value;
  for (const u of eq.unmeasured) v[u.id] = u.guess!;
  // off the design point, so that no derivative vanishes by symmetry
  for (const k of Object.keys(v)) v[k] *= 1.003;
  test.each(eq.constraints.map((c) => [c.id, c] as const))('%s', (_id, c) => {
    const g = c.grad!(v);
    for (const [k, d] of Object.entries(g)) {
      const h = 1e-6 * Math.max(Math.abs(v[k]), 1e-3);
      const up = { ...v, [k]: v[k] + h };
      const dn = { ...v, [k]: v[k] - h };
      const fd = (c.f(up) - c.f(dn)) / (2 * h);
      expect(Math.abs(d - fd)).toBeLessThanOrEqual(1e-5 * Math.max(1, Math.abs(fd)));
    }
  });
});

describe('reconcile() on the demo unit', () => {
  test('at design: converges, nothing to correct, observable unknowns at their design values', () => {
    const r = reconcile({
      measured: eq.measured,
      unmeasured: eq.unmeasured,
      constraints: eq.constraints,
      tolerance: 1e-8,
    });
    expect(r.passed).toBe(true);
    expect(r.chiSquare).toBeLessThan(1e-12);
    expect(r.unobservable).toEqual([]);
    expect(r.values['x@lpx']).toBeCloseTo(0.9054036, 6);
    expect(r.iterations).toBeLessThanOrEqual(5);
  });
});

describe('IF97 wrappers (properties.ts)', () => {
  test('vapour below saturation: continued linearly, continuous at the line, flagged', () => {
    const p = 0.3e6;
    const Ts = tsat(p);
    const above = propsPT(p, Ts + 0.01, 'vapour');
    const below = propsPT(p, Ts - 5, 'vapour');
    expect(above.wrongSide).toBe(false);
    expect(below.wrongSide).toBe(true);
    expect(Math.abs(propsPT(p, Ts + 1e-3, 'vapour').h - propsPT(p, Ts + 0.999e-3, 'vapour').h)).toBeLessThan(1);
    expect(below.h).toBeLessThan(above.h);
    // at the saturated-vapour enthalpy within cp·1 mK (IAPWS-IF97 region 2 at the line, shared/steam)
    expect(Math.abs(propsPT(p, Ts, 'vapour').h - px(p, 1).h)).toBeLessThan(10);
  });
  test('liquid above saturation likewise; inside the declared side it is plain IF97', () => {
    const p = 1e6;
    const Ts = tsat(p);
    expect(propsPT(p, Ts + 3, 'liquid').wrongSide).toBe(true);
    expect(propsPT(p, 400, 'liquid').h).toBe(pt(p, 400).h);
  });
  test('out of range: clamped and flagged, never NaN or a throw', () => {
    for (const [p, T] of [
      [-5, 300],
      [1e9, 300],
      [1e5, 10],
      [1e5, 5000],
      [Number.NaN, 300],
    ]) {
      const r = propsPT(p, T, 'any');
      expect(Number.isFinite(r.h)).toBe(true);
      expect(r.clamped).toBe(true);
    }
    expect(Number.isFinite(propsSat(1e9).hg)).toBe(true);
  });
});
