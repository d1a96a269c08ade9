/**
 * The stored session is schema-checked on read: a shape from another version, a torn write
 * or a hand-edited value counts as signed out rather than crashing the app (common practice).
 */
import { parseStoredSession } from '@/hooks/session';

const good = {
  version: 1,
  accessToken: 'a.b.c',
  refreshToken: 'r',
  siteId: '3f2b8f0e-5c1a-4d7e-9b8a-1c2d3e4f5a6b',
  user: {
    id: '0b8e4f7a-2c3d-4e5f-8a9b-0c1d2e3f4a5b',
    name: 'Robin Aske',
    email: 'tech@fernhallow.example',
    memberships: [{ siteId: '3f2b8f0e-5c1a-4d7e-9b8a-1c2d3e4f5a6b', siteName: 'Fernhallow Works', role: 'technician' }],
  },
};

test('a well-formed stored session parses', () => {
  expect(parseStoredSession(JSON.stringify(good))?.user.name).toBe('Robin Aske');
});

test.each([
  ['nothing stored', null],
  ['torn JSON', '{"version":1,"accessTo'],
  ['an unknown version', JSON.stringify({ ...good, version: 2 })],
  [
    'a role that does not exist',
    JSON.stringify({
      ...good,
      user: { ...good.user, memberships: [{ ...good.user.memberships[0], role: 'operator' }] },
    }),
  ],
  ['an empty token', JSON.stringify({ ...good, accessToken: '' })],
])('%s counts as signed out', (_label, raw) => {
  expect(parseStoredSession(raw)).toBeNull();
});
