/**
 * The Fernhallow Works demo unit at its design point: the design values close every balance,
 * agree with an independent IF97 implementation (python3-iapws), and give no finding.
 */
import { analyseRound } from '@/shared/cycle';
import { demoDesignPoint, demoDesignReadings, demoUnit, DESIGN_PARAMETERS } from '@/demo/unit';
import { pt, ps, px, tsat } from '@/shared/steam';
import { python } from './helpers';

const dp = demoDesignPoint();
const B = 101325;

describe('demo unit: shape', () => {
  test('about forty instruments, with twins, pressure gauges in bar(g), a vacuum gauge in kPa, a generator MW, levels', () => {
    const ins = demoUnit.instruments;
    expect(ins.length).toBeGreaterThanOrEqual(38);
    expect(ins.length).toBeLessThanOrEqual(45);
    const twins = ins.filter((i) => i.twin).map((i) => [i.tag, i.twin!].sort().join('/'));
    expect(new Set(twins)).toEqual(
      new Set(['TI-102A/TI-102B', 'PI-301/PI-302', 'PI-401/PI-402', 'TI-403A/TI-403B', 'JI-601/JI-602']),
    );
    expect(
      ins.filter((i) => i.quantity === 'pressure' && i.pressureReference === 'gauge' && i.unit === 'bar').length,
    ).toBeGreaterThanOrEqual(8);
    expect(ins.find((i) => i.tag === 'PI-401')).toMatchObject({ pressureReference: 'vacuum', unit: 'kPa' });
    expect(ins.filter((i) => i.quantity === 'power').every((i) => i.unit === 'MW')).toBe(true);
    expect(ins.some((i) => i.quantity === 'level' && i.equipment === 'drum')).toBe(true);
    const kinds = new Set(demoUnit.equipment.map((e) => e.kind));
    for (const k of [
      'boiler',
      'drum',
      'superheater',
      'turbine-section',
      'splitter',
      'throttle',
      'condenser',
      'closed-heater',
      'deaerator',
      'pump',
      'generator',
    ]) {
      expect(kinds.has(k as never)).toBe(true);
    }
  });

  test('design readings show on each face what the gauge would show (gauge = absolute − barometric, vacuum = barometric − absolute)', () => {
    const r = demoDesignReadings(B);
    const byTag = new Map(r.map((x) => [x.instrumentTag, x]));
    expect(byTag.get('PI-101')!.shown).toEqual({
      value: expect.closeTo((6.8e6 - B) / 1e5, 10),
      unit: 'bar',
      reference: 'gauge',
    });
    expect(byTag.get('PI-401')!.shown.value).toBeCloseTo((B - 9e3) / 1e3, 10);
    expect(byTag.get('PI-402')!.shown.value).toBeCloseTo(9, 10);
    expect(byTag.get('TI-102A')!.shown.value).toBeCloseTo(485, 10);
    expect(byTag.get('FI-101')!.shown.value).toBeCloseTo(30 * 3.6, 10);
    expect(byTag.get('JI-601')!.shown.value).toBeCloseTo(dp.power / 1e6, 10);
    // every reading lies inside its instrument's scale (own reference)
    for (const i of demoUnit.instruments) {
      const v = byTag.get(i.tag)!.valueSI;
      const own =
        i.quantity !== 'pressure'
          ? v
          : i.pressureReference === 'gauge'
            ? v - B
            : i.pressureReference === 'vacuum'
              ? B - v
              : v;
      expect(own).toBeGreaterThanOrEqual(i.range.min);
      expect(own).toBeLessThanOrEqual(i.range.max);
    }
  });
});

describe('demo unit: design values are consistent (IF97, shared/steam)', () => {
  test('chosen values are kept: efficiencies, TTD and DCA recomputed by hand from the states', () => {
    const P = dp.points;
    const d = DESIGN_PARAMETERS;
    // η = (h_in − h_out)/(h_in − h_out,s), textbook definition
    const eta = (a: string, b: string) => (P[a].h - P[b].h) / (P[a].h - ps(P[b].p, P[a].s).h);
    expect(eta('ms', 'hpx')).toBeCloseTo(d.hpEfficiency, 9);
    expect(eta('lpi', 'lpe')).toBeCloseTo(d.lpEfficiency1, 9);
    expect(eta('lpe', 'lpx')).toBeCloseTo(d.lpEfficiency2, 9);
    expect(tsat(P.lpe.p) - P.lhf.T).toBeCloseTo(d.heaterTTD, 9);
    expect(P.lhd.T - P.cpo.T).toBeCloseTo(d.heaterDCA, 9);
    expect(P.dao.h).toBeCloseTo(px(d.deaeratorP, 0).h, 6);
    expect(P.ms.h).toBeCloseTo(pt(d.mainSteamP, d.mainSteamT).h, 6);
  });

  test('every balance closes at design, residual < 0.1 % (measured and reconciled)', () => {
    const a = analyseRound(demoUnit, demoDesignReadings(B), { barometricPa: B });
    let rows = 0;
    for (const e of a.balances) {
      for (const r of e.rows) {
        for (const v of [r.measured, r.reconciled]) {
          expect(v).not.toBeNull();
          rows++;
          if (v!.relative !== null) expect(Math.abs(v!.relative)).toBeLessThan(1e-3);
        }
      }
    }
    expect(rows).toBeGreaterThanOrEqual(2 * 15);
    // and the hand-written balances of the design point itself
    const P = dp.points;
    const rel = (x: number, y: number) => Math.abs(x - y) / Math.max(Math.abs(x), Math.abs(y));
    expect(rel(P.lpe.m * (P.lpe.h - P.lhd.h), P.cpo.m * (P.lhf.h - P.cpo.h))).toBeLessThan(1e-12); // LP heater
    expect(rel(P.das2.m * P.das2.h + P.lhf.m * P.lhf.h + P.mu.m * P.mu.h, P.dao.m * P.dao.h)).toBeLessThan(1e-12); // deaerator
    expect(rel(P.lpx.m * P.lpx.h + P.lhd.m * P.lhd.h - P.hw.m * P.hw.h, P.cwi.m * (P.cwo.h - P.cwi.h))).toBeLessThan(
      1e-12,
    ); // condenser
    const shaft = P.ms.m * (P.ms.h - P.hpx.h) + P.lpi.m * P.lpi.h - P.lpe.m * P.lpe.h - P.lpx.m * P.lpx.h;
    expect(rel(DESIGN_PARAMETERS.generatorEfficiency * shaft, dp.power)).toBeLessThan(1e-12); // generator
    expect(rel(P.proc.m + P.das.m + P.lpi.m, P.hpx.m)).toBeLessThan(1e-12); // header
  });

  test('design enthalpies agree with python3-iapws (independent IAPWS-IF97 implementation) to 1e-7', () => {
    const P = dp.points;
    const ids = Object.keys(P);
    const req = ids.map((id) => {
      const s = P[id];
      const two = s.x !== null && s.x > 0 && s.x < 1;
      const sat = s.x === 0 || s.x === 1;
      return { id, P: s.p / 1e6, T: s.T, x: two || sat ? s.x : null };
    });
    const res = python<Record<string, { h: number; s: number; T: number }>>(
      `import json\nfrom iapws import IAPWS97\nreq=json.loads(${JSON.stringify(JSON.stringify(req))})\nout={}\nfor r in req:\n  st = IAPWS97(P=r['P'], x=r['x']) if r['x'] is not None else IAPWS97(P=r['P'], T=r['T'])\n  out[r['id']]={'h':st.h*1e3,'s':st.s*1e3,'T':st.T}\nprint(json.dumps(out))`,
    );
    for (const id of ids) {
      expect(Math.abs(P[id].h - res[id].h) / Math.abs(res[id].h)).toBeLessThan(1e-7);
      expect(Math.abs(P[id].s - res[id].s)).toBeLessThan(1e-4 * Math.abs(res[id].s) + 1e-6);
      expect(Math.abs(P[id].T - res[id].T)).toBeLessThan(1e-5);
    }
    // and the analysis's own reconciled state points (h from IF97 of the readings)
    const a = analyseRound(demoUnit, demoDesignReadings(B), { barometricPa: B });
    for (const sp of a.statePoints) {
      expect(sp.reconciled.h).not.toBeNull();
      expect(Math.abs(sp.reconciled.h! - res[sp.id].h) / Math.abs(res[sp.id].h)).toBeLessThan(1e-7);
    }
  });
});

describe('demo unit at design: no findings', () => {
  test.each([95000, 101325, 103000])('barometric %d Pa: no finding, χ² ≈ 0, the test passes', (b) => {
    const a = analyseRound(demoUnit, demoDesignReadings(b), { barometricPa: b });
    expect(a.findings).toEqual([]);
    expect(a.reconciliation.ok).toBe(true);
    if (!a.reconciliation.ok) return;
    expect(a.reconciliation.passed).toBe(true);
    expect(a.reconciliation.chiSquare).toBeLessThan(1e-12);
    expect(a.reconciliation.dof).toBeGreaterThanOrEqual(10);
    expect(a.modelVersion).toBe(demoUnit.version);
  });
});
