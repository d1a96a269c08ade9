/**
 * A planner's change to a work order shows at once (optimistic update) and is put back when the
 * server refuses it (rollback), with the server's reason on screen — TanStack Query's
 * optimistic-update pattern (onMutate snapshot, onError restore). The server is a jest mock of
 * the session's request(); the work order is an invented one.
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { act, fireEvent, render, screen, waitFor } from '@testing-library/react-native';
import { ApiError } from '@/lib/api-client';
import { workOrderKeys, workOrderQuery } from '@/hooks/queries/work-orders';
import { WorkOrderScreen } from '@/screens/work-orders/work-order-screen';
import type { WorkOrderDetail, WorkOrderListResponse } from '@/shared/api/work-orders';

const SITE = '6f1f7a52-3b1c-4c5e-9d7a-1a2b3c4d5e6f';
const ME = { id: '0c9b8a7d-6e5f-4a3b-8c2d-1e0f9a8b7c6d', name: 'Morgan Tilly' };
const mockRequest = jest.fn();

jest.mock('@/hooks/session', () => ({
  useSession: () => ({
    status: 'signed-in',
    user: { ...ME, email: 'planner@fernhallow.example', memberships: [] },
    membership: { siteId: SITE, siteName: 'Fernhallow Works', role: 'planner' },
    request: (path: string, init?: unknown) => mockRequest(path, init),
  }),
}));

const wo: WorkOrderDetail = {
  id: 'a1b2c3d4-e5f6-4a7b-8c9d-0e1f2a3b4c5d',
  number: 'WO-0007',
  siteId: SITE,
  unitId: '1b2c3d4e-5f6a-4b7c-8d9e-0f1a2b3c4d5e',
  kind: 'calibrate',
  status: 'scheduled',
  priority: 1,
  title: 'Calibrate TI-301 (Deaerator outlet temperature): gross error',
  instrumentId: '2c3d4e5f-6a7b-4c8d-9e0f-1a2b3c4d5e6f',
  instrumentTag: 'TI-301',
  equipmentRef: null,
  assignee: null,
  dueDate: '2026-12-04',
  scheduledFor: '2026-12-03',
  cancelReason: null,
  mergedInto: null,
  reopenCount: 0,
  findingCount: 1,
  lastFindingAt: '2026-12-01T06:10:00.000Z',
  openedAt: '2026-12-01T06:10:00.000Z',
  updatedAt: '2026-12-01T06:10:00.000Z',
  closedAt: null,
  evidenceSummary: {
    findingCount: 0,
    roundCount: 0,
    firstSeenAt: null,
    lastSeenAt: null,
    trend: [],
    trendUnit: 'K',
    latest: [],
  },
  evidence: [],
  evidencePage: { rounds: 0, offset: 0, limit: 5 },
  events: [],
  calibrations: [],
  allowedActions: ['assign', 'start', 'cancel', 'merge', 'comment'],
};

function setup() {
  const qc = new QueryClient({
    defaultOptions: {
      queries: { retry: false, staleTime: Infinity, gcTime: Infinity },
      mutations: { retry: false, gcTime: Infinity },
    },
  });
  qc.setQueryData(workOrderKeys.detail(SITE, wo.id), wo);
  const list: WorkOrderListResponse = { items: [wo], total: 1, limit: 25, offset: 0 };
  qc.setQueryData(workOrderKeys.list(SITE, {}), list);
  render(
    <QueryClientProvider client={qc}>
      <WorkOrderScreen id={wo.id} cycleHref={(r) => `/plan/rounds/${r}`} />
    </QueryClientProvider>,
  );
  return qc;
}

afterEach(() => mockRequest.mockReset());

test('a refused start is rolled back: the status shows "Under way" at once, then "Scheduled" again with the reason', async () => {
  let refuse!: (e: Error) => void;
  mockRequest.mockImplementation((path: string, init?: { method?: string }) => {
    if (path.endsWith('/assignees')) return Promise.resolve({ members: [] });
    if (init?.method === 'POST') return new Promise((_res, rej) => (refuse = rej));
    if (path.includes('/work-orders/')) return Promise.resolve(wo);
    return Promise.resolve({ items: [], total: 0, limit: 50, offset: 0 });
  });
  const qc = setup();
  expect(screen.getByTestId('wo-status')).toHaveTextContent('Scheduled');
  fireEvent.press(screen.getByTestId('wo-start'));
  await waitFor(() => expect(screen.getByTestId('wo-status')).toHaveTextContent('Under way'));
  // the cached list page changed with it
  expect(qc.getQueryData<WorkOrderListResponse>(workOrderKeys.list(SITE, {}))!.items[0].status).toBe('in-progress');
  expect(mockRequest).toHaveBeenCalledWith(`/api/sites/${SITE}/work-orders/${wo.id}/start`, {
    method: 'POST',
    json: {},
  });
  await act(async () =>
    refuse(new ApiError(409, 'conflict', 'Nobody is assigned: assign the work order before it starts')),
  );
  await waitFor(() => expect(screen.getByTestId('wo-status')).toHaveTextContent('Scheduled'));
  expect(screen.getByTestId('wo-action-error')).toHaveTextContent(
    'Not saved: Nobody is assigned: assign the work order before it starts',
  );
  expect(qc.getQueryData<WorkOrderListResponse>(workOrderKeys.list(SITE, {}))!.items[0].status).toBe('scheduled');
});

test('assigning to oneself shows the name at once and keeps what the server answers', async () => {
  const assigned = { ...wo, assignee: ME };
  let answer!: (v: unknown) => void;
  mockRequest.mockImplementation((path: string, init?: { method?: string }) => {
    if (path.endsWith('/assignees')) return Promise.resolve({ members: [] });
    if (init?.method === 'POST') return new Promise((res) => (answer = res));
    if (path.includes('/work-orders/')) return Promise.resolve(assigned);
    return Promise.resolve({ items: [], total: 0, limit: 50, offset: 0 });
  });
  setup();
  expect(screen.getByTestId('wo-assignee')).toHaveTextContent('Nobody yet');
  // planners cannot list members (403): they get "Assign to me" and a user-id field
  await waitFor(() => expect(screen.getByTestId('wo-assign-user')).toBeTruthy());
  fireEvent.press(screen.getByTestId('wo-assign-me'));
  await waitFor(() => expect(screen.getByTestId('wo-assignee')).toHaveTextContent('Morgan Tilly'));
  expect(mockRequest).toHaveBeenCalledWith(`/api/sites/${SITE}/work-orders/${wo.id}/assign`, {
    method: 'POST',
    json: { userId: ME.id },
  });
  await act(async () => answer(assigned));
  await waitFor(() => expect(screen.getByTestId('wo-assignee')).toHaveTextContent('Morgan Tilly'));
  expect(screen.queryByTestId('wo-action-error')).toBeNull();
  // the detail of a live order carries the caution about hot, pressurised plant
  expect(screen.getByTestId('wo-caution')).toHaveTextContent(/lockout\/tagout/);
});

test('a calibration order asks for as found and as left before it closes (the server refuses a calibrate close without them)', async () => {
  mockRequest.mockImplementation((path: string, init?: { method?: string }) => {
    if (path.endsWith('/assignees')) return Promise.resolve({ members: [] });
    if (init?.method === 'POST') return Promise.resolve({ ...wo, status: 'done', allowedActions: [] });
    if (path.includes('/work-orders/')) return Promise.resolve({ ...wo, status: 'done', allowedActions: [] });
    return Promise.resolve({ items: [], total: 0, limit: 50, offset: 0 });
  });
  const qc = new QueryClient({
    defaultOptions: {
      queries: { retry: false, staleTime: Infinity, gcTime: Infinity },
      mutations: { gcTime: Infinity },
    },
  });
  qc.setQueryData(workOrderKeys.detail(SITE, wo.id), {
    ...wo,
    status: 'in-progress',
    allowedActions: ['close', 'cancel', 'comment'],
  });
  render(
    <QueryClientProvider client={qc}>
      <WorkOrderScreen id={wo.id} cycleHref={(r) => `/plan/rounds/${r}`} />
    </QueryClientProvider>,
  );
  expect(screen.getByTestId('wo-close-submit')).toBeDisabled();
  fireEvent.changeText(screen.getByTestId('wo-close-asfound'), '107.4');
  fireEvent.changeText(screen.getByTestId('wo-close-asleft'), '101,2');
  fireEvent.changeText(screen.getByTestId('wo-close-date'), '2026-12-01');
  fireEvent.press(screen.getByTestId('wo-close-submit'));
  await waitFor(() => expect(screen.getByTestId('wo-status')).toHaveTextContent('Done'));
  expect(mockRequest).toHaveBeenCalledWith(`/api/sites/${SITE}/work-orders/${wo.id}/close`, {
    method: 'POST',
    json: { calibration: { asFound: 107.4, asLeft: 101.2, calibratedOn: '2026-12-01' } },
  });
});

test('list filters become the query string the server reads (shared/api/work-orders WorkOrderListQuery)', () => {
  expect(
    workOrderQuery({
      status: ['active'],
      priority: [1],
      kind: ['calibrate', 'repair'],
      tag: ' TI-301 ',
      q: '',
      sort: 'priority',
      limit: 20,
      offset: 40,
    }),
  ).toBe('status=active&priority=1&kind=calibrate%2Crepair&tag=TI-301&sort=priority&limit=20&offset=40');
});
