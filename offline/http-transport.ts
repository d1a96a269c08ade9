/**
 * The sync transport over HTTP, built on the session's authed request (hooks/session.tsx:
 * bearer token, refresh once on 401, errors as ApiError with status/code/message/details).
 *
 *   POST /api/sync/push                     JSON PushRequest
 *   POST /api/photos/:id                    multipart, field "photo" (+ field "sha256")
 *   GET  /api/sync/pull?siteId=&cursor=N
 */
import type { PushRequestV2 } from '@/shared/api/sync';
import type { SyncTransport } from './sync';

export type AuthedRequest = <T>(path: string, init?: RequestInit & { json?: unknown }) => Promise<T>;

const EXTENSIONS: Record<string, string> = {
  'image/jpeg': 'jpg',
  'image/png': 'png',
  'image/webp': 'webp',
  'image/heic': 'heic',
  'image/heif': 'heif',
};

export function createHttpTransport(request: () => AuthedRequest): SyncTransport {
  return {
    push: (body: PushRequestV2) => request()<unknown>('/api/sync/push', { method: 'POST', json: body }),
    uploadPhoto: (id, bytes, mime, sha256) => {
      const form = new FormData();
      // Copy into a plain ArrayBuffer (a Blob part may not be a view of shared memory).
      const copy = new Uint8Array(bytes.length);
      copy.set(bytes);
      form.append('sha256', sha256);
      form.append('photo', new Blob([copy.buffer], { type: mime }), `${id}.${EXTENSIONS[mime] ?? 'bin'}`);
      return request()<unknown>(`/api/photos/${encodeURIComponent(id)}`, { method: 'POST', body: form });
    },
    pull: (cursor, siteId) =>
      request()<unknown>(
        `/api/sync/pull?siteId=${encodeURIComponent(siteId)}&cursor=${encodeURIComponent(String(cursor))}`,
        { method: 'GET' },
      ),
  };
}
