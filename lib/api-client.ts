/**
 * The app's HTTP client for the Trueround API. Every error becomes an ApiError carrying the
 * server's `{ error: { code, message, details } }`; a 401 refreshes the token once and retries.
 */
export const API_BASE: string = process.env.EXPO_PUBLIC_API_URL ?? '';

export class ApiError extends Error {
  constructor(
    public readonly status: number,
    public readonly code: string,
    message: string,
    public readonly details?: unknown,
  ) {
    super(message);
    this.name = 'ApiError';
  }
}

export interface TokenSource {
  getAccessToken(): string | null;
  /** Refresh the token pair; resolves false when the session is over. */
  refresh(): Promise<boolean>;
}

export async function rawRequest<T>(
  path: string,
  init: RequestInit & { json?: unknown } = {},
  token?: string | null,
): Promise<T> {
  const headers: Record<string, string> = { Accept: 'application/json', ...(init.headers as Record<string, string>) };
  let body = init.body;
  if (init.json !== undefined) {
    headers['Content-Type'] = 'application/json';
    body = JSON.stringify(init.json);
  }
  if (token) headers.Authorization = `Bearer ${token}`;
  let res: Response;
  try {
    res = await fetch(`${API_BASE}${path}`, { ...init, headers, body });
  } catch {
    throw new ApiError(0, 'network', 'No connection to the Trueround server.');
  }
  const text = await res.text();
  let data: unknown = undefined;
  if (text) {
    try {
      data = JSON.parse(text);
    } catch {
      data = undefined;
    }
  }
  if (!res.ok) {
    const err = (data as { error?: { code?: string; message?: string; details?: unknown } } | undefined)?.error;
    throw new ApiError(
      res.status,
      err?.code ?? 'http_' + res.status,
      err?.message ?? `The server answered ${res.status}.`,
      err?.details,
    );
  }
  return data as T;
}

/** A request with the session's token, refreshing once on 401. */
export async function authedRequest<T>(
  tokens: TokenSource,
  path: string,
  init: RequestInit & { json?: unknown } = {},
): Promise<T> {
  try {
    return await rawRequest<T>(path, init, tokens.getAccessToken());
  } catch (e) {
    if (e instanceof ApiError && e.status === 401 && (await tokens.refresh())) {
      return rawRequest<T>(path, init, tokens.getAccessToken());
    }
    throw e;
  }
}
