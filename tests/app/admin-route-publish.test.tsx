/**
 * The admin's route-version publish screen: the server's validation messages (400 details, as
 * server/sync/route-versions.ts builds them from checklists validateRoute) stand one per line,
 * each with the line of the pasted template it points at; a published version's number is shown.
 * The server is a jest mock of the session's request(); its refusal is made by running the real
 * validator (checklists/validate.ts) on the pasted template against the demo site's instruments
 * (demo/routes fernhallowRouteModel), so the details are the ones the API would send.
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { fireEvent, render, screen, waitFor } from '@testing-library/react-native';
import { fernhallowRouteModel, turbineHallRoute } from '@/demo/routes';
import { validateRoute } from '@/checklists/validate';
import { ApiError } from '@/lib/api-client';
import { RoutesScreen } from '@/screens/admin/routes-screen';
import type { PullResponse } from '@/shared/api/sync';

const SITE = '6f1f7a52-3b1c-4c5e-9d7a-1a2b3c4d5e6f';
const UNIT = '1b2c3d4e-5f6a-4b7c-8d9e-0f1a2b3c4d5e';
const ROUTE = '3c4d5e6f-7a8b-4c9d-8e0f-1a2b3c4d5e6f';
const mockRequest = jest.fn();

jest.mock('@/hooks/session', () => ({
  useSession: () => ({
    status: 'signed-in',
    user: {
      id: '0c9b8a7d-6e5f-4a3b-8c2d-1e0f9a8b7c6d',
      name: 'Jordan Vale',
      email: 'admin@fernhallow.example',
      memberships: [],
    },
    membership: { siteId: SITE, siteName: 'Fernhallow Works', role: 'admin' },
    request: (path: string, init?: unknown) => mockRequest(path, init),
  }),
}));

const pull: PullResponse = {
  cursor: 10,
  serverTime: '2026-12-01T06:00:00.000Z',
  units: [
    { id: UNIT, siteId: SITE, name: 'Unit 1', model: { id: 'fernhallow-u1' }, modelVersion: 'v1', syncVersion: 1 },
  ],
  instruments: [],
  routes: [
    {
      id: ROUTE,
      siteId: SITE,
      unitId: UNIT,
      name: turbineHallRoute.name,
      version: {
        id: '4d5e6f7a-8b9c-4d0e-9f1a-2b3c4d5e6f7a',
        number: 2,
        publishedAt: '2026-11-30T06:00:00.000Z',
        template: turbineHallRoute,
      },
      syncVersion: 2,
    },
  ],
};

/** What the API answers for a template: 400 with the validator's issues, or 201 version 3. */
function server(path: string, init?: { method?: string; json?: { template: unknown } }) {
  if (path.startsWith('/api/sync/pull')) return Promise.resolve(pull);
  if (path === `/api/sites/${SITE}/routes/${ROUTE}/versions` && init?.method === 'POST') {
    const r = validateRoute(init.json!.template, fernhallowRouteModel);
    if (!r.ok) {
      const details = r.issues.map((i) => ({ path: `template.${i.path}`, message: i.message }));
      return Promise.reject(
        new ApiError(
          400,
          'validation',
          `Invalid route template: ${r.issues.map((i) => `${i.path}: ${i.message}`).join('; ')}`,
          details,
        ),
      );
    }
    return Promise.resolve({
      id: '5e6f7a8b-9c0d-4e1f-8a2b-3c4d5e6f7a8b',
      routeId: ROUTE,
      number: 3,
      publishedAt: '2026-12-01T07:00:00.000Z',
    });
  }
  return Promise.reject(new Error(`unexpected request ${path}`));
}

function setup() {
  mockRequest.mockImplementation(server);
  const qc = new QueryClient({
    defaultOptions: { queries: { retry: false, gcTime: Infinity }, mutations: { retry: false, gcTime: Infinity } },
  });
  render(
    <QueryClientProvider client={qc}>
      <RoutesScreen />
    </QueryClientProvider>,
  );
}

beforeEach(() => mockRequest.mockReset());

test('the validator’s messages stand one per line, each with the line of the pasted template', async () => {
  setup();
  fireEvent.press(await screen.findByTestId('publish-route-turbine-hall'));
  // three mistakes: an instrument the unit does not have, a temperature unit on a pressure gauge, a stop id used twice
  const bad = structuredClone(turbineHallRoute) as unknown as {
    stops: { id: string; readings: { tag: string; unit: string }[] }[];
  };
  bad.stops[0].readings[1].tag = 'TI-999';
  bad.stops[1].readings[0].unit = '°C';
  bad.stops[2].id = bad.stops[0].id;
  const text = JSON.stringify(bad, null, 2);
  fireEvent.changeText(screen.getByTestId('publish-json'), text);
  fireEvent.press(screen.getByTestId('publish-submit'));
  await screen.findByTestId('publish-issues');

  const expected = validateRoute(bad, fernhallowRouteModel);
  expect(expected.ok).toBe(false);
  const issues = expected.ok ? [] : expected.issues;
  expect(issues.length).toBe(3);
  expect(screen.getByTestId('publish-issues')).toHaveTextContent(`Not published: ${issues.length} problems`, {
    exact: false,
  });
  const lines = text.split('\n');
  const lineOf = (needle: string) => lines.findIndex((l) => l.includes(needle)) + 1;
  issues.forEach((i, n) =>
    expect(screen.getByTestId(`publish-issue-${n}`)).toHaveTextContent(`${i.path}: ${i.message}`, { exact: false }),
  );
  // each points at its own line of the text
  const tagIssue = issues.findIndex((i) => i.path === 'stops.0.readings.1.tag');
  expect(tagIssue).toBeGreaterThanOrEqual(0);
  expect(screen.getByTestId(`publish-issue-${tagIssue}`)).toHaveTextContent(
    new RegExp(`^Line ${lineOf('"TI-999"')} · stops\\.0\\.readings\\.1\\.tag: `),
  );
  // PI-201's reading: its "unit" stands on the line after its "tag"
  expect(lines[lineOf('"tag": "PI-201"')]).toContain('"unit": "°C"');
  const unitIssue = issues.findIndex((i) => i.path === 'stops.1.readings.0.unit');
  expect(screen.getByTestId(`publish-issue-${unitIssue}`)).toHaveTextContent(
    new RegExp(`^Line ${lineOf('"tag": "PI-201"') + 1} · stops\\.1\\.readings\\.0\\.unit: `),
  );
  const idIssue = issues.findIndex((i) => i.path === 'stops.2.id');
  const idLines = lines.map((l, k) => (l.includes(`"id": "${bad.stops[0].id}"`) ? k + 1 : 0)).filter(Boolean);
  expect(idLines).toHaveLength(2);
  expect(screen.getByTestId(`publish-issue-${idIssue}`)).toHaveTextContent(
    new RegExp(`^Line ${idLines[1]} · stops\\.2\\.id: `),
  );
  expect(screen.queryByTestId('publish-done')).toBeNull();
});

test('text that is not JSON is refused before it is sent, with the line; a good template publishes and shows its number', async () => {
  setup();
  fireEvent.press(await screen.findByTestId('publish-route-turbine-hall'));
  fireEvent.changeText(screen.getByTestId('publish-json'), '{\n  "id": "turbine-hall",\n  "name": "Turbine hall",,\n}');
  fireEvent.press(screen.getByTestId('publish-submit'));
  expect(await screen.findByTestId('publish-issue-0')).toHaveTextContent(/^Line 3 · Not JSON: /);
  expect(mockRequest.mock.calls.filter(([p]) => String(p).includes('/versions'))).toHaveLength(0);

  // start from the current version, change a band, publish
  fireEvent.press(screen.getByTestId('publish-start-current'));
  const t = structuredClone(turbineHallRoute);
  t.stops[0].readings[0].band = { min: 57, max: 68 };
  fireEvent.changeText(screen.getByTestId('publish-json'), JSON.stringify(t, null, 2));
  fireEvent.press(screen.getByTestId('publish-submit'));
  await waitFor(() =>
    expect(screen.getByTestId('publish-done')).toHaveTextContent(/^✓ Published version 3 of Turbine hall/),
  );
  expect(screen.queryByTestId('publish-issues')).toBeNull();
  const [, init] = mockRequest.mock.calls.find(([p]) => String(p).includes('/versions'))!;
  expect(init).toEqual({ method: 'POST', json: { template: t } });
});
