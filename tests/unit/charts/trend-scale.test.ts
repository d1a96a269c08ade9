/**
 * Trend axes: value ticks at a 1-2-5 step, at least five of them; date ticks at whole hours or UTC
 * days, at least four where the span allows (issue 19: the PI-402 trend had three and two). The
 * 1-2-5 series is common practice for chart axes (no standard cited).
 */
import { dateTickLabel, dateTicks, tickDecimals, valueTicks } from '../../../shared/charts/trend-scale';

const DAY = 86_400_000;

test('value ticks: ≥ 5 at a 1-2-5 step, inside the range', () => {
  expect(valueTicks(0.95, 1.05)).toEqual([0.96, 0.98, 1, 1.02, 1.04]);
  // a vacuum gauge's band, kPa: 8.7 … 9.9
  const t = valueTicks(8.7, 9.9);
  expect(t).toEqual([8.8, 9, 9.2, 9.4, 9.6, 9.8]);
  expect(tickDecimals(t)).toBe(1);
  expect(valueTicks(120, 180)).toEqual([120, 130, 140, 150, 160, 170, 180]);
  expect(tickDecimals([120, 130])).toBe(0);
  expect(valueTicks(3, 3)).toEqual([3]);
});

test('date ticks: ≥ 4 at whole days over 7, 30, 90 and 365 days; hours over one day', () => {
  const t1 = Date.parse('2026-12-04T06:00:00Z');
  for (const days of [7, 30, 90, 365]) {
    const { ticks, stepMs } = dateTicks(t1 - days * DAY, t1);
    expect(ticks.length).toBeGreaterThanOrEqual(4);
    expect(stepMs % DAY).toBe(0);
    for (const t of ticks) expect(new Date(t).toISOString().slice(11)).toBe('00:00:00.000Z');
  }
  const d = dateTicks(t1 - DAY, t1);
  expect(d.ticks.length).toBeGreaterThanOrEqual(4);
  expect(d.stepMs).toBe(6 * 3_600_000);
  expect(dateTickLabel(d.ticks[0], d.stepMs, true)).toBe('12-03 06:00');
  expect(dateTickLabel(d.ticks[1], d.stepMs, false)).toBe('12:00');
  expect(dateTickLabel(Date.parse('2026-11-30T00:00:00Z'), DAY, false)).toBe('11-30');
  // a span under four hours has only its ends
  expect(dateTicks(t1, t1 + 2 * 3_600_000).ticks).toEqual([t1, t1 + 2 * 3_600_000]);
});
