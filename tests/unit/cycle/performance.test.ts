/**
 * Performance figures of the demo unit at design against a hand calculation from the steam
 * tables with the textbook definitions, and against python3-iapws (an independent IF97):
 *   η_section = (h_in − h_out)/(h_in − h_out,s)        turbine stage group
 *   η_pump    = (h_out,s − h_in)/(h_out − h_in)
 *   condenser TTD = Tsat(p_cond) − T_cw,out, ITD = Tsat(p_cond) − T_cw,in, duty = m_cw·Δh_cw
 *   heater TTD = Tsat(p_shell) − T_feed,out, DCA = T_drain − T_feed,in
 *   η_cycle = P_el / Q_boiler, heat rate = 3600/η kJ/kWh
 */
import { analyseRound, type PerformanceFigure } from '@/shared/cycle';
import { demoDesignPoint, demoDesignReadings, demoUnit } from '@/demo/unit';
import { ps, tsat } from '@/shared/steam';
import { python, withValue } from './helpers';

const B = 101325;
const dp = demoDesignPoint();
const P = dp.points;
const a = analyseRound(demoUnit, demoDesignReadings(B), { barometricPa: B });
const fig = (id: string): PerformanceFigure => {
  const f = a.performance.find((x) => x.id === id);
  if (!f) throw new Error(`no figure ${id}`);
  return f;
};

describe('performance at design against a hand calculation (shared/steam, textbook definitions)', () => {
  const etaT = (i: string, o: string) => (P[i].h - P[o].h) / (P[i].h - ps(P[o].p, P[i].s).h);
  const etaP = (i: string, o: string) => (ps(P[o].p, P[i].s).h - P[i].h) / (P[o].h - P[i].h);
  const boilerHeat = P.fw.m * (P.ms.h - P.fw.h);
  const eta = dp.power / boilerHeat;
  test.each([
    ['eta:hp:ms:hpx', etaT('ms', 'hpx')],
    ['eta:lp:lpi:lpe', etaT('lpi', 'lpe')],
    ['eta:lp:lpe:lpx', etaT('lpe', 'lpx')],
    ['eta:lp:lpi:lpx', etaT('lpi', 'lpx')],
    ['eta:cep', etaP('hw', 'cpo')],
    ['eta:bfp', etaP('dao', 'fw')],
    ['ttd:cond', tsat(P.lpx.p) - P.cwo.T],
    ['itd:cond', tsat(P.lpx.p) - P.cwi.T],
    ['cw-rise:cond', P.cwo.T - P.cwi.T],
    ['ttd:lph', tsat(P.lpe.p) - P.lhf.T],
    ['dca:lph', P.lhd.T - P.cpo.T],
    ['duty:lph', P.cpo.m * (P.lhf.h - P.cpo.h)],
    ['duty:cond', P.cwi.m * (P.cwo.h - P.cwi.h)],
    ['cycle:boiler-heat', boilerHeat],
    ['output:gen', dp.power],
    ['cycle:efficiency', eta],
    ['cycle:heat-rate', 3600 / eta],
    ['cycle:process-heat', P.proc.m * P.proc.h - P.mu.m * P.mu.h],
  ])('%s', (id, expected) => {
    const f = fig(id);
    expect(f.value).not.toBeNull();
    expect(Math.abs(f.value! - expected)).toBeLessThanOrEqual(1e-7 * Math.max(1, Math.abs(expected)));
  });

  test('the chosen design efficiencies and differences come back (0.80, 0.82, 0.78, 0.70, 0.75; TTD 3 K, DCA 6 K)', () => {
    expect(fig('eta:hp:ms:hpx').value).toBeCloseTo(0.8, 9);
    expect(fig('eta:lp:lpi:lpe').value).toBeCloseTo(0.82, 9);
    expect(fig('eta:lp:lpe:lpx').value).toBeCloseTo(0.78, 9);
    expect(fig('eta:cep').value).toBeCloseTo(0.7, 8);
    expect(fig('eta:bfp').value).toBeCloseTo(0.75, 8);
    expect(fig('ttd:lph').value).toBeCloseTo(3, 9);
    expect(fig('dca:lph').value).toBeCloseTo(6, 9);
    // the wet LP exhaust has no measured efficiency (its quality comes from the balances)
    expect(fig('eta:lp:lpe:lpx').measured).toBeNull();
    // the superheated HP exhaust has one, equal at design
    expect(fig('eta:hp:ms:hpx').measured).toBeCloseTo(0.8, 9);
    expect(fig('cycle:heat-rate').unit).toBe('kJ/kWh');
  });
});

describe('performance at design against python3-iapws (independent IF97 implementation)', () => {
  const ext = python<{ etaHP: number; etaLP1: number; ttdCond: number; ttdHeater: number; heatRate: number; dutyCond: number }>(
    `import json
from iapws import IAPWS97
from iapws.iapws97 import _TSat_P
ms=IAPWS97(P=6.4, T=758.15); hpx=IAPWS97(P=1.3, T=${P.hpx.T}); lpe=IAPWS97(P=0.3, T=${P.lpe.T})
hs=IAPWS97(P=1.3, s=ms.s).h; hs2=IAPWS97(P=0.3, s=hpx.s).h
fw=IAPWS97(P=7.6, T=${P.fw.T})
cwi=IAPWS97(P=0.25, T=298.15); cwo=IAPWS97(P=0.25, T=308.15)
eta=${dp.power}/(${P.fw.m}*(ms.h-fw.h)*1e3)
print(json.dumps({'etaHP':(ms.h-hpx.h)/(ms.h-hs),'etaLP1':(hpx.h-lpe.h)/(hpx.h-hs2),'ttdCond':_TSat_P(0.009)-308.15,'ttdHeater':_TSat_P(0.3)-${P.lhf.T},'heatRate':3600/eta,'dutyCond':${P.cwi.m}*(cwo.h-cwi.h)*1e3}))`,
  );
  test.each([
    ['eta:hp:ms:hpx', 'etaHP'],
    ['eta:lp:lpi:lpe', 'etaLP1'],
    ['ttd:cond', 'ttdCond'],
    ['ttd:lph', 'ttdHeater'],
    ['cycle:heat-rate', 'heatRate'],
    ['duty:cond', 'dutyCond'],
  ] as const)('%s', (id, key) => {
    const v = fig(id).value!;
    expect(Math.abs(v - ext[key])).toBeLessThanOrEqual(1e-6 * Math.max(1, Math.abs(ext[key])));
  });
});

describe('figures follow the readings', () => {
  test('a warmer cooling-water outlet (both twins +1 K) narrows the condenser TTD by 1 K in the measured figure', () => {
    let r = withValue(demoDesignReadings(B), 'TI-403A', (v) => v + 1);
    r = withValue(r, 'TI-403B', (v) => v + 1);
    const b = analyseRound(demoUnit, r, { barometricPa: B });
    const f = b.performance.find((x) => x.id === 'ttd:cond')!;
    expect(f.measured).toBeCloseTo(fig('ttd:cond').measured! - 1, 9);
    expect(b.performance.every((x) => (x.value === null || Number.isFinite(x.value)) && (x.measured === null || Number.isFinite(x.measured)))).toBe(true);
  });
});
