/**
 * The round check's pieces on screen: the re-take line goes to its stop, the balance line says its
 * status in a word and a shape (not colour alone, WCAG 2.1 SC 1.4.1), a dismissal needs a reason,
 * the headline counts what is left to re-take. Fed with a real check of the demo unit (design
 * point, IAPWS-IF97) with one thermometer 6 K high.
 */
import { fireEvent, render, screen, waitFor } from '@testing-library/react-native';
import { fernhallowRoutes } from '@/demo/routes';
import { RoundCheckBalanceLine } from '@/components/round-check-balance-line';
import { RoundCheckRetakeItem } from '@/components/round-check-retake-item';
import { roundCheckHeadline } from '@/components/round-check-summary';
import { RoundCheckSuspect } from '@/components/round-check-suspect';
import { demoDesignReadings, demoUnit } from '@/demo/unit';
import { checkRound, stopsOf, type CheckedRound, type RoundCheck } from '@/shared/round-check';
import { barometricFromElevation } from '@/shared/units';

const B = barometricFromElevation(112);
const design = demoDesignReadings(B);
const T0 = Date.UTC(2025, 10, 30, 7, 0);

function roundOf(key: string, start: number, change: Record<string, number> = {}): CheckedRound {
  const t = fernhallowRoutes.find((r) => r.id === key)!;
  const tags = t.stops.flatMap((s) => s.readings.map((r) => r.tag));
  return {
    id: `round-${key}`,
    routeId: key,
    routeName: t.name,
    stops: stopsOf(t),
    startedAt: start,
    finishedAt: null,
    status: 'in-progress',
    barometricPa: B,
    readings: design
      .filter((r) => tags.includes(r.instrumentTag))
      .map((r, i) => ({
        id: `${key}-${r.instrumentTag}`,
        tag: r.instrumentTag,
        valueSI: r.valueSI + (change[r.instrumentTag] ?? 0),
        time: start + i * 60_000,
        order: i,
      })),
  };
}

function check(change: Record<string, number>, dismissals: { tag: string; note: string }[] = []): RoundCheck {
  return checkRound({
    model: demoUnit,
    round: roundOf('turbine-hall', T0 + 2 * 3.6e6, change),
    others: [roundOf('boiler-house', T0), roundOf('condenser-cooling-water', T0 + 3.6e6)],
    at: T0 + 3 * 3.6e6,
    dismissals,
  });
}

const faulty = check({ 'TI-206': 6 });

test('the re-take line names the stop and the instrument, and its button goes to the stop', () => {
  const onRetake = jest.fn();
  render(<RoundCheckRetakeItem item={faulty.retakes[0]} onRetake={onRetake} />);
  expect(screen.getByTestId('retake-TI-206-line')).toHaveTextContent(
    'Stop 3, LP extraction and LP heater: TI-206 — reads about 6 K high against the LP feedwater heater and deaerator balances (or FI-202, TI-302 and PI-501: the balances cannot tell them apart)',
  );
  fireEvent.press(screen.getByTestId('retake-TI-206-go'));
  expect(onRetake).toHaveBeenCalledTimes(1);
  // tapping the line itself (phone: no selection) goes there too
  fireEvent.press(screen.getByTestId('retake-TI-206'));
  expect(onRetake).toHaveBeenCalledTimes(2);
});

test('an instrument of another round has no re-take button', () => {
  const r = check({});
  const item = { ...faulty.retakes[0], own: false, stop: null, stopName: null };
  render(<RoundCheckRetakeItem item={item} />);
  expect(screen.queryByTestId('retake-TI-206-go')).toBeNull();
  expect(r.retakes).toEqual([]);
});

test('balance lines say their status in a word and a glyph', () => {
  const open = faulty.balances.find((l) => l.equipmentId === 'da')!;
  const closes = faulty.balances.find((l) => l.equipmentId === 'gen')!;
  render(
    <>
      <RoundCheckBalanceLine line={open} />
      <RoundCheckBalanceLine line={closes} />
    </>,
  );
  expect(screen.getByTestId('balance-da-status')).toHaveTextContent('✗ Does not close');
  expect(screen.getByTestId('balance-gen-status')).toHaveTextContent('✓ Closes');
  expect(screen.getByTestId('balance-gen')).toHaveTextContent(
    /Generator: the turbine work matches the generator output/,
  );
});

test('a dismissal needs a reason; a quick reason dismisses in one tap', async () => {
  const onDismiss = jest.fn(async () => null);
  render(<RoundCheckSuspect item={faulty.retakes[0]} suspect={faulty.suspects[0]} onDismiss={onDismiss} />);
  expect(screen.getByTestId('suspect-TI-206-estimate')).toHaveTextContent(/^130\.\d °C ± \d\.\d K$/);
  fireEvent.press(screen.getByTestId('suspect-TI-206-dismiss'));
  await waitFor(() =>
    expect(screen.getByTestId('suspect-TI-206-reason-error')).toHaveTextContent('Say why the flag is dismissed.'),
  );
  expect(onDismiss).not.toHaveBeenCalled();
  fireEvent.press(screen.getByTestId('suspect-TI-206-reason-0'));
  await waitFor(() => expect(onDismiss).toHaveBeenCalledWith('Re-read: the gauge really shows this'));
});

test('the headline counts what is left to re-take, and says when the round holds together', () => {
  expect(roundCheckHeadline(faulty)).toEqual({
    text: 'One reading to re-take before you leave the unit: TI-206.',
    tone: 'danger',
  });
  expect(roundCheckHeadline(check({}))).toEqual({
    text: 'The round holds together: every balance closes and no reading stands out.',
    tone: 'ok',
  });
  const dismissed = check({ 'TI-206': 6 }, [{ tag: 'TI-206', note: 'Known to read high' }]);
  expect(roundCheckHeadline(dismissed).tone).toBe('warning');
});
