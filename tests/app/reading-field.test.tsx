/**
 * The reading field: what a technician types is parsed strictly (a decimal comma or stray text is
 * refused with a message, never guessed), a flagged value asks for a re-read, and confirming it
 * is one tap. Behaviour is common practice for rounds capture; messages are Trueround's own.
 */
import { fireEvent, render, screen, waitFor } from '@testing-library/react-native';
import { fieldState, parseTyped, ReadingField } from '@/components/reading-field';

test.each([
  ['12.5', 12.5],
  ['-0.92', -0.92],
  ['  40 ', 40],
  ['.5', 0.5],
  ['1e3', 1000],
])('parses %j as %p', (text, value) => {
  expect(parseTyped(text)).toEqual({ value });
});

test.each([
  ['', 'Enter the value the gauge shows, or skip it with a reason.'],
  ['12,5', 'Use a decimal point, not a comma (e.g. 12.5).'],
  ['12 bar', '"12 bar" is not a number. Enter digits only, e.g. 12.5.'],
  ['1.2.3', '"1.2.3" is not a number. Enter digits only, e.g. 12.5.'],
])('refuses %j', (text, error) => {
  expect(parseTyped(text)).toEqual({ error });
});

const base = {
  tag: 'PI-110',
  unitLabel: 'bar(g)',
  bandText: '38.0 – 42.0',
  flags: [],
  onSkip: jest.fn(),
  onConfirm: jest.fn(),
};

test('shows the tag, the unit with its reference and the expected band', () => {
  render(<ReadingField {...base} onSave={() => null} />);
  expect(screen.getByTestId('reading-PI-110-tag')).toHaveTextContent('PI-110');
  expect(screen.getByTestId('reading-PI-110-unit')).toHaveTextContent('bar(g)');
  expect(screen.getByTestId('reading-PI-110-band')).toHaveTextContent('expected 38.0 – 42.0 bar(g)');
});

test('a save that the caller refuses shows its message under the field', async () => {
  const onSave = jest.fn(async (t: string) => (t === '45' ? null : 'Use a decimal point, not a comma (e.g. 12.5).'));
  render(<ReadingField {...base} onSave={onSave} />);
  fireEvent.changeText(screen.getByTestId('reading-PI-110-input'), '4,5');
  fireEvent.press(screen.getByTestId('reading-PI-110-save'));
  await waitFor(() =>
    expect(screen.getByTestId('reading-PI-110-error')).toHaveTextContent(
      'Use a decimal point, not a comma (e.g. 12.5).',
    ),
  );
  expect(onSave).toHaveBeenCalledWith('4,5');
});

test('a flagged value asks for a re-read and offers to confirm', () => {
  const onConfirm = jest.fn();
  render(
    <ReadingField
      {...base}
      saved="45"
      onConfirm={onConfirm}
      onSave={() => null}
      flags={[
        {
          kind: 'band',
          severity: 2,
          message: 'PI-110 reads 45.00 bar(g); this round expects 38.00 bar(g) to 42.00 bar(g). Re-read the gauge.',
          evidence: {},
        },
      ]}
    />,
  );
  expect(screen.getByTestId('reading-PI-110-reread')).toHaveTextContent(/Re-read the gauge now/);
  expect(screen.getByTestId('reading-PI-110-flag-band')).toHaveTextContent(/expects 38.00 bar\(g\)/);
  fireEvent.press(screen.getByTestId('reading-PI-110-confirm'));
  expect(onConfirm).toHaveBeenCalledTimes(1);
});

test('skipping takes a reason', () => {
  const onSkip = jest.fn();
  render(<ReadingField {...base} onSkip={onSkip} onSave={() => null} />);
  fireEvent.press(screen.getByTestId('reading-PI-110-skip'));
  fireEvent.press(screen.getByTestId('reading-PI-110-skip-1'));
  expect(onSkip).toHaveBeenCalledWith('Gauge broken or unreadable');
});

test.each([
  ['', undefined, false, 'empty'],
  ['40', undefined, false, 'unsaved'],
  ['40', '40', false, 'saved'],
  ['40.0', '40', false, 'saved'],
  ['41', '40', false, 'unsaved'],
  ['', '40', false, 'unsaved'],
  ['40', '40', true, 'flagged'],
] as const)('typed %j with %j saved (flagged %p) is %p', (text, saved, flagged, state) => {
  expect(fieldState(text, saved, flagged)).toBe(state);
});

test('typed but not saved says so; saved says it is on the device', () => {
  const { rerender } = render(<ReadingField {...base} onSave={() => null} />);
  fireEvent.changeText(screen.getByTestId('reading-PI-110-input'), '40');
  expect(screen.getByTestId('reading-PI-110-state')).toHaveTextContent('Not saved yet — tap Save');
  rerender(<ReadingField {...base} saved="40" onSave={() => null} />);
  expect(screen.getByTestId('reading-PI-110-state')).toHaveTextContent('✓ Saved on this device');
});

test('the skip list closes with "Don’t skip it", and a skip can be undone to type a value', () => {
  const { rerender } = render(<ReadingField {...base} onSave={() => null} />);
  fireEvent.press(screen.getByTestId('reading-PI-110-skip'));
  expect(screen.getByTestId('reading-PI-110-skip')).toHaveTextContent('Don’t skip it');
  rerender(<ReadingField {...base} skipped="Gauge not reachable" onSave={() => null} />);
  expect(screen.queryByTestId('reading-PI-110-input')).toBeNull();
  fireEvent.press(screen.getByTestId('reading-PI-110-unskip'));
  expect(screen.getByTestId('reading-PI-110-input')).toBeTruthy();
  expect(screen.getByTestId('reading-PI-110-unskip-note')).toHaveTextContent(
    'The skip (Gauge not reachable) stays recorded until you save a value.',
  );
});

test('a finished round shows the value read-only with the reason, and no field to type in', () => {
  render(
    <ReadingField {...base} saved="40" readOnly readOnlyNote="Finished: cannot be changed." onSave={() => null} />,
  );
  expect(screen.getByTestId('reading-PI-110-value')).toHaveTextContent('40 bar(g)');
  expect(screen.getByTestId('reading-PI-110-readonly')).toHaveTextContent('Finished: cannot be changed.');
  expect(screen.queryByTestId('reading-PI-110-input')).toBeNull();
  expect(screen.queryByTestId('reading-PI-110-save')).toBeNull();
});
