/**
 * Verification values of the IAPWS supplementary releases for region 3:
 *  - SR3-03(2014), "Revised Supplementary Release on Backward Equations for the Functions
 *    T(p,h), v(p,h) and T(p,s), v(p,s) for Region 3": Eqs. (1)–(11);
 *  - SR5-05(2016), "Revised Supplementary Release on Backward Equations for Specific Volume as a
 *    Function of Pressure and Temperature v(p,T) for Region 3": Eqs. (1)–(5), Tables 2 and 10.
 *
 * Values as published in the releases' verification tables, typed from the releases (from
 * memory of them; the same digits appear in python3-iapws's docstrings). Each is also held
 * against python3-iapws's value at the same point (fixture `tables`).
 */
import fixture from '../../fixtures/steam/iapws-grid.json';
import { h3ab, p3satH, p3satS, region3TPh, region3TPs, region3VPh, region3VPs } from '@/shared/steam/region3';
import {
  t3ab,
  t3cd,
  t3ef,
  t3gh,
  t3ij,
  t3jk,
  t3mn,
  t3op,
  t3qu,
  t3rx,
  t3uv,
  t3wx,
  vpt3,
  vpt3Subregion,
  vpt3SubregionOf,
} from '@/shared/steam/region3-vpt';
import { pt } from '@/shared/steam';
import { mismatch } from './published';

const tables = fixture.tables as unknown as Record<string, unknown>;
const MPa = 1e6;
const kJ = 1e3;

function check(rows: [string, number, string][], py: number[], scale = 1): string[] {
  return rows
    .flatMap(([label, mine, printed], i) => [
      mismatch(label, mine / scale, printed),
      mismatch(`${label} (python3-iapws)`, py[i] / scale, printed),
    ])
    .filter((e): e is string => e !== null);
}

const PH: [number, number][] = [
  [20, 1700],
  [50, 2000],
  [100, 2100],
  [20, 2500],
  [50, 2400],
  [100, 2700],
];
const PS: [number, number][] = [
  [20, 3.8],
  [50, 3.6],
  [100, 4.0],
  [20, 5.0],
  [50, 4.5],
  [100, 5.0],
];

describe('IAPWS SR3-03(2014): region 3 backward equations of (p,h) and (p,s)', () => {
  test('SR3 Eq. (1): boundary h3ab(p) check value at 25 MPa (2095.936454 kJ/kg)', () => {
    expect(mismatch('h3ab(25 MPa)', h3ab(25 * MPa) / kJ, '0.2095936454e4')).toBeNull();
  });

  test('SR3 Eqs. (2), (3): T3a(p,h), T3b(p,h) verification table', () => {
    const printed = [
      '0.6293083892e3',
      '0.6905718338e3',
      '0.7336163014e3',
      '0.6418418053e3',
      '0.7351848618e3',
      '0.8420460876e3',
    ];
    const rows = PH.map(([p, h], i): [string, number, string] => [
      `T(${p} MPa, ${h} kJ/kg)`,
      region3TPh(p * MPa, h * kJ),
      printed[i],
    ]);
    expect(check(rows, tables['SR3 T(p,h)'] as number[])).toEqual([]);
    // the first three lie in 3a, the last three in 3b (SR3 Eq. (1))
    PH.forEach(([p, h], i) => expect(h * kJ <= h3ab(p * MPa)).toBe(i < 3));
  });

  test('SR3 Eqs. (4), (5): v3a(p,h), v3b(p,h) verification table', () => {
    const printed = [
      '0.1749903962e-2',
      '0.1908139035e-2',
      '0.1676229776e-2',
      '0.6670547043e-2',
      '0.2801244590e-2',
      '0.2404234998e-2',
    ];
    const rows = PH.map(([p, h], i): [string, number, string] => [
      `v(${p} MPa, ${h} kJ/kg)`,
      region3VPh(p * MPa, h * kJ),
      printed[i],
    ]);
    expect(check(rows, tables['SR3 v(p,h)'] as number[])).toEqual([]);
  });

  test('SR3 Eqs. (6), (7): T3a(p,s), T3b(p,s) verification table', () => {
    const printed = [
      '0.6282959869e3',
      '0.6297158726e3',
      '0.7056880237e3',
      '0.6401176443e3',
      '0.7163687517e3',
      '0.8474332825e3',
    ];
    const rows = PS.map(([p, s], i): [string, number, string] => [
      `T(${p} MPa, ${s} kJ/(kg K))`,
      region3TPs(p * MPa, s * kJ),
      printed[i],
    ]);
    expect(check(rows, tables['SR3 T(p,s)'] as number[])).toEqual([]);
  });

  test('SR3 Eqs. (8), (9): v3a(p,s), v3b(p,s) verification table', () => {
    const printed = [
      '0.1733791463e-2',
      '0.1469680170e-2',
      '0.1555893131e-2',
      '0.6262101987e-2',
      '0.2332634294e-2',
      '0.2449610757e-2',
    ];
    const rows = PS.map(([p, s], i): [string, number, string] => [
      `v(${p} MPa, ${s} kJ/(kg K))`,
      region3VPs(p * MPa, s * kJ),
      printed[i],
    ]);
    expect(check(rows, tables['SR3 v(p,s)'] as number[])).toEqual([]);
  });

  test('SR3 Eqs. (10), (11): p3sat(h) and p3sat(s) verification table', () => {
    const hRows: [string, number, string][] = [
      ['p3sat(1700 kJ/kg)', p3satH(1700 * kJ), '0.1724175718e2'],
      ['p3sat(2000 kJ/kg)', p3satH(2000 * kJ), '0.2193442957e2'],
      ['p3sat(2400 kJ/kg)', p3satH(2400 * kJ), '0.2018090839e2'],
    ];
    const sRows: [string, number, string][] = [
      ['p3sat(3.8 kJ/(kg K))', p3satS(3.8 * kJ), '0.1687755057e2'],
      ['p3sat(4.2 kJ/(kg K))', p3satS(4.2 * kJ), '0.2164451789e2'],
      ['p3sat(5.2 kJ/(kg K))', p3satS(5.2 * kJ), '0.1668968482e2'],
    ];
    expect(check(hRows, tables['SR3 psat(h)'] as number[], MPa)).toEqual([]);
    expect(check(sRows, tables['SR3 psat(s)'] as number[], MPa)).toEqual([]);
  });
});

describe('IAPWS SR5-05(2016): region 3 backward equations v(p,T)', () => {
  test('SR5 Eqs. (1)-(3): subregion boundary equations, verification values', () => {
    const py = tables['SR5 boundaries'] as Record<string, number>;
    const rows: [string, number, string, string][] = [
      ['ab', t3ab(40 * MPa), '693.0341408', 'T3ab(40 MPa)'],
      ['cd', t3cd(25 * MPa), '649.3659208', 'T3cd(25 MPa)'],
      ['ef', t3ef(40 * MPa), '713.9593992', 'T3ef(40 MPa)'],
      ['gh', t3gh(23 * MPa), '649.8873759', 'T3gh(23 MPa)'],
      ['ij', t3ij(23 * MPa), '651.5778091', 'T3ij(23 MPa)'],
      ['jk', t3jk(23 * MPa), '655.8338344', 'T3jk(23 MPa)'],
      ['mn', t3mn(22.8 * MPa), '649.6054133', 'T3mn(22.8 MPa)'],
      ['op', t3op(22.8 * MPa), '650.0106943', 'T3op(22.8 MPa)'],
      ['qu', t3qu(22 * MPa), '645.6355027', 'T3qu(22 MPa)'],
      ['rx', t3rx(22 * MPa), '648.2622754', 'T3rx(22 MPa)'],
      ['uv', t3uv(22.3 * MPa), '647.7996121', 'T3uv(22.3 MPa)'],
      ['wx', t3wx(22.3 * MPa), '648.2049480', 'T3wx(22.3 MPa)'],
    ];
    const errors = rows
      .flatMap(([key, mine, printed, label]) => [
        mismatch(label, mine, printed),
        mismatch(`${label} (python3-iapws)`, py[key], printed),
      ])
      .filter(Boolean);
    expect(errors).toEqual([]);
  });

  // subregion, p / MPa, T / K, published v / (m³/kg)
  const V_TABLE: [string, number, number, string][] = [
    ['a', 50, 630, '0.001470853100'],
    ['a', 80, 670, '0.001503831359'],
    ['b', 50, 710, '0.002204728587'],
    ['b', 80, 750, '0.001973692940'],
    ['c', 20, 630, '0.001761696406'],
    ['c', 30, 650, '0.001819560617'],
    ['d', 26, 656, '0.002245587720'],
    ['d', 30, 670, '0.002506897702'],
    ['e', 26, 661, '0.002970225962'],
    ['e', 30, 675, '0.003004627086'],
    ['f', 26, 671, '0.005019029401'],
    ['f', 30, 690, '0.004656470142'],
    ['g', 23.6, 649, '0.002163198378'],
    ['g', 24, 650, '0.002166044161'],
    ['h', 23.6, 652, '0.002651081407'],
    ['h', 24, 654, '0.002967802335'],
    ['i', 23.6, 653, '0.003273916816'],
    ['i', 24, 655, '0.003550329864'],
    ['j', 23.5, 655, '0.004545001142'],
    ['j', 24, 660, '0.005100267704'],
    ['k', 23, 660, '0.006109525997'],
    ['k', 24, 670, '0.006427325645'],
    ['l', 22.6, 646, '0.002117860851'],
    ['l', 23, 646, '0.002062374674'],
    ['m', 22.6, 648.6, '0.002533063780'],
    ['m', 22.8, 649.3, '0.002572971781'],
    ['n', 22.6, 649, '0.002923432711'],
    ['n', 22.8, 649.7, '0.002913311494'],
    ['o', 22.6, 649.1, '0.003131208996'],
    ['o', 22.8, 649.9, '0.003221160278'],
    ['p', 22.6, 649.4, '0.003715596186'],
    ['p', 22.8, 650.2, '0.003664754790'],
    ['q', 21.1, 640, '0.001970999272'],
    ['q', 21.8, 643, '0.002043919161'],
    ['r', 21.1, 644, '0.005251009921'],
    ['r', 21.8, 648, '0.005256844741'],
    ['s', 19.1, 635, '0.001932829079'],
    ['s', 20, 638, '0.001985387227'],
    ['t', 17, 626, '0.008483262001'],
    ['t', 20, 640, '0.006227528101'],
    ['u', 21.5, 644.6, '0.002268366647'],
    ['u', 22, 646.1, '0.002296350553'],
    ['v', 22.5, 648.6, '0.002832373260'],
    ['v', 22.3, 647.9, '0.002811424405'],
    ['w', 22.15, 647.5, '0.003694032281'],
    ['w', 22.3, 648.1, '0.003622226305'],
    ['x', 22.11, 648, '0.004528072649'],
    ['x', 22.3, 649, '0.004556905799'],
    ['y', 22, 646.84, '0.002698354719'],
    ['y', 22.064, 647.05, '0.002717655648'],
    ['z', 22, 646.89, '0.003798732962'],
    ['z', 22.064, 647.15, '0.003701940009'],
  ];

  test('SR5 Eqs. (4), (5): v(p,T) of all 26 subregions 3a-3z, verification table', () => {
    const py = tables['SR5 v(p,T)'] as { id: string; v: number }[];
    const errors = V_TABLE.flatMap(([id, p, T, v], i) => {
      expect(py[i].id).toBe(id);
      return [
        mismatch(`3${id} (${p} MPa, ${T} K)`, vpt3Subregion(id, p * MPa, T), v),
        mismatch(`3${id} (python3-iapws)`, py[i].v, v),
      ];
    });
    expect(errors.filter(Boolean)).toEqual([]);
  });

  test('SR5 Tables 2 and 10: subregion choice puts every verification point in its own subregion', () => {
    const wrong = V_TABLE.map(([id, p, T]) => [id, vpt3SubregionOf(p * MPa, T)]).filter(([a, b]) => a !== b);
    expect(wrong).toEqual([]);
  });

  test('SR5 starting values: Newton steps on IF97 Eq. (28) move v(p,T) by little (common practice)', () => {
    // Bounds are this implementation's own measurements with a margin (largest seen: 9e-6 in
    // 3a-3t, 8e-4 in 3u-3x, 1.5e-2 in 3y/3z within 0.05 K of the critical point), not figures
    // of the release: the check is that the backward values start Newton on the right root.
    for (const [id, p, T] of V_TABLE) {
      const refined = pt(p * MPa, T).v;
      const rel = Math.abs(vpt3(p * MPa, T) / refined - 1);
      const limit = 'abcdefghijklmnopqrst'.includes(id) ? 2e-5 : id === 'y' || id === 'z' ? 3e-2 : 2e-3;
      expect({ id, ok: rel <= limit, rel }).toEqual({ id, ok: true, rel });
    }
  });
});
