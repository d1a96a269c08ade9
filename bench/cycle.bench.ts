/**
 * The cycle engine on the Fernhallow Works demo unit (43 instruments, 18 points, 13 equipment).
 *
 *  - analyseRound per round (target ≤ 10 ms on this machine, issue 20): at design, with one gross error, and
 *    with a gauge read as absolute; baseline timed in the same process = reconcile() alone on the same
 *    round's plant equations (the share of the analysis that is reconciliation);
 *  - reconcile() on the demo unit's nonlinear problem: time and iterations, against two baselines
 *    in the same process: the IF97 work alone (every constraint's value and analytic gradient
 *    evaluated once per iteration the reconciliation took), and a linear-only reconcile() (the
 *    same readings, mass balances and twin equalities only).
 *
 * Medians of interleaved runs, so that machine load hits both sides alike.
 */
import { analyseRound, buildEquations, type AcceptedReading, type RoundReading } from '../shared/cycle';
import { demoDesignReadings, demoUnit } from '../demo/unit';
import { linear, reconcile, type Constraint } from '../shared/reconcile';
import { sigmaFor } from '../shared/uncertainty';
import { timePair } from './timing';

const B = 101325;

function plainReadings(change?: { tag: string; f: (v: number) => number }): RoundReading[] {
  return demoDesignReadings(B).map((r) => ({
    instrumentTag: r.instrumentTag,
    valueSI: change && r.instrumentTag === change.tag ? change.f(r.valueSI) : r.valueSI,
  }));
}

function accepted(readings: RoundReading[]): Map<string, AcceptedReading> {
  return new Map(
    readings.map((r) => {
      const i = demoUnit.instruments.find((x) => x.tag === r.instrumentTag)!;
      return [r.instrumentTag!, { tag: r.instrumentTag!, value: r.valueSI, sigma: sigmaFor(i.accuracy, r.valueSI) }];
    }),
  );
}

export async function run(): Promise<void> {
  const cases: { name: string; readings: RoundReading[] }[] = [
    { name: 'design round', readings: plainReadings() },
    { name: 'TI-206 6 K high (gross error)', readings: plainReadings({ tag: 'TI-206', f: (v) => v + 6 }) },
    { name: 'PI-301 read as absolute', readings: plainReadings({ tag: 'PI-301', f: (v) => v - B }) },
  ];

  const rows1: Record<string, string | number>[] = [];
  for (const c of cases) {
    const eq = buildEquations(demoUnit, accepted(c.readings));
    const input = { measured: eq.measured, unmeasured: eq.unmeasured, constraints: eq.constraints, tolerance: 1e-8 };
    const a = analyseRound(demoUnit, c.readings, { barometricPa: B });
    const t = timePair(
      () => analyseRound(demoUnit, c.readings, { barometricPa: B }),
      () => reconcile(input),
    );
    rows1.push({
      case: c.name,
      findings: a.findings.length,
      suspects: a.reconciliation.ok ? a.reconciliation.suspects.join(', ') || '—' : 'failed',
      'analyseRound ms': t.a.toFixed(2),
      'reconcile() alone ms': t.b.toFixed(2),
      ratio: (t.a / t.b).toFixed(2),
      'target 10 ms': t.a <= 10 ? 'met' : 'MISSED',
      reps: t.reps,
    });
  }
  console.log(
    'analyseRound per round (median), baseline = reconcile() alone on the same plant equations, same process',
  );
  console.table(rows1);

  const rows2: Record<string, string | number>[] = [];
  for (const c of cases.slice(0, 2)) {
    const eq = buildEquations(demoUnit, accepted(c.readings));
    const input = { measured: eq.measured, unmeasured: eq.unmeasured, constraints: eq.constraints, tolerance: 1e-8 };
    const res = reconcile(input);
    // baseline 1: the IF97 work alone — every constraint's f and grad, once per linearisation taken
    const v: Record<string, number> = {};
    for (const m of eq.measured) v[m.id] = m.value;
    for (const u of eq.unmeasured) v[u.id] = u.guess!;
    const linearisations = res.iterations * (1 + res.suspects.length) + 1;
    const if97 = () => {
      let s = 0;
      for (let k = 0; k < linearisations; k++) {
        const w = { ...v };
        for (const key of Object.keys(w)) w[key] *= 1 + 1e-9 * (k + 1); // defeat the one-entry caches
        for (const con of eq.constraints) {
          s += con.f(w);
          const g = con.grad!(w);
          for (const key in g) s += g[key];
        }
      }
      return s;
    };
    // baseline 2: linear-only reconcile (mass balances and twin equalities over the same readings)
    const linCons: Constraint[] = [];
    for (const id of Object.keys(eq.info)) {
      const ci = eq.info[id];
      if (ci.kind !== 'mass' && ci.kind !== 'twin' && ci.kind !== 'stream') continue;
      linCons.push(eq.constraints.find((x) => x.id === id)!);
    }
    const linVars = new Set(linCons.flatMap((x) => eq.info[x.id].deps));
    const linInput = {
      measured: eq.measured.filter((m) => linVars.has(m.id)),
      unmeasured: eq.unmeasured.filter((u) => linVars.has(u.id)),
      constraints: linCons.length ? linCons : [linear('none', { [eq.measured[0].id]: 0 })],
    };
    const linRes = reconcile(linInput);
    const t1 = timePair(() => reconcile(input), if97);
    const t2 = timePair(
      () => reconcile(input),
      () => reconcile(linInput),
    );
    rows2.push({
      case: c.name,
      'measured/unmeasured/constraints': `${eq.measured.length}/${eq.unmeasured.length}/${eq.constraints.length}`,
      iterations: res.iterations,
      'elimination passes': res.suspects.length,
      dof: res.dof,
      'reconcile ms': t1.a.toFixed(2),
      'IF97 work alone ms': t1.b.toFixed(3),
      'ratio to IF97': (t1.a / t1.b).toFixed(1),
      'linear-only ms': t2.b.toFixed(3),
      'linear-only iterations': linRes.iterations,
      'ratio to linear': (t2.a / t2.b).toFixed(1),
    });
  }
  console.log(
    'reconcile() on the demo unit (median); baselines in the same process: IF97 work alone (constraint values + gradients per linearisation), linear-only reconcile',
  );
  console.table(rows2);
}
