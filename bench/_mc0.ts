import { analyseRound, demoUnit, specSigmaOf } from '../shared/cycle';
import { analysisInput, generateHistory, DEFAULT_FAULTS } from '../server/seed/history-generator';
import { simulateOrders } from '../tests/helpers/detection';
const START = new Date('2025-09-01T00:00:00+01:00');
const clean = { drift: { ...DEFAULT_FAULTS.drift, fromDay: 1e9 }, stuck: { ...DEFAULT_FAULTS.stuck, fromDay: 1e9 }, readAsAbsolute: { ...DEFAULT_FAULTS.readAsAbsolute, fromDay: 1e9, untilDay: 1e9 }, fouling: { ...DEFAULT_FAULTS.fouling, fromDay: 1e9 } };
for (const seed of [1,2,3]) for (const [name, faults] of [['clean', clean], ['default', DEFAULT_FAULTS]] as const) {
  if (seed > 1 && name === 'default') continue;
  const h = generateHistory({ start: START, days: 90, seed, faults });
  const prev: any[] = [];
  const as = h.shifts.map((s) => { const { readings, barometricPa } = analysisInput(s); const a = analyseRound(demoUnit, readings, { barometricPa, previousRounds: prev.slice(-2) }); prev.push({ readings }); return a; });
  const orders = simulateOrders(as);
  const ti = demoUnit.instruments.find(i=>i.tag==='TI-301')!;
  const sT = specSigmaOf(demoUnit, ti, 101325)!;
  console.log(seed, name, JSON.stringify(orders.map(o => ({...o, day: h.shifts[o.round].day, shift: h.shifts[o.round].shift, driftSigma: (Math.max(0, 0.05*(h.shifts[o.round].t-20))/sT).toFixed(2), ttd: h.shifts[o.round].condenserTTD.toFixed(2)}))));
}
