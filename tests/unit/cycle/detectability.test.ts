/**
 * Detectability (shared/cycle/detectability.ts, shared/reconcile/sensitivity.ts):
 *  - δ0 = Φ⁻¹(1 − α/2) + Φ⁻¹(1 − β) (Baarda 1968; Teunissen, "Testing theory", 2000):
 *    1.959964 + 0.841621 = 2.801585 at α = 0.05 two-sided, β = 0.2 (normal quantiles, Abramowitz &
 *    Stegun table 26.1);
 *  - MDB_i = δ0·σ_i/√r_ii on a linear network against the closed form r_ii = (ΣAᵀ(AΣAᵀ)⁻¹A)_ii
 *    (VDI 2048 part 1; tests/unit/reconcile/closed-form.ts computes it independently with plain
 *    arrays), and a Monte Carlo check that a bias of one MDB is found with probability ≈ 1 − β;
 *  - the demo unit's map at design: which instruments no balance can check, and for a reading no
 *    balance checks, a twin of its class gives r = 1/2 and MDB = δ0·σ·√2 (closed form by hand).
 */
import { analyseRound, detectabilityMap, nonCentrality } from '@/shared/cycle';
import { demoDesignReadings, demoUnit } from '@/demo/unit';
import { linear, reconcile } from '@/shared/reconcile';
import { reconciledSensitivity } from '@/shared/reconcile/sensitivity';
import { closedForm, covFromSigmas, type Mat } from '../reconcile/closed-form';
import { lcg } from './helpers';

test('δ0 at α = 0.05 (two-sided) and power 0.8 is 2.8016 (1.959964 + 0.841621)', () => {
  expect(nonCentrality(0.05, 0.2)).toBeCloseTo(1.959964 + 0.841621, 5);
});

describe('linear network: heat exchanger with bypass, six flows, four balances (Narasimhan & Jordache 1999 layout)', () => {
  const names = ['F1', 'F2', 'F3', 'F4', 'F5', 'F6'];
  const x = [101.91, 64.45, 34.65, 64.2, 36.44, 98.88];
  const s = [1.0, 0.64, 0.36, 0.64, 0.36, 1.0];
  const a: Mat = [
    [1, -1, -1, 0, 0, 0],
    [0, 1, 0, -1, 0, 0],
    [0, 0, 1, 0, -1, 0],
    [0, 0, 0, 1, 1, -1],
  ];
  const input = {
    measured: names.map((id, i) => ({ id, value: x[i], sigma: s[i] })),
    constraints: a.map((row, k) =>
      linear(`c${k}`, Object.fromEntries(row.map((c, i) => [names[i], c]).filter(([, c]) => c !== 0))),
    ),
  };
  const sens = reconciledSensitivity(input, reconcile(input), 'main');
  const ref = closedForm(a, [0, 0, 0, 0], x, covFromSigmas(s));
  const d0 = nonCentrality(0.05, 0.2);

  test.each(names.map((n, i) => [n, i] as const))('%s: r_ii and MDB = δ0·σ/√r against the closed form', (id, i) => {
    const r = ref.ve[i][i] / (s[i] * s[i]);
    expect(sens.redundancy(id)).toBeCloseTo(r, 10);
    expect(sens.minimalDetectableBias(id, d0)!).toBeCloseTo((d0 * s[i]) / Math.sqrt(r), 8);
  });

  test('the redundancy numbers sum to the degrees of freedom (4), VDI 2048 part 1', () => {
    expect(names.reduce((acc, id) => acc + sens.redundancy(id), 0)).toBeCloseTo(4, 10);
  });

  test('Monte Carlo (Park–Miller seed 6, 2000 rounds): a bias of one MDB on F3 is found by its z test at 1.96 in 80 % ± 3 % of rounds', () => {
    const rnd = lcg(6);
    const gauss = () => Math.sqrt(-2 * Math.log(rnd())) * Math.cos(2 * Math.PI * rnd());
    const mdb = sens.minimalDetectableBias('F3', d0)!;
    const truth = [100, 64, 36, 64, 36, 100];
    let hit = 0;
    const N = 2000;
    for (let k = 0; k < N; k++) {
      const xm = truth.map((t, i) => t + s[i] * gauss() + (i === 2 ? mdb : 0));
      const cf = closedForm(a, [0, 0, 0, 0], xm, covFromSigmas(s));
      if (cf.z[2] > 1.959964) hit++;
    }
    expect(hit / N).toBeGreaterThan(0.77);
    expect(hit / N).toBeLessThan(0.83);
  });
});

describe('the demo unit at design (analyseRound’s σ)', () => {
  const B = 101325;
  const a = analyseRound(demoUnit, demoDesignReadings(B), { barometricPa: B });
  const readings = a.instruments
    .filter((i) => i.reading !== null && i.sigma !== null)
    .map((i) => ({ tag: i.tag, value: i.reading!, sigma: i.sigma! }));
  const map = detectabilityMap(demoUnit, readings);
  const by = new Map(map.instruments.map((r) => [r.tag, r]));

  test('no balance can check the feedwater pressure and temperature, the LP extraction state, the LP heater drain and the levels', () => {
    const unchecked = map.instruments.filter((r) => r.status === 'unchecked').map((r) => r.tag);
    expect(unchecked.sort()).toEqual([
      'LI-101',
      'LI-201',
      'LI-301',
      'LI-401',
      'PI-103',
      'PI-203',
      'TI-103',
      'TI-204',
      'TI-207',
    ]);
    // the condensate pump discharge thermometer is held only through the 0.1 K rise across the pump: weakly
    expect(by.get('TI-205')!.status).toBe('weak');
    expect(by.get('TI-205')!.mdb!).toBeGreaterThan(10);
  });

  test('every reading of the map has its status; checked ones an MDB of δ0·σ/√r in its own unit', () => {
    expect(map.instruments.length).toBe(demoUnit.instruments.length);
    const t = by.get('TI-301')!;
    expect(t.status).toBe('checked');
    expect(t.mdb!).toBeCloseTo((map.delta0 * t.sigma!) / Math.sqrt(t.redundancy!), 10);
    // a condenser thermometer of class A: the balances notice it from well under 1 K off
    expect(by.get('TI-402')!.mdb!).toBeLessThan(1);
  });

  test('a twin of its class checks an unchecked reading: r = 1/2, MDB = δ0·σ·√2 (closed form by hand)', () => {
    const t = by.get('TI-103')!;
    expect(t.remedy).toMatchObject({ kind: 'twin', of: 'TI-103' });
    expect(t.remedy!.redundancy).toBeCloseTo(0.5, 8);
    expect(t.remedy!.mdb).toBeCloseTo(map.delta0 * t.sigma! * Math.SQRT2, 6);
  });

  test('every unchecked or weak reading other than a level has a remedy that checks it better; levels have none', () => {
    for (const r of map.instruments) {
      if (r.status !== 'unchecked' && r.status !== 'weak') expect(r.remedy).toBeNull();
      else if (r.quantity === 'level') expect(r.remedy).toBeNull();
      else {
        expect(r.remedy).not.toBeNull();
        expect(r.remedy!.redundancy).toBeGreaterThan(0);
        if (r.mdb !== null) expect(r.remedy!.mdb).toBeLessThan(r.mdb);
      }
    }
  });
});
