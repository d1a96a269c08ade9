import { analyseRound, demoUnit, cusumStep, CUSUM_START, decideEvidence, type CusumState, type InstrumentEvidence } from '../shared/cycle';
import { analysisInput, generateHistory, DEFAULT_FAULTS } from '../server/seed/history-generator';
import { signedU } from '../tests/helpers/detection';
const START = new Date('2025-09-01T00:00:00+01:00');
const clean = { drift: { ...DEFAULT_FAULTS.drift, fromDay: 1e9 }, stuck: { ...DEFAULT_FAULTS.stuck, fromDay: 1e9 }, readAsAbsolute: { ...DEFAULT_FAULTS.readAsAbsolute, fromDay: 1e9, untilDay: 1e9 }, fouling: { ...DEFAULT_FAULTS.fouling, fromDay: 1e9 } };
for (const [name, faults] of [['clean', clean], ['default', DEFAULT_FAULTS]] as const) {
  const h = generateHistory({ start: START, days: 90, seed: 1, faults });
  const prev: any[] = [];
  let states = new Map<string, CusumState>();
  const kinds: Record<string, number> = {};
  const opened = new Set<string>();
  h.shifts.forEach((s, idx) => {
    const { readings, barometricPa } = analysisInput(s);
    const a = analyseRound(demoUnit, readings, { barometricPa, previousRounds: prev.slice(-2) });
    prev.push({ readings });
    for (const f of a.findings) kinds[f.kind] = (kinds[f.kind] ?? 0) + 1;
    const ev: InstrumentEvidence[] = [];
    for (const [tag, u] of signedU(a)) { const st = cusumStep(states.get(tag) ?? CUSUM_START, u); states.set(tag, st); ev.push({ tag, u, state: st }); }
    for (const d of decideEvidence(ev, a.reconciliation.ok ? a.reconciliation.correlatedCorrections : [])) {
      const key = [...d.tags].sort().join('+');
      if (!opened.has(key)) { opened.add(key); console.log(name, 'order', key, d.reason, d.statistic.toFixed(1), 'day', s.day, 'shift', s.shift, 'idx', idx); }
    }
  });
  console.log(name, JSON.stringify(kinds));
}
