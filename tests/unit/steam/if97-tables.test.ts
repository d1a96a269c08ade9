/**
 * The computer-program verification tables of IAPWS R7-97(2012) ("Revised Release on the IAPWS
 * Industrial Formulation 1997 for the Thermodynamic Properties of Water and Steam").
 *
 * Values as published in the release's Tables 5, 7, 9, 15, 24, 29, 33, 35, 36, 42 and the B23
 * and B2bc checks, typed from the release (from memory of it). Each typed value is also held
 * against python3-iapws's value at the same point (fixture `tables`, written by
 * scripts/fixtures/iapws-grid.py), so a mistyped digit fails twice.
 */
import fixture from '../../fixtures/steam/iapws-grid.json';
import { b23P, b23T, psat, pt, tsat } from '@/shared/steam';
import { region1TPh, region1TPs } from '@/shared/steam/region1';
import { b2bcH, b2bcP, region2SubregionPh, region2SubregionPs, region2TPh, region2TPs } from '@/shared/steam/region2';
import { region3State } from '@/shared/steam/state';
import type { SteamState } from '@/shared/steam';
import { mismatch } from './published';

const tables = fixture.tables as unknown as Record<string, unknown>;
const MPa = 1e6;
const kJ = 1e3;

type Props = 'v' | 'h' | 'u' | 's' | 'cp' | 'w';
/** published rows: v in m³/kg, h and u in kJ/kg, s and cp in kJ/(kg·K), w in m/s */
type PublishedColumn = Record<Props, string>;

const SCALE: Record<Props, number> = { v: 1, h: kJ, u: kJ, s: kJ, cp: kJ, w: 1 };

/** Checks one column of a forward-equation table against a computed state and against python3-iapws. */
function checkColumn(label: string, st: SteamState, col: PublishedColumn, py: Record<Props, number>): string[] {
  const out: string[] = [];
  for (const k of Object.keys(col) as Props[]) {
    const mine = k === 'cp' ? (st.cp as number) : (st[k] as number);
    const a = mismatch(`${label} ${k}`, mine / SCALE[k], col[k]);
    const b = mismatch(`${label} ${k} (python3-iapws)`, py[k] / SCALE[k], col[k]);
    if (a) out.push(a);
    if (b) out.push(b);
  }
  return out;
}

describe('IAPWS-IF97 verification tables (IAPWS R7-97(2012))', () => {
  test('IF97 Table 5: region 1, Eq. (7), at (300 K, 3 MPa), (300 K, 80 MPa), (500 K, 3 MPa)', () => {
    const points: [number, number][] = [
      [300, 3],
      [300, 80],
      [500, 3],
    ];
    const published: PublishedColumn[] = [
      {
        v: '0.100215168e-2',
        h: '0.115331273e3',
        u: '0.112324818e3',
        s: '0.392294792',
        cp: '0.417301218e1',
        w: '0.150773921e4',
      },
      {
        v: '0.971180894e-3',
        h: '0.184142828e3',
        u: '0.106448356e3',
        s: '0.368563852',
        cp: '0.401008987e1',
        w: '0.163469054e4',
      },
      {
        v: '0.120241800e-2',
        h: '0.975542239e3',
        u: '0.971934985e3',
        s: '0.258041912e1',
        cp: '0.465580682e1',
        w: '0.124071337e4',
      },
    ];
    const py = tables['IF97 Table 5'] as Record<Props, number>[];
    const errors = points.flatMap(([T, p], i) => {
      const st = pt(p * MPa, T);
      expect(st.region).toBe(1);
      return checkColumn(`T=${T} p=${p}`, st, published[i], py[i]);
    });
    expect(errors).toEqual([]);
  });

  test('IF97 Table 7: region 1 backward T(p,h), Eq. (11)', () => {
    const rows: [number, number, string][] = [
      [3, 500, '0.391798509e3'],
      [80, 500, '0.378108626e3'],
      [80, 1500, '0.611041229e3'],
    ];
    const py = tables['IF97 Table 7'] as number[];
    const errors = rows.flatMap(([p, h, T], i) => [
      mismatch(`p=${p} h=${h}`, region1TPh(p * MPa, h * kJ), T),
      mismatch(`p=${p} h=${h} (python3-iapws)`, py[i], T),
    ]);
    expect(errors.filter(Boolean)).toEqual([]);
  });

  test('IF97 Table 9: region 1 backward T(p,s), Eq. (13)', () => {
    const rows: [number, number, string][] = [
      [3, 0.5, '0.307842258e3'],
      [80, 0.5, '0.309979785e3'],
      [80, 3, '0.565899909e3'],
    ];
    const py = tables['IF97 Table 9'] as number[];
    const errors = rows.flatMap(([p, s, T], i) => [
      mismatch(`p=${p} s=${s}`, region1TPs(p * MPa, s * kJ), T),
      mismatch(`p=${p} s=${s} (python3-iapws)`, py[i], T),
    ]);
    expect(errors.filter(Boolean)).toEqual([]);
  });

  test('IF97 Table 15: region 2, Eqs. (15)-(17), at (300 K, 0.0035 MPa), (700 K, 0.0035 MPa), (700 K, 30 MPa)', () => {
    const points: [number, number][] = [
      [300, 0.0035],
      [700, 0.0035],
      [700, 30],
    ];
    const published: PublishedColumn[] = [
      {
        v: '0.394913866e2',
        h: '0.254991145e4',
        u: '0.241169160e4',
        s: '0.852238967e1',
        cp: '0.191300162e1',
        w: '0.427920172e3',
      },
      {
        v: '0.923015898e2',
        h: '0.333568375e4',
        u: '0.301262819e4',
        s: '0.101749996e2',
        cp: '0.208141274e1',
        w: '0.644289068e3',
      },
      {
        v: '0.542946619e-2',
        h: '0.263149474e4',
        u: '0.246861076e4',
        s: '0.517540298e1',
        cp: '0.103505092e2',
        w: '0.480386523e3',
      },
    ];
    const py = tables['IF97 Table 15'] as Record<Props, number>[];
    const errors = points.flatMap(([T, p], i) => {
      const st = pt(p * MPa, T);
      expect(st.region).toBe(2);
      return checkColumn(`T=${T} p=${p}`, st, published[i], py[i]);
    });
    expect(errors).toEqual([]);
  });

  test('IF97 Table 24: region 2 backward T(p,h), Eqs. (22)-(24), subregions 2a, 2b, 2c', () => {
    const rows: [number, number, 'a' | 'b' | 'c', string][] = [
      [0.001, 3000, 'a', '0.534433241e3'],
      [3, 3000, 'a', '0.575373370e3'],
      [3, 4000, 'a', '0.101077577e4'],
      [5, 3500, 'b', '0.801299102e3'],
      [5, 4000, 'b', '0.101531583e4'],
      [25, 3500, 'b', '0.875279054e3'],
      [40, 2700, 'c', '0.743056411e3'],
      [60, 2700, 'c', '0.791137067e3'],
      [60, 3200, 'c', '0.882756860e3'],
    ];
    const py = tables['IF97 Table 24'] as number[];
    const errors = rows.flatMap(([p, h, sub, T], i) => {
      expect(region2SubregionPh(p * MPa, h * kJ)).toBe(sub);
      return [
        mismatch(`p=${p} h=${h}`, region2TPh(p * MPa, h * kJ), T),
        mismatch(`p=${p} h=${h} (python3-iapws)`, py[i], T),
      ];
    });
    expect(errors.filter(Boolean)).toEqual([]);
  });

  test('IF97 Table 29: region 2 backward T(p,s), Eqs. (25)-(27), subregions 2a, 2b, 2c', () => {
    const rows: [number, number, 'a' | 'b' | 'c', string][] = [
      [0.1, 7.5, 'a', '0.399517097e3'],
      [0.1, 8, 'a', '0.514127081e3'],
      [2.5, 8, 'a', '0.103984917e4'],
      [8, 6, 'b', '0.600484040e3'],
      [8, 7.5, 'b', '0.106495556e4'],
      [90, 6, 'b', '0.103801126e4'],
      [20, 5.75, 'c', '0.697992849e3'],
      [80, 5.25, 'c', '0.854011484e3'],
      [80, 5.75, 'c', '0.949017998e3'],
    ];
    const py = tables['IF97 Table 29'] as number[];
    const errors = rows.flatMap(([p, s, sub, T], i) => {
      expect(region2SubregionPs(p * MPa, s * kJ)).toBe(sub);
      return [
        mismatch(`p=${p} s=${s}`, region2TPs(p * MPa, s * kJ), T),
        mismatch(`p=${p} s=${s} (python3-iapws)`, py[i], T),
      ];
    });
    expect(errors.filter(Boolean)).toEqual([]);
  });

  test('IF97 Eqs. (20), (21): the B2bc check point h = 3516.004323 kJ/kg at p = 100 MPa', () => {
    // values as printed after Eq. (21) of the release (typed from memory)
    expect(mismatch('p(h)', b2bcP(3516.004323e3) / MPa, '0.100000000e3')).toBeNull();
    expect(mismatch('h(p)', b2bcH(100 * MPa) / kJ, '0.3516004323e4')).toBeNull();
  });

  test('IF97 Table 33: region 3, Eq. (28), at (500 kg/m³, 650 K), (200 kg/m³, 650 K), (500 kg/m³, 750 K)', () => {
    const points: [number, number][] = [
      [500, 650],
      [200, 650],
      [500, 750],
    ];
    const published: (PublishedColumn & { p: string })[] = [
      {
        p: '0.255837018e2',
        h: '0.186343019e4',
        u: '0.181226279e4',
        s: '0.405427273e1',
        cp: '0.138935717e2',
        w: '0.502005554e3',
        v: '0.2e-2',
      },
      {
        p: '0.222930643e2',
        h: '0.237512401e4',
        u: '0.226365868e4',
        s: '0.485438792e1',
        cp: '0.446579342e2',
        w: '0.383444594e3',
        v: '0.5e-2',
      },
      {
        p: '0.783095639e2',
        h: '0.225868845e4',
        u: '0.210206932e4',
        s: '0.446971906e1',
        cp: '0.634165359e1',
        w: '0.760696041e3',
        v: '0.2e-2',
      },
    ];
    const py = tables['IF97 Table 33'] as (Record<Props, number> & { p: number })[];
    const errors = points.flatMap(([rho, T], i) => {
      const st = region3State(rho, T);
      const { p, ...col } = published[i];
      const out = checkColumn(`rho=${rho} T=${T}`, st, col, py[i]);
      const a = mismatch(`rho=${rho} T=${T} p`, st.p / MPa, p);
      const b = mismatch(`rho=${rho} T=${T} p (python3-iapws)`, py[i].p / MPa, p);
      return [...out, ...[a, b].filter((e): e is string => e !== null)];
    });
    expect(errors).toEqual([]);
  });

  test('IF97 Table 35: saturation pressure, Eq. (30)', () => {
    const rows: [number, string][] = [
      [300, '0.353658941e-2'],
      [500, '0.263889776e1'],
      [600, '0.123443146e2'],
    ];
    const py = tables['IF97 Table 35'] as number[];
    const errors = rows.flatMap(([T, p], i) => [
      mismatch(`T=${T}`, psat(T) / MPa, p),
      mismatch(`T=${T} (python3-iapws)`, py[i] / MPa, p),
    ]);
    expect(errors.filter(Boolean)).toEqual([]);
  });

  test('IF97 Table 36: saturation temperature, Eq. (31)', () => {
    const rows: [number, string][] = [
      [0.1, '0.372755919e3'],
      [1, '0.453035632e3'],
      [10, '0.584149488e3'],
    ];
    const py = tables['IF97 Table 36'] as number[];
    const errors = rows.flatMap(([p, T], i) => [
      mismatch(`p=${p}`, tsat(p * MPa), T),
      mismatch(`p=${p} (python3-iapws)`, py[i], T),
    ]);
    expect(errors.filter(Boolean)).toEqual([]);
  });

  test('IF97 Table 42: region 5, Eqs. (32)-(34), at (1500 K, 0.5 MPa), (1500 K, 30 MPa), (2000 K, 30 MPa)', () => {
    const points: [number, number][] = [
      [1500, 0.5],
      [1500, 30],
      [2000, 30],
    ];
    const published: PublishedColumn[] = [
      {
        v: '0.138455090e1',
        h: '0.521976855e4',
        u: '0.452749310e4',
        s: '0.965408875e1',
        cp: '0.261609445e1',
        w: '0.917068690e3',
      },
      {
        v: '0.230761299e-1',
        h: '0.516723514e4',
        u: '0.447495124e4',
        s: '0.772970133e1',
        cp: '0.272724317e1',
        w: '0.928548002e3',
      },
      {
        v: '0.311385219e-1',
        h: '0.657122604e4',
        u: '0.563707038e4',
        s: '0.853640523e1',
        cp: '0.288569882e1',
        w: '0.106736948e4',
      },
    ];
    const py = tables['IF97 Table 42'] as Record<Props, number>[];
    const errors = points.flatMap(([T, p], i) => {
      const st = pt(p * MPa, T);
      expect(st.region).toBe(5);
      return checkColumn(`T=${T} p=${p}`, st, published[i], py[i]);
    });
    expect(errors).toEqual([]);
  });

  test('IF97 Eqs. (5), (6): the B23 check point T = 623.15 K, p = 16.5291643 MPa', () => {
    // values as printed after Eq. (6) of the release (typed from memory)
    const py = tables['IF97 B23'] as number[];
    const errors = [
      mismatch('p_B23(623.15 K)', b23P(623.15) / MPa, '0.165291643e2'),
      mismatch('T_B23(16.5291643 MPa)', b23T(16.5291643 * MPa), '0.623150000e3'),
      mismatch('p_B23 (python3-iapws)', py[0] / MPa, '0.165291643e2'),
      mismatch('T_B23 (python3-iapws)', py[1], '0.623150000e3'),
    ];
    expect(errors.filter(Boolean)).toEqual([]);
    // Eq. (6) is the inverse of Eq. (5) (common practice: check the pair closes)
    for (const T of [623.15, 700, 800, 863.15]) expect(b23T(b23P(T)) / T - 1).toBeCloseTo(0, 12);
  });
});
