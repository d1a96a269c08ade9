/**
 * The T–s chart draws the saturation dome (IAPWS-IF97, shared/charts) and one mark per state
 * point, with a different shape for measured, reconciled and isentropic points.
 */
import { render, screen } from '@testing-library/react-native';
import { TrendChart } from '@/components/trend-chart';
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

test('the trend chart shades the ±2σ band around the reconciled line', () => {
  const day = 86_400_000;
  const samples = Array.from({ length: 10 }, (_, i) => ({
    t: i * day,
    measured: 120 + i * 0.3,
    reconciled: 120,
    sigma: 0.4,
  }));
  render(<TrendChart samples={samples} unit="°C" width={360} height={200} />);
  expect(screen.getByTestId('trend-chart-band')).toBeTruthy();
  expect(screen.getByTestId('trend-chart-reconciled')).toBeTruthy();
  render(<TrendChart samples={[]} unit="°C" width={360} height={200} testID="empty" />);
  expect(screen.getByTestId('empty-empty')).toHaveTextContent('No readings in this period.');
});
