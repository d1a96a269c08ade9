/**
 * Choosing a new password: the form refuses what the server would refuse before sending (length,
 * two entries that differ), puts the server's own refusals under the field they name, and says
 * when the change went through. The length rule (12 characters) is the project's choice, above
 * NIST SP 800-63B §5.1.1.2's minimum of 8; the server is a jest mock of the session.
 */
import { fireEvent, render, screen, waitFor } from '@testing-library/react-native';
import { ApiError } from '@/lib/api-client';
import { PasswordScreen } from '@/screens/account/password-screen';

const mockChange = jest.fn();
jest.mock('@/hooks/session', () => ({
  homeFor: { technician: '/tech', planner: '/plan', engineer: '/eng', admin: '/admin' },
  useSession: () => ({
    status: 'signed-in',
    membership: { siteId: 's', siteName: 'Fernhallow Works', role: 'engineer' },
    changePassword: (a: string, b: string) => mockChange(a, b),
  }),
}));
jest.mock('expo-router', () => ({ useRouter: () => ({ replace: jest.fn(), push: jest.fn() }) }));

const type = (id: string, text: string) => fireEvent.changeText(screen.getByTestId(`password-${id}`), text);

beforeEach(() => mockChange.mockReset());

test('a new password under 12 characters and two entries that differ are refused on the device; nothing is sent', async () => {
  render(<PasswordScreen />);
  type('currentPassword', 'one-time-Xq7');
  type('newPassword', 'short');
  type('repeat', 'shorter');
  fireEvent.press(screen.getByTestId('password-submit'));
  await screen.findByText('At least 12 characters.');
  expect(screen.getByText('The two new passwords differ.')).toBeTruthy();
  expect(mockChange).not.toHaveBeenCalled();
});

test('the server’s refusal shows under the field it names; a success says other devices were signed out', async () => {
  mockChange.mockRejectedValueOnce(
    new ApiError(400, 'validation', 'Invalid request body: newPassword: Is a common password', [
      { path: 'newPassword', message: 'Is one of the most common passwords' },
    ]),
  );
  render(<PasswordScreen />);
  type('currentPassword', 'one-time-Xq7');
  type('newPassword', 'passwordpassword');
  type('repeat', 'passwordpassword');
  fireEvent.press(screen.getByTestId('password-submit'));
  await screen.findByText('Is one of the most common passwords');
  expect(mockChange).toHaveBeenCalledWith('one-time-Xq7', 'passwordpassword');
  expect(screen.queryByTestId('password-done')).toBeNull();

  mockChange.mockResolvedValueOnce(undefined);
  type('newPassword', 'kettle heron lantern quay');
  type('repeat', 'kettle heron lantern quay');
  fireEvent.press(screen.getByTestId('password-submit'));
  await waitFor(() =>
    expect(screen.getByTestId('password-done')).toHaveTextContent(
      'Password changed. Any other device signed in to this account has been signed out.',
    ),
  );
  expect(mockChange).toHaveBeenLastCalledWith('one-time-Xq7', 'kettle heron lantern quay');
});
