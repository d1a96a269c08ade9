/**
 * The outbox screen shows what the server refused and why, keeps it apart from what waits, and
 * offers to send it again (offline-sync practice: a refused batch is reported and set aside so it
 * never blocks the queue). The sync client itself is tested in tests/unit/offline.
 */
import { fireEvent, render, screen } from '@testing-library/react-native';
import { OutboxScreen } from '@/screens/rounds/outbox-screen';

const mockRetryRefused = jest.fn(async () => 1);
const mockSyncNow = jest.fn(async () => null);
const mockStatus = {
  waiting: 3,
  othersWaiting: [{ authorId: 'user-a', authorName: 'Robin Aske', records: 12 }],
  sent: 41,
  refused: 1,
  photosWaiting: 1,
  photosStored: 2,
  photosRefused: 0,
  lastSyncAt: '2026-11-30T07:42:10Z',
  lastServerTime: '2026-11-30T07:42:11Z',
  lastPush: null,
  running: false,
  signedOut: false,
  problem: null,
  lastBatchRefusal: null,
  nextAttemptAt: null,
  refusedItems: [
    {
      seq: 17,
      kind: 'reading',
      recordId: '0b8e4f7a-2c3d-4e5f-8a9b-0c1d2e3f4a5b',
      message: 'readings.0.unit: "t/h" is a mass flow unit; PI-101 measures pressure',
      details: [{ path: 'readings.0.unit', message: 'wrong quantity' }],
      refusedAt: '2026-11-30T07:42:11Z',
    },
  ],
  badRows: [],
};

jest.mock('@/offline/use-offline', () => ({
  useOutboxStatus: () => mockStatus,
  useSyncNow: () => ({ syncNow: mockSyncNow, retryRefused: mockRetryRefused, running: false }),
}));

test('the refused reading is listed with the server’s message, apart from what waits', () => {
  render(<OutboxScreen />);
  expect(screen.getByTestId('outbox-waiting')).toHaveTextContent('3');
  expect(screen.getByTestId('outbox-refused')).toHaveTextContent('1');
  expect(screen.getByTestId('refused-17-message')).toHaveTextContent(
    'readings.0.unit: "t/h" is a mass flow unit; PI-101 measures pressure',
  );
});

test('sending the refused again and syncing now reach the sync client', () => {
  render(<OutboxScreen />);
  fireEvent.press(screen.getByTestId('retry-refused'));
  fireEvent.press(screen.getByTestId('sync-now'));
  expect(mockRetryRefused).toHaveBeenCalledTimes(1);
  expect(mockSyncNow).toHaveBeenCalledTimes(1);
});

test("another person's records on this device are shown as waiting for them, to be sent as theirs", () => {
  render(<OutboxScreen />);
  expect(screen.getByTestId('others-waiting-user-a')).toHaveTextContent(
    "Waiting for Robin Aske: 12 records made on this device. They are sent as Robin Aske's when Robin Aske signs in here again, never as yours.",
  );
});
