/**
 * A grid of over 1000 states over all IF97 regions, the two-phase region included, against
 * Debian's python3-iapws (iapws.IAPWS97). The fixture tests/fixtures/steam/iapws-grid.json is
 * written by scripts/fixtures/iapws-grid.py; rows where python3-iapws is known to be wrong
 * (two-phase (p,h), (p,s), (p,x) between 16.529 and 22.064 MPa; (T,x) above 623.15 K) are built
 * there by the lever rule from its refined saturated ends, as each row's `how` says.
 *
 * Tolerance: relative 1e-9 for T, v, h, s (h against at least 1 kJ/kg, s against at least
 * 1 J/(kg·K), as both pass through zero near the triple point), 1e-8 for cp and w, 1e-9 absolute
 * for the quality x. python3-iapws solves the same equations, so the two differ only by their
 * iterations' stopping rules (largest seen: 1e-10 in v beside the critical point).
 */
import fixture from '../../fixtures/steam/iapws-grid.json';
import { ph, ps, pt, px, tx } from '@/shared/steam';
import type { SteamState } from '@/shared/steam';

interface Row {
  kind: 'pt' | 'ph' | 'ps' | 'px' | 'tx';
  in: [number, number];
  ref: {
    p: number;
    T: number;
    h: number;
    s: number;
    v: number;
    region: number;
    cp?: number;
    w?: number;
    x?: number | null;
  };
  how: string;
}

const rows = fixture.rows as unknown as Row[];
const solve = { pt, ph, ps, px, tx } as const;

const REL: Record<string, number> = { T: 1e-9, v: 1e-9, h: 1e-9, s: 1e-9, cp: 1e-8, w: 1e-8 };
const FLOOR: Record<string, number> = { T: 0, v: 0, h: 1e3, s: 1, cp: 0, w: 0 };

function compare(row: Row): string[] {
  const st: SteamState = solve[row.kind](row.in[0], row.in[1]);
  const out: string[] = [];
  const tag = `${row.kind}(${row.in.join(', ')}) [${row.how}]`;
  if (st.region !== row.ref.region) out.push(`${tag}: region ${st.region}, python3-iapws ${row.ref.region}`);
  for (const k of ['T', 'v', 'h', 's', 'cp', 'w'] as const) {
    const ref = row.ref[k];
    if (ref === undefined) continue;
    const mine = st[k];
    if (mine === null) {
      out.push(`${tag}: ${k} is null`);
      continue;
    }
    const tol = REL[k] * Math.max(Math.abs(ref), FLOOR[k]);
    if (!(Math.abs(mine - ref) <= tol)) out.push(`${tag}: ${k} = ${mine}, python3-iapws ${ref}`);
  }
  if (row.ref.x !== undefined && row.ref.x !== null) {
    if (st.x === null || !(Math.abs(st.x - row.ref.x) <= 1e-9))
      out.push(`${tag}: x = ${st.x}, python3-iapws ${row.ref.x}`);
  } else if (st.x !== null) {
    out.push(`${tag}: x = ${st.x}, expected a single-phase state`);
  }
  if (row.ref.region === 4 && (st.cp !== null || st.cv !== null || st.w !== null))
    out.push(`${tag}: cp, cv, w must be null`);
  return out;
}

describe('states against python3-iapws (iapws.IAPWS97), fixture iapws-grid.json', () => {
  test('the fixture covers every region and input pair with at least 500 states', () => {
    expect(rows.length).toBeGreaterThanOrEqual(500);
    const seen = new Set(rows.map((r) => `${r.kind}/${r.ref.region}`));
    for (const k of [
      'pt/1',
      'pt/2',
      'pt/3',
      'pt/5',
      'ph/1',
      'ph/2',
      'ph/3',
      'ph/4',
      'ph/5',
      'ps/1',
      'ps/2',
      'ps/3',
      'ps/4',
      'ps/5',
      'px/4',
      'tx/4',
    ]) {
      expect(seen.has(k)).toBe(true);
    }
    // two-phase rows in the region-3 range built by the lever rule (python3-iapws fault)
    expect(
      rows.some((r) => r.kind === 'ph' && r.ref.region === 4 && r.in[0] > 16.6e6 && r.how.startsWith('lever')),
    ).toBe(true);
  });

  for (const kind of ['pt', 'ph', 'ps', 'px', 'tx'] as const) {
    const subset = rows.filter((r) => r.kind === kind);
    test(`${kind}: ${subset.length} states agree with python3-iapws (T, v, h, s to 1e-9; cp, w to 1e-8)`, () => {
      expect(subset.length).toBeGreaterThan(40);
      expect(subset.flatMap(compare)).toEqual([]);
    });
  }
});
