/**
 * The HTTP transport's requests: paths, methods and the multipart photo upload (field "photo",
 * as POST /api/photos/:id expects per shared/api/sync.ts).
 */
import { createHttpTransport, type AuthedRequest } from '@/offline/http-transport';

function recorder() {
  const calls: { path: string; init?: RequestInit & { json?: unknown } }[] = [];
  const request = (async (path: string, init?: RequestInit & { json?: unknown }) => {
    calls.push({ path, init });
    return { ok: true };
  }) as AuthedRequest;
  return { calls, transport: createHttpTransport(() => request) };
}

test('push is a JSON POST to /api/sync/push', async () => {
  const { calls, transport } = recorder();
  const body = {
    payloadVersion: 2 as const,
    deviceId: 'd',
    sentAt: '2025-11-30T08:00:00Z',
    rounds: [],
    readings: [],
    checkAnswers: [],
    photos: [],
  };
  await transport.push(body);
  expect(calls).toEqual([{ path: '/api/sync/push', init: { method: 'POST', json: body } }]);
});

test('pull is a GET with siteId and cursor in the query', async () => {
  const { calls, transport } = recorder();
  await transport.pull(42, '5e0f6a64-1b7a-4d49-9a65-3f7d7b1c0001');
  expect(calls[0].path).toBe('/api/sync/pull?siteId=5e0f6a64-1b7a-4d49-9a65-3f7d7b1c0001&cursor=42');
  expect(calls[0].init?.method).toBe('GET');
});

test('a photo goes as multipart: field "sha256", then field "photo" holding the bytes with their mime type', async () => {
  const { calls, transport } = recorder();
  const bytes = Uint8Array.from([0xff, 0xd8, 0xff, 0xe0, 1, 2, 3]);
  await transport.uploadPhoto('0b0f7c1e-1111-4a11-8a11-000000000009', bytes, 'image/jpeg', 'ab'.repeat(32));
  const { path, init } = calls[0];
  expect(path).toBe('/api/photos/0b0f7c1e-1111-4a11-8a11-000000000009');
  expect(init?.method).toBe('POST');
  const form = init?.body as FormData;
  expect([...form.keys()]).toEqual(['sha256', 'photo']);
  expect(form.get('sha256')).toBe('ab'.repeat(32));
  const file = form.get('photo') as File;
  expect(file.type).toBe('image/jpeg');
  expect(file.name).toBe('0b0f7c1e-1111-4a11-8a11-000000000009.jpg');
  expect(Array.from(new Uint8Array(await file.arrayBuffer()))).toEqual(Array.from(bytes));
});
