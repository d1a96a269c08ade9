/**
 * Health figures in the gauge's own unit with the digits their uncertainty supports: the standard
 * (here expanded, k = 2) uncertainty to two significant digits and the estimate to the same
 * decimal place (GUM, JCGM 100:2008, §7.2.6); a bias inside its 95 % interval is "no evidence of
 * a bias" (k = 2, GUM §6.3), never "reads true". Unit factors: 1 bar = 10⁵ Pa, 1 kPa = 10³ Pa
 * (SI brochure); a temperature difference in °C equals it in K.
 */
import {
  biasInWords,
  calibrationsInWords,
  decimalsFor,
  evidenceInWords,
  fixed,
  gaugeUnitLabel,
  healthMark,
  pointInWords,
  valueInUnit,
} from '../../../lib/instrument-figures';

test('two significant digits of the uncertainty (GUM §7.2.6)', () => {
  expect(decimalsFor(0.02)).toBe(3);
  expect(decimalsFor(0.18)).toBe(2);
  expect(decimalsFor(1.234)).toBe(1);
  expect(decimalsFor(12.3)).toBe(0);
  expect(fixed(-0.0004, 3)).toBe('0.000');
});

test('a 2 Pa bias on a 16 bar gauge is no evidence, in bar, not "reads 2 Pa low"', () => {
  // u = 1 kPa = 0.01 bar, U = 0.020 bar
  expect(biasInWords('pressure', 'bar', -2, 1000)).toBe('no evidence of a bias (within ± 0.020 bar, 95 %)');
  // −0.3 bar outside ±0.020 bar
  expect(biasInWords('pressure', 'bar', -30_000, 1000)).toBe('reads 0.300 bar low (± 0.020 bar, 95 %)');
});

test('a vacuum gauge in kPa, a thermometer in °C, a level in %', () => {
  expect(biasInWords('pressure', 'kPa', -1500, 200)).toBe('reads 1.50 kPa low (± 0.40 kPa, 95 %)');
  expect(biasInWords('temperature', '°C', 0.523, 0.09)).toBe('reads 0.52 °C high (± 0.18 °C, 95 %)');
  expect(biasInWords('level', '%', 0.031, 0.004)).toBe('reads 3.10 % high (± 0.80 %, 95 %)');
  expect(biasInWords('temperature', '°C', null, null)).toBe('no estimate');
  // no uncertainty: the balances do not correct it (house rule wording)
  expect(biasInWords('massFlow', 't/h', 1e-12, 0)).toBe('bias not determinable from these instruments');
  // the latest rounds' line: 2σ = 0.306 kPa → 0.31, the values to two decimals
  expect(pointInWords('pressure', 'kPa', 'absolute', 101_325, 8740, 10_910, 153)).toBe(
    '8.74 kPa abs · balance 10.91 ± 0.31 kPa abs',
  );
});

test('values as the gauge shows them: gauge and vacuum against the round’s barometer', () => {
  // 9.0 kPa abs at 101.325 kPa barometric = 92.325 kPa vacuum; 1 700 000 Pa abs = 15.98675 bar(g)
  expect(valueInUnit('pressure', 9000, 'kPa', 'vacuum', 101_325)).toBeCloseTo(92.325, 9);
  expect(valueInUnit('pressure', 1_700_000, 'bar', 'gauge', 101_325)).toBeCloseTo(15.98675, 9);
  expect(valueInUnit('temperature', 373.15, '°C', null, null)).toBeCloseTo(100, 9);
  // a gauge reading without a barometer cannot be shown
  expect(valueInUnit('pressure', 1_700_000, 'bar', 'gauge', null)).toBeNull();
  expect(gaugeUnitLabel('bar', 'gauge')).toBe('bar(g)');
  expect(gaugeUnitLabel('kPa', 'vacuum')).toBe('kPa vacuum');
  expect(gaugeUnitLabel('°C', null)).toBe('°C');
});

test('status and evidence words: no tick beside strong evidence', () => {
  const e = {
    cusum: 9.43,
    threshold: 6,
    direction: 'high' as const,
    rounds: 23,
    level: 'strong' as const,
    since: null,
  };
  expect(healthMark('ok', e)).toEqual({ glyph: '◆', word: 'Evidence against it', level: 1 });
  expect(healthMark('suspect', e).word).toBe('Suspect');
  expect(evidenceInWords(e)).toBe(
    'strong evidence it reads high: CUSUM 9.4, alarm at 6, over 23 rounds since its first analysed round',
  );
  expect(evidenceInWords({ ...e, cusum: 0.2, level: 'none', since: '2026-10-01T00:00:00.000Z' })).toBe(
    'no evidence against it: CUSUM 0.2, alarm at 6, over 23 rounds since 2026-10-01',
  );
  expect(calibrationsInWords({ closed: 2, confirmed: 1, refuted: 1 })).toBe(
    '2 calibrations recorded: 1 found it off by more than 2σ (confirmed), 1 within 2σ (refuted)',
  );
});
