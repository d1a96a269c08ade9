/**
 * Steam tables (shared/steam): per-call time of pt, ph, ps and tsat over 1e5 mixed-region calls,
 * beside Debian's python3-iapws (iapws.IAPWS97, iapws.iapws97._TSat_P) timed on the same points
 * in the same run by a child /usr/bin/python3.
 *
 * Points: (p, T) drawn evenly from regions 1, 2, 3 and 5; (p, h) and (p, s) are those states'
 * h and s, with every fifth point replaced by a wet state (p from 1 kPa to 22 MPa, x in 0…1);
 * tsat pressures log-uniform over the saturation line. Seeded, so every run times the same points.
 *
 * python3-iapws builds a full object per call (transport properties too) and takes ~0.1–2 ms,
 * so by default it times the first STEAM_BENCH_PY_N points (2000) of each list; tsat, a plain
 * function there, runs on all points. Set STEAM_BENCH_PY_N=100000 to time python on every point.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { P_SAT_MIN, ph, ps, pt, px, regionPT, tsat } from '../shared/steam';

const N = 100_000;

function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

interface Points {
  pt: Float64Array; // p, T pairs
  ph: Float64Array; // p, h pairs
  ps: Float64Array; // p, s pairs
  tsat: Float64Array; // p
}

function makePoints(): Points {
  const rnd = mulberry32(97);
  const logU = (a: number, b: number) => Math.exp(Math.log(a) + rnd() * (Math.log(b) - Math.log(a)));
  const out: Points = {
    pt: new Float64Array(2 * N),
    ph: new Float64Array(2 * N),
    ps: new Float64Array(2 * N),
    tsat: new Float64Array(N),
  };
  // region boxes to draw from; a draw is kept when regionPT agrees
  const boxes: Record<number, [number, number, number, number]> = {
    1: [1e5, 100e6, 273.15, 623.15],
    2: [1e3, 100e6, 280, 1073.15],
    3: [16.6e6, 100e6, 623.2, 863],
    5: [1e3, 50e6, 1073.2, 2273.15],
  };
  const wanted = [1, 2, 3, 5];
  for (let i = 0; i < N; i++) {
    const region = wanted[i % 4];
    const [pLo, pHi, tLo, tHi] = boxes[region];
    let p = 0;
    let T = 0;
    for (;;) {
      p = logU(pLo, pHi);
      T = tLo + rnd() * (tHi - tLo);
      if (regionPT(p, T) === region) break;
    }
    out.pt[2 * i] = p;
    out.pt[2 * i + 1] = T;
    let st = pt(p, T);
    if (i % 5 === 4) {
      const pw = logU(1e3, 22e6);
      st = px(pw, rnd());
    }
    out.ph[2 * i] = st.p;
    out.ph[2 * i + 1] = st.h;
    out.ps[2 * i] = st.p;
    out.ps[2 * i + 1] = st.s;
    out.tsat[i] = logU(P_SAT_MIN * 1.0001, 22.06e6);
  }
  return out;
}

/** Best of `rounds` passes over all points, µs per call. */
function timeTs(fn: (i: number) => number, n: number, rounds = 5): number {
  let sink = 0;
  for (let i = 0; i < n; i++) sink += fn(i); // warm-up pass
  let best = Infinity;
  for (let r = 0; r < rounds; r++) {
    const t0 = process.hrtime.bigint();
    for (let i = 0; i < n; i++) sink += fn(i);
    best = Math.min(best, Number(process.hrtime.bigint() - t0) / 1e3 / n);
  }
  if (!Number.isFinite(sink)) throw new Error('non-finite result in the steam bench');
  return best;
}

const PY_SCRIPT = String.raw`
import json, sys, time
from iapws import IAPWS97
from iapws.iapws97 import _TSat_P
pts = json.load(open(sys.argv[1]))
n = int(sys.argv[2])
def run(name, f, pairs, limit):
    m = min(limit, len(pairs))
    errors = 0
    t0 = time.perf_counter()
    for a, b in pairs[:m]:
        try:
            f(a, b)
        except Exception:
            errors += 1
    return {'us': (time.perf_counter() - t0) / m * 1e6, 'n': m, 'errors': errors}
res = {
    'pt': run('pt', lambda p, T: IAPWS97(P=p / 1e6, T=T), pts['pt'], n),
    'ph': run('ph', lambda p, h: IAPWS97(P=p / 1e6, h=h / 1e3), pts['ph'], n),
    'ps': run('ps', lambda p, s: IAPWS97(P=p / 1e6, s=s / 1e3), pts['ps'], n),
    'tsat': run('tsat', lambda p, _: _TSat_P(p / 1e6), [(p, 0) for p in pts['tsat']], len(pts['tsat'])),
}
print(json.dumps(res))
`;

interface PyTiming {
  us: number;
  n: number;
  errors: number;
}

function timePython(points: Points, n: number): Record<string, PyTiming> | string {
  const dir = mkdtempSync(join(tmpdir(), 'steam-bench-'));
  try {
    const pairs = (a: Float64Array) => Array.from({ length: a.length / 2 }, (_, i) => [a[2 * i], a[2 * i + 1]]);
    const file = join(dir, 'points.json');
    writeFileSync(file, JSON.stringify({ pt: pairs(points.pt), ph: pairs(points.ph), ps: pairs(points.ps), tsat: Array.from(points.tsat) }));
    const r = spawnSync('/usr/bin/python3', ['-c', PY_SCRIPT, file, String(n)], { encoding: 'utf8', maxBuffer: 1 << 20 });
    if (r.status !== 0) return `python3-iapws not timed: ${(r.stderr || r.error?.message || '').trim().split('\n').pop()}`;
    return JSON.parse(r.stdout.trim().split('\n').pop() as string) as Record<string, PyTiming>;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

export async function run(): Promise<void> {
  const points = makePoints();
  const P = points;
  const ts: Record<string, number> = {
    pt: timeTs((i) => pt(P.pt[2 * i], P.pt[2 * i + 1]).h, N),
    ph: timeTs((i) => ph(P.ph[2 * i], P.ph[2 * i + 1]).T, N),
    ps: timeTs((i) => ps(P.ps[2 * i], P.ps[2 * i + 1]).T, N),
    tsat: timeTs((i) => tsat(P.tsat[i]), N),
  };
  const pyN = Number(process.env.STEAM_BENCH_PY_N ?? 2000);
  const py = timePython(points, Number.isFinite(pyN) && pyN > 0 ? Math.floor(pyN) : 2000);

  const rows = Object.keys(ts).map((name) => {
    const base = typeof py === 'string' ? undefined : py[name];
    return {
      call: name,
      'calls (TS)': N,
      'TS µs/call': Number(ts[name].toFixed(3)),
      'python3-iapws µs/call': base ? Number(base.us.toFixed(2)) : 'n/a',
      'python calls': base ? base.n : 0,
      'python errors': base ? base.errors : 0,
      'ratio python/TS': base ? Number((base.us / ts[name]).toFixed(0)) : 'n/a',
    };
  });
  console.log(`steam tables, ${N} mixed-region points per call (regions 1, 2, 3, 5; ph/ps 20 % wet); best of 5 passes`);
  console.table(rows);
  if (typeof py === 'string') console.log(py);
}
