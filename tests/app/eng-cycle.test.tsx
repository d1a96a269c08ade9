/**
 * The engineer's figures: the isentropic end point of a turbine section on the T–s chart is
 * IAPWS-IF97 ps(p_out, s_in), checked against python3-iapws (IAPWS97(P=0.01, s=6.771192):
 * T = 318.9575 K, x = 0.81630, for 40 bar / 400 °C steam expanded to 0.1 bar); the evidence
 * sentence says a bias with its sign, in the display units (bar = 10⁵ Pa, °C = K − 273.15, SI
 * brochure); instrument health sorts worst first.
 */
import { evidenceSentence } from '@/components/work-order-evidence';
import { biasWords } from '@/components/instrument-values';
import { tsFigure, turbineSections } from '@/screens/cycle/cycle-screen';
import { worstFirst } from '@/screens/instruments/instrument-health-screen';
import type { StatePointResult } from '@/shared/cycle/types';
import type { InstrumentHealth } from '@/shared/api/analysis';

const pt = (id: string, p: number, T: number, s: number, circuit: 'cycle' | 'cooling' = 'cycle'): StatePointResult => ({
  id,
  label: id,
  expectedPhase: 'vapour',
  circuit,
  pressureSource: 'measured',
  measured: { p, T: T + 0.5, h: null, s: s + 2, x: null, m: null, phase: null },
  reconciled: { p, T, h: null, s, x: null, m: null, phase: null },
  sigmas: { p: null, T: null, h: null, x: null, m: null },
});

test('the isentropic end of a section is ps(p_out, s_in) (python3-iapws: 318.9575 K at 0.1 bar, s = 6.771192 kJ/(kg·K))', () => {
  const model = {
    equipment: [
      { id: 'hp', kind: 'turbine-section', label: 'HP', ports: { inlet: 'ms', outlet: 'x' } },
      { id: 'b', kind: 'boiler', ports: {} },
    ],
  };
  const sections = turbineSections(model);
  expect(sections).toEqual([{ id: 'hp', label: 'HP', inlet: 'ms', outlets: ['x'] }]);
  const fig = tsFigure(
    [pt('ms', 4e6, 673.15, 6771.191993865394), pt('x', 1e4, 318.96, 7400), pt('cw', 3e5, 300, 400, 'cooling')],
    sections,
  );
  const end = fig.points.find((p) => p.id === 's-hp-x')!;
  expect(end.kind).toBe('isentropic');
  expect(end.T).toBeCloseTo(318.9575482070235, 3);
  expect(end.s).toBeCloseTo(6771.19, 0);
  // measured and reconciled marks of each cycle point, none of the cooling water
  expect(fig.points.map((p) => p.id).sort()).toEqual(['m-ms', 'm-x', 'r-ms', 'r-x', 's-hp-x']);
  expect(fig.lines).toContainEqual({ from: 'r-ms', to: 's-hp-x', dashed: true });
});

test('evidence in plain words: the bias with its sign against what the balances say, ±2σ', () => {
  const s = evidenceSentence({
    tag: 'TI-214',
    reading: 504.75,
    sigma: 0.6,
    reconciled: 504.0,
    reconciledSigma: 0.3,
    estimate: 504.55,
    estimateSigma: 0.4,
    z: -5.2,
    suspect: true,
  });
  // 504.75 K − 504.55 K = 0.2 K high; 504.55 K = 231.40 °C; 2 × 0.4 K = 0.8 K
  expect(s).toBe(
    'TI-214 reads 0.2 K high: it read 231.6 °C, the balances put it at 231.4 °C ± 0.8 K (95 %) — 5.2 standard deviations off.',
  );
  expect(biasWords('pressure', -61_300)).toBe('reads 61.3 kPa low');
  expect(biasWords('temperature', 0.01)).toBe('reads true');
  expect(biasWords('temperature', null)).toBe('no estimate');
});

test('worst first: suspect, then overdue calibration, then most flags, then largest mean |z| (common practice for a health list)', () => {
  const base = {
    id: '',
    unitId: '',
    quantity: 'temperature',
    siUnit: 'K',
    gaugeUnit: '°C',
    samples30d: 90,
    biasSi30d: null,
    lastCalibration: null,
    calibrationIntervalDays: null,
    calibrationDue: null,
    openWorkOrders: [] as InstrumentHealth['openWorkOrders'],
  } as const;
  const rows = [
    { ...base, tag: 'A', status: 'ok', flags30d: 9, meanAbsZ30d: 1, calibrationOverdue: false },
    { ...base, tag: 'B', status: 'suspect', flags30d: 1, meanAbsZ30d: 0.5, calibrationOverdue: false },
    { ...base, tag: 'C', status: 'ok', flags30d: 0, meanAbsZ30d: 0.2, calibrationOverdue: true },
    { ...base, tag: 'D', status: 'ok', flags30d: 9, meanAbsZ30d: 2, calibrationOverdue: false },
  ] as unknown as InstrumentHealth[];
  expect([...rows].sort(worstFirst).map((r) => r.tag)).toEqual(['B', 'C', 'D', 'A']);
});
