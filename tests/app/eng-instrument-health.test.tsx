/**
 * The instrument page's text and trend for a vacuum gauge with strong evidence against it: the
 * status is never "in service ✓", the evidence is said with its CUSUM and threshold (Page 1954,
 * shared/cycle/evidence.ts), the bias is in the gauge's kPa with its 95 % interval to two
 * significant digits (GUM §7.2.6), calibrations say that none is recorded yet, the trend's axis is
 * "kPa vacuum" with ≥ 5 value ticks and ≥ 4 date ticks, and a year can be chosen. Values: the
 * test's own (9.0 kPa abs at 101.325 kPa barometric = 92.325 kPa vacuum).
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { fireEvent, render, screen, waitFor } from '@testing-library/react-native';
import { InstrumentScreen } from '@/screens/instruments/instrument-screen';
import type { InstrumentHealth, InstrumentHistoryResponse } from '@/shared/api/analysis';

const SITE = '6f1f7a52-3b1c-4c5e-9d7a-1a2b3c4d5e6f';
const UNIT = '1b2c3d4e-5f6a-4b7c-8d9e-0f1a2b3c4d5e';
const ID = '4e5f6a7b-8c9d-4e0f-9a1b-2c3d4e5f6a7b';
const mockRequest = jest.fn();

jest.mock('@/hooks/session', () => ({
  useSession: () => ({
    status: 'signed-in',
    user: { id: '0c9b8a7d-6e5f-4a3b-8c2d-1e0f9a8b7c6d', name: 'Rowan Pell', email: 'e@x.example', memberships: [] },
    membership: { siteId: SITE, siteName: 'Fernhallow Works', role: 'engineer' },
    request: (path: string, init?: unknown) => mockRequest(path, init),
  }),
}));

const health: InstrumentHealth = {
  id: ID,
  unitId: UNIT,
  tag: 'PI-402',
  quantity: 'pressure',
  siUnit: 'Pa',
  gaugeUnit: 'kPa',
  reference: 'vacuum',
  status: 'ok',
  flags30d: 4,
  samples30d: 60,
  meanAbsZ30d: 3.1,
  biasSi30d: 1520,
  biasUncertaintySi30d: 95,
  evidence: { cusum: 41.27, threshold: 6, direction: 'high', rounds: 60, level: 'strong', since: null },
  calibrations: { closed: 0, confirmed: 0, refuted: 0 },
  lastCalibration: '2026-06-01',
  calibrationIntervalDays: 365,
  calibrationDue: '2027-06-01',
  calibrationOverdue: false,
  openWorkOrders: [],
};

const DAY = 86_400_000;
const t0 = Date.parse('2026-11-04T06:00:00Z');
const history: InstrumentHistoryResponse = {
  instrument: {
    id: ID,
    unitId: UNIT,
    tag: 'PI-402',
    quantity: 'pressure',
    siUnit: 'Pa',
    status: 'ok',
    gaugeUnit: 'kPa',
    reference: 'vacuum',
  },
  from: '2026-11-04T00:00:00.000Z',
  to: '2026-12-04T00:00:00.000Z',
  points: Array.from({ length: 30 }, (_, n) => ({
    analysisId: `2c3d4e5f-6a7b-4c8d-9e0f-${String(n).padStart(12, '0')}`,
    roundId: `3d4e5f6a-7b8c-4d9e-8f0a-${String(n).padStart(12, '0')}`,
    readingId: null,
    measuredAt: new Date(t0 + n * DAY).toISOString(),
    reading: 9000,
    sigma: 300,
    reconciled: 9000 + 20 * n,
    reconciledSigma: 150,
    estimate: null,
    estimateSigma: null,
    z: 0.4,
    suspect: false,
    findings: [],
    barometricPa: 101_325,
  })),
  truncated: false,
};

beforeEach(() => {
  mockRequest.mockImplementation(async (path: string) => {
    if (path.includes('/history')) return history;
    if (path.endsWith('/instruments')) return { instruments: [health], asOf: '2026-12-04T06:10:00.000Z' };
    if (path.includes('detectability')) return { units: [] };
    throw new Error(`unexpected ${path}`);
  });
});
afterEach(() => mockRequest.mockReset());

test('PI-402 with strong evidence: no tick, evidence and bias in kPa, calibrations, a trend in kPa vacuum', async () => {
  const qc = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  render(
    <QueryClientProvider client={qc}>
      <InstrumentScreen tag="PI-402" />
    </QueryClientProvider>,
  );
  const status = await screen.findByTestId('instrument-status');
  expect(status).toHaveTextContent('◆ Evidence against it');
  expect(status).not.toHaveTextContent(/✓/);
  expect(screen.getByTestId('instrument-evidence')).toHaveTextContent(
    'Evidence: strong evidence it reads high: CUSUM 41.3, alarm at 6, over 60 rounds since its first analysed round.',
  );
  // 1520 Pa = 1.52 kPa; U = 2 × 95 Pa = 0.19 kPa (two significant digits, GUM §7.2.6)
  expect(screen.getByTestId('instrument-summary')).toHaveTextContent(
    'Over 30 days: 4 flags in 60 analysed rounds; reads 1.52 kPa high (± 0.19 kPa, 95 %); mean |z| 3.10.',
  );
  expect(screen.getByTestId('instrument-calibrations')).toHaveTextContent(
    'Calibrations: no calibration record yet: nothing has confirmed or refuted the evidence.',
  );
  expect(screen.getByTestId('instrument-range-365')).toBeTruthy();
  fireEvent.press(screen.getByTestId('instrument-range-365'));
  await waitFor(() => expect(mockRequest.mock.calls.some(([p]) => /from=2025-12-0\d/.test(p as string))).toBe(true));
  // the trend is laid out once its width is known
  fireEvent(await screen.findByTestId('instrument-trend'), 'layout', {
    nativeEvent: { layout: { width: 340, height: 280 } },
  });
  const chart = await screen.findByTestId('trend-chart');
  expect(chart.props.accessibilityLabel).toBe('Trend of readings in kPa vacuum against reconciled values');
  expect(screen.getAllByTestId('trend-chart-value-tick').length).toBeGreaterThanOrEqual(5);
  expect(screen.getAllByTestId('trend-chart-date-tick').length).toBeGreaterThanOrEqual(4);
});
