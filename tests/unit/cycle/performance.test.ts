/**
 * Performance figures of the demo unit at design against the textbook definitions evaluated
 * with python3-iapws (an independent IF97), not with the project's own steam functions:
 *   η_section = (h_in − h_out)/(h_in − h_out,s)        turbine stage group
 *   η_pump    = (h_out,s − h_in)/(h_out − h_in)
 *   condenser TTD = Tsat(p_cond) − T_cw,out, ITD = Tsat(p_cond) − T_cw,in, duty = m_cw·Δh_cw
 *   heater TTD = Tsat(p_shell) − T_feed,out, DCA = T_drain − T_feed,in
 *   η_cycle = P_el / Q_boiler, heat rate = 3600/η kJ/kWh
 */
import { analyseRound, type PerformanceFigure } from '@/shared/cycle';
import { demoDesignPoint, demoDesignReadings, demoUnit } from '@/demo/unit';
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

describe('performance at design against the textbook definitions evaluated with python3-iapws (independent IF97)', () => {
  // Every expected value below is computed outside the project: Debian's python3-iapws
  // (IAPWS-IF97, J. Eng. Gas Turbines Power 122 (2000) 150) gives h, s, the isentropic end states
  // and Tsat from the design point's pressures and temperatures (saturated liquid by (p, x = 0)
  // at the hotwell and the deaerator outlet; the wet LP exhaust's enthalpy, which the balances fix,
  // is taken as designed). Only flows, the generator output and the chosen p and T come from the
  // demo design point; no function of shared/ computes an expected value.
  const pts = Object.fromEntries(
    ['ms', 'hpx', 'lpi', 'lpe', 'lpx', 'hw', 'cpo', 'dao', 'fw', 'cwi', 'cwo', 'lhf', 'lhd', 'proc', 'mu'].map((k) => [
      k,
      { p: P[k].p, T: P[k].T, h: P[k].h, m: P[k].m },
    ]),
  );
  const ext = python<Record<string, number>>(
    `import json
from iapws import IAPWS97
from iapws.iapws97 import _TSat_P
d = json.loads('''${JSON.stringify({ power: dp.power, ...pts })}''')
pt = lambda k: IAPWS97(P=d[k]['p']/1e6, T=d[k]['T'])
h = lambda st: st.h*1e3
ms, hpx, lpi, lpe, cpo, fw, cwi, cwo, lhf, proc, mu = [pt(k) for k in ['ms','hpx','lpi','lpe','cpo','fw','cwi','cwo','lhf','proc','mu']]
hw = IAPWS97(P=d['hw']['p']/1e6, x=0); dao = IAPWS97(P=d['dao']['p']/1e6, x=0)
lpx_h = d['lpx']['h']
etaT = lambda i, o_h, o_p: (h(i) - o_h)/(h(i) - IAPWS97(P=o_p/1e6, s=i.s).h*1e3)
etaP = lambda i, o: (IAPWS97(P=o.P, s=i.s).h - i.h)/(o.h - i.h)
tsat = lambda p: _TSat_P(p/1e6)
boiler = d['fw']['m']*(h(ms)-h(fw)); eta = d['power']/boiler
print(json.dumps({
 'eta:hp:ms:hpx': etaT(ms, h(hpx), d['hpx']['p']), 'eta:lp:lpi:lpe': etaT(lpi, h(lpe), d['lpe']['p']),
 'eta:lp:lpe:lpx': etaT(lpe, lpx_h, d['lpx']['p']), 'eta:lp:lpi:lpx': etaT(lpi, lpx_h, d['lpx']['p']),
 'eta:cep': etaP(hw, cpo), 'eta:bfp': etaP(dao, fw),
 'ttd:cond': tsat(d['lpx']['p']) - d['cwo']['T'], 'itd:cond': tsat(d['lpx']['p']) - d['cwi']['T'],
 'cw-rise:cond': d['cwo']['T'] - d['cwi']['T'], 'ttd:lph': tsat(d['lpe']['p']) - d['lhf']['T'],
 'dca:lph': d['lhd']['T'] - d['cpo']['T'], 'duty:lph': d['cpo']['m']*(h(lhf)-h(cpo)),
 'duty:cond': d['cwi']['m']*(h(cwo)-h(cwi)), 'cycle:boiler-heat': boiler, 'output:gen': d['power'],
 'cycle:efficiency': eta, 'cycle:heat-rate': 3600/eta,
 'cycle:process-heat': d['proc']['m']*h(proc) - d['mu']['m']*h(mu)}))`,
  );
  // Measured agreement of the two IF97 implementations here: 5e-14 relative at worst (eta:bfp);
  // the bound leaves room for a different libm, not for a different formula.
  test.each(
    [
      'eta:hp:ms:hpx',
      'eta:lp:lpi:lpe',
      'eta:lp:lpe:lpx',
      'eta:lp:lpi:lpx',
      'eta:cep',
      'eta:bfp',
      'ttd:cond',
      'itd:cond',
      'cw-rise:cond',
      'ttd:lph',
      'dca:lph',
      'duty:lph',
      'duty:cond',
      'cycle:boiler-heat',
      'output:gen',
      'cycle:efficiency',
      'cycle:heat-rate',
      'cycle:process-heat',
    ].map((id) => [id]),
  )('%s', (id) => {
    const f = fig(id);
    expect(f.value).not.toBeNull();
    expect(Math.abs(f.value! - ext[id])).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(ext[id])));
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

describe('figures follow the readings', () => {
  test('a warmer cooling-water outlet (both twins +1 K) narrows the condenser TTD by 1 K in the measured figure', () => {
    let r = withValue(demoDesignReadings(B), 'TI-403A', (v) => v + 1);
    r = withValue(r, 'TI-403B', (v) => v + 1);
    const b = analyseRound(demoUnit, r, { barometricPa: B });
    const f = b.performance.find((x) => x.id === 'ttd:cond')!;
    expect(f.measured).toBeCloseTo(fig('ttd:cond').measured! - 1, 9);
    expect(
      b.performance.every(
        (x) => (x.value === null || Number.isFinite(x.value)) && (x.measured === null || Number.isFinite(x.measured)),
      ),
    ).toBe(true);
  });
});
