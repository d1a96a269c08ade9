/**
 * The engineer's figures: the isentropic end point of a turbine section on the T–s chart is
 * IAPWS-IF97 ps(p_out, s_in), checked against python3-iapws (IAPWS97(P=0.01, s=6.771192):
 * T = 318.9575 K, x = 0.81630, for 40 bar / 400 °C steam expanded to 0.1 bar); the evidence
 * sentence says a bias with its sign, in the display units (bar = 10⁵ Pa, °C = K − 273.15, SI
 * brochure); instrument health is ordered by the evidence since calibration and never shows a tick
 * beside strong evidence.
 */
import { evidenceSentence } from '@/components/work-order-evidence';
import { biasWords } from '@/components/instrument-values';
import { tsFigure, turbineSections } from '@/screens/cycle/cycle-screen';
import { render, screen } from '@testing-library/react-native';
import { HealthStatusMark } from '@/components/instrument-values';
import { calibrationSummary } from '@/screens/instruments/instrument-health-screen';
import type { StatePointResult } from '@/shared/cycle/types';
import { byEvidence, type InstrumentHealth } from '@/shared/api/analysis';

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
  expect(biasWords('temperature', 0.01)).toBe('no evidence of a bias');
  expect(biasWords('temperature', null)).toBe('no estimate');
});

const ev = (cusum: number, level: InstrumentHealth['evidence']['level']): InstrumentHealth['evidence'] => ({
  cusum,
  threshold: 6,
  direction: cusum > 0 ? 'high' : null,
  rounds: 40,
  level,
  since: null,
});

test('one order by evidence: the CUSUM since calibration, strongest first; untested ranks at h/4 (project rule)', () => {
  const base = { unitId: 'u', status: 'ok', calibrations: { closed: 0, confirmed: 0, refuted: 0 } };
  const rows = [
    { ...base, tag: 'A', evidence: ev(0.4, 'none') },
    { ...base, tag: 'B', status: 'suspect', evidence: ev(2, 'none') },
    { ...base, tag: 'C', evidence: ev(11.2, 'strong') },
    { ...base, tag: 'D', evidence: ev(0, 'untested') },
    { ...base, tag: 'E', evidence: ev(3.5, 'some') },
  ] as unknown as InstrumentHealth[];
  // the recorded status does not reorder: B (suspect, weak evidence) sits where its evidence puts it
  expect([...rows].sort(byEvidence).map((r) => r.tag)).toEqual(['C', 'E', 'B', 'D', 'A']);
  expect(calibrationSummary(rows)).toBe(
    'Calibrations: no calibration record yet: nothing has confirmed or refuted the evidence.',
  );
});

test('status beside strong evidence is never "in service ✓"', () => {
  render(<HealthStatusMark status="ok" evidence={ev(9.3, 'strong')} testID="s1" />);
  expect(screen.getByTestId('s1')).toHaveTextContent('◆ Evidence against it');
  render(<HealthStatusMark status="ok" evidence={ev(0.3, 'none')} testID="s2" />);
  expect(screen.getByTestId('s2')).toHaveTextContent('✓ In service, no evidence against it');
  render(<HealthStatusMark status="ok" evidence={ev(0, 'untested')} testID="s3" />);
  expect(screen.getByTestId('s3')).toHaveTextContent('● In service, not tested since calibration');
});
