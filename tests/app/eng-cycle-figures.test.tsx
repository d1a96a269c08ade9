/**
 * The cycle page's performance table: each balanced figure with its 95 % interval (GUM law of
 * propagation, JCGM 100:2008, shared/cycle/figure-uncertainty.ts), and a figure the instruments
 * cannot determine shown in those words with the readings that carry its variance. Fed with a
 * real analysis of the demo unit at design (IAPWS-IF97), not with made-up figures.
 */
import { render, screen, within } from '@testing-library/react-native';
import { figureIntervalWords, NOT_DETERMINABLE, PerformanceTable } from '@/screens/cycle/cycle-screen';
import { analyseRound } from '@/shared/cycle';
import { demoDesignReadings, demoUnit } from '@/demo/unit';

const B = 101325;
const a = analyseRound(demoUnit, demoDesignReadings(B), { barometricPa: B });
const fig = (id: string) => a.performance.find((f) => f.id === id)!;

test('the cycle efficiency shows its value and its 95 % interval', () => {
  render(<PerformanceTable figures={a.performance} />);
  const eff = fig('cycle:efficiency');
  const lo = ((eff.value! - eff.uncertainty!.U) * 100).toFixed(1);
  const hi = ((eff.value! + eff.uncertainty!.U) * 100).toFixed(1);
  expect(screen.getByTestId('cycle-figure-cycle:efficiency-value')).toHaveTextContent(
    `${(eff.value! * 100).toFixed(1)} %`,
  );
  expect(screen.getByTestId('cycle-figure-cycle:efficiency-interval')).toHaveTextContent(`${lo} % to ${hi} %`);
  // 26.5 % ± 0.15 points at design: the interval is narrow
  expect(Number(hi) - Number(lo)).toBeLessThan(0.5);
});

test('the condensate pump efficiency (a 0.1 K rise between two plant thermometers) says not determinable, and why (TI-205 and TI-401 read the rise, PI-402 the hotwell’s saturation)', () => {
  render(<PerformanceTable figures={a.performance} />);
  expect(screen.getByTestId('cycle-figure-eta:cep-value')).toHaveTextContent(NOT_DETERMINABLE);
  const why = screen.getByTestId('cycle-figure-eta:cep-interval');
  expect(why).toHaveTextContent(
    /TI-205, TI-401 and PI-402 carry \d+ % of its variance; their σ would have to be \d+\.\d times smaller/,
  );
  expect(figureIntervalWords(fig('eta:cep'))).toMatch(/^±\d+\.\d %: TI-205/);
  // the as-read 70.0 % is not shown as a fact either
  const row = screen.getByTestId('cycle-figure-eta:cep');
  expect(within(row).queryByText('70.0 %')).toBeNull();
});

test('a figure the model fixes (the hotwell is taken as saturated: no subcooling) says so instead of a zero-width interval', () => {
  expect(fig('subcooling:cond').uncertainty!.U).toBe(0);
  expect(figureIntervalWords(fig('subcooling:cond'))).toBe('fixed by the model (no reading moves it)');
});

test('an efficiency interval that reaches past 100 % is cut there and says so (a fraction lies in 0–100 %)', () => {
  const f = {
    ...fig('eta:bfp'),
    value: 0.9,
    uncertainty: { ...fig('eta:bfp').uncertainty!, U: 0.2, determinable: true },
  };
  expect(figureIntervalWords(f)).toBe('70.0 % to 100.0 % (cut at 100 %)');
});
