/**
 * The T–s chart draws the saturation dome (IAPWS-IF97, shared/charts) and one mark per state
 * point, with a different shape for measured, reconciled and isentropic points.
 */
import { render, screen } from '@testing-library/react-native';
import { TsChart, type TsPoint } from '@/components/ts-chart';

const points: TsPoint[] = [
  { id: 'ms', label: 'Main steam', T: 758.15, s: 6709, kind: 'reconciled' },
  { id: 'ms-m', label: 'Main steam', T: 759.0, s: 6710, kind: 'measured' },
  { id: 'hpx-s', label: 'HP exhaust (isentropic)', T: 520, s: 6709, kind: 'isentropic' },
];

test('dome and every point are drawn', () => {
  render(<TsChart points={points} lines={[{ from: 'ms', to: 'hpx-s', dashed: true }]} width={360} height={280} />);
  expect(screen.getByTestId('ts-chart')).toBeTruthy();
  expect(screen.getByTestId('ts-dome')).toBeTruthy();
  for (const p of points) expect(screen.getByTestId(`ts-point-${p.id}`)).toBeTruthy();
});
