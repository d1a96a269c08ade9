/**
 * The detectability map on the engineer's screens: an instrument's page says from how large a
 * bias the balances notice it, or that no balance can check it and what would; the health
 * screen's card lists the unchecked ones with their remedy. Fed with the real map of the demo
 * unit at design (shared/cycle/detectability.ts; closed forms in tests/unit/cycle/detectability.test.ts:
 * MDB = δ0·σ/√r, a twin of its class gives δ0·σ·√2), through a jest mock of the session's request().
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { render, screen, waitFor } from '@testing-library/react-native';
import { DetectabilitySummary } from '@/components/detectability';
import { detectabilityKeys } from '@/hooks/queries/detectability';
import { InstrumentScreen } from '@/screens/instruments/instrument-screen';
import { noticeFromWords } from '@/screens/instruments/instrument-health-screen';
import type { DetectabilityResponse, UnitDetectability } from '@/shared/api/detectability';
import { analyseRound, detectabilityMap } from '@/shared/cycle';
import { demoDesignReadings, demoUnit } from '@/demo/unit';

const SITE = '6f1f7a52-3b1c-4c5e-9d7a-1a2b3c4d5e6f';
const UNIT = '1b2c3d4e-5f6a-4b7c-8d9e-0f1a2b3c4d5e';
const mockRequest = jest.fn();

jest.mock('@/hooks/session', () => ({
  useSession: () => ({
    status: 'signed-in',
    user: {
      id: '0c9b8a7d-6e5f-4a3b-8c2d-1e0f9a8b7c6d',
      name: 'Rowan Pell',
      email: 'engineer@fernhallow.example',
      memberships: [],
    },
    membership: { siteId: SITE, siteName: 'Fernhallow Works', role: 'engineer' },
    request: (path: string, init?: unknown) => mockRequest(path, init),
  }),
}));

const B = 101325;
const a = analyseRound(demoUnit, demoDesignReadings(B), { barometricPa: B });
const map = detectabilityMap(
  demoUnit,
  a.instruments
    .filter((i) => i.reading !== null && i.sigma !== null)
    .map((i) => ({ tag: i.tag, value: i.reading!, sigma: i.sigma! })),
);
const unit: UnitDetectability = {
  unitId: UNIT,
  unitName: 'Unit 1',
  analysisId: '2c3d4e5f-6a7b-4c8d-9e0f-1a2b3c4d5e6f',
  roundId: '3d4e5f6a-7b8c-4d9e-8f0a-1b2c3d4e5f6a',
  analysedAt: '2026-12-01T06:10:00.000Z',
  alpha: map.alpha,
  beta: map.beta,
  delta0: map.delta0,
  instruments: map.instruments,
};
const response: DetectabilityResponse = { units: [unit] };

function history(tag: string, quantity: string) {
  return {
    instrument: {
      id: '4e5f6a7b-8c9d-4e0f-9a1b-2c3d4e5f6a7b',
      unitId: UNIT,
      tag,
      quantity,
      siUnit: 'K',
      status: 'ok',
      gaugeUnit: '°C',
      reference: null,
    },
    from: '2026-11-01T00:00:00.000Z',
    to: '2026-12-01T00:00:00.000Z',
    points: [],
    truncated: false,
  };
}

function renderPage(tag: string) {
  const qc = new QueryClient({
    defaultOptions: {
      queries: { retry: false, staleTime: Infinity, gcTime: Infinity },
      mutations: { gcTime: Infinity },
    },
  });
  qc.setQueryData(detectabilityKeys.site(SITE), response);
  mockRequest.mockImplementation(async (path: string) => {
    if (path.includes('/history')) return history(tag, 'temperature');
    if (path.endsWith('/instruments')) return { instruments: [], asOf: '2026-12-01T06:10:00.000Z' };
    throw new Error(`unexpected ${path}`);
  });
  render(
    <QueryClientProvider client={qc}>
      <InstrumentScreen tag={tag} />
    </QueryClientProvider>,
  );
}

afterEach(() => mockRequest.mockReset());

/** a text the element's content contains */
const has = (t: string) => new RegExp(t.replace(/[.*+?^${}()|[\]\\]/g, '\\$&'));

test('a checked thermometer’s page: the balances notice it from its MDB, in K', async () => {
  renderPage('TI-301');
  const t = map.instruments.find((i) => i.tag === 'TI-301')!;
  const card = await screen.findByTestId('instrument-detectability');
  await waitFor(() =>
    expect(card).toHaveTextContent(has(`The balances notice TI-301 from ${t.mdb!.toFixed(1)} K off`)),
  );
  expect(card).toHaveTextContent(has('found in 80 % of rounds by the per-reading test at 5 %'));
});

test('an unchecked thermometer’s page: no balance can check it, and a twin would, from δ0·σ·√2', async () => {
  renderPage('TI-103');
  const t = map.instruments.find((i) => i.tag === 'TI-103')!;
  const card = await screen.findByTestId('instrument-detectability');
  expect(card).toHaveTextContent(has('No balance can check TI-103'));
  expect(card).toHaveTextContent(
    has(
      `What would check it: A second thermometer of its class beside it: the balances would notice it from ${(map.delta0 * t.sigma! * Math.SQRT2).toFixed(1)} K off.`,
    ),
  );
});

test('the health screen’s card lists every unchecked instrument with its remedy; the column says “no balance checks it”', () => {
  render(<DetectabilitySummary unit={unit} testID="det" />);
  for (const tag of ['PI-103', 'TI-103', 'PI-203', 'TI-204', 'TI-207', 'LI-101', 'LI-201', 'LI-301', 'LI-401']) {
    expect(screen.getByTestId(`det-${tag}`)).toHaveTextContent(has(`No balance can check ${tag}`));
  }
  expect(screen.getByTestId('det-LI-101')).toHaveTextContent(has('levels enter no balance'));
  expect(screen.getByTestId('det-TI-205')).toHaveTextContent(/The balances notice TI-205 only from \d+\.\d K off/);
  expect(screen.queryByTestId('det-TI-301')).toBeNull();
  expect(noticeFromWords(map.instruments.find((i) => i.tag === 'TI-103'))).toBe('no balance checks it');
  expect(noticeFromWords(map.instruments.find((i) => i.tag === 'TI-402'))).toMatch(/^0\.\d K$/);
});
