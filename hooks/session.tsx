/**
 * The signed-in session: tokens and the user, kept across reloads in AsyncStorage
 * (localStorage on the web: fine for a token, never for readings). The stored shape is a
 * zod schema, parsed on read; anything that does not parse counts as signed out.
 */
import AsyncStorage from '@react-native-async-storage/async-storage';
import { useQueryClient } from '@tanstack/react-query';
import { createContext, useCallback, useContext, useEffect, useMemo, useRef, useState, type ReactNode } from 'react';
import type { Href } from 'expo-router';
import { z } from 'zod';
import { RefreshResponse, SignInResponse, TokenPair, UserView } from '@/shared/api/auth';
import { ApiError, authedRequest, rawRequest, type TokenSource } from '../lib/api-client';

const STORAGE_KEY = 'trueround.session';

export const storedSessionSchema = z.object({
  version: z.literal(1),
  accessToken: z.string().min(1),
  refreshToken: z.string().min(1),
  user: UserView,
  siteId: z.string().nullable(),
});
export type StoredSession = z.infer<typeof storedSessionSchema>;
export type SessionUser = StoredSession['user'];
export type Role = SessionUser['memberships'][number]['role'];

export function parseStoredSession(raw: string | null): StoredSession | null {
  if (!raw) return null;
  try {
    const r = storedSessionSchema.safeParse(JSON.parse(raw));
    return r.success ? r.data : null;
  } catch {
    return null;
  }
}

interface SessionValue {
  status: 'loading' | 'signed-out' | 'signed-in';
  user: SessionUser | null;
  /** The membership in use (first site unless the user picked another). */
  membership: SessionUser['memberships'][number] | null;
  signIn(email: string, password: string): Promise<SessionUser>;
  signOut(): Promise<void>;
  /** Sets a new password; the server ends every other session and hands this one new tokens. */
  changePassword(currentPassword: string, newPassword: string): Promise<void>;
  chooseSite(siteId: string): void;
  request<T>(path: string, init?: RequestInit & { json?: unknown }): Promise<T>;
}

const SessionContext = createContext<SessionValue | null>(null);

export function SessionProvider({ children }: { children: ReactNode }) {
  const queryClient = useQueryClient();
  const [session, setSession] = useState<StoredSession | null>(null);
  const [status, setStatus] = useState<SessionValue['status']>('loading');
  const ref = useRef<StoredSession | null>(null);
  const refreshing = useRef<Promise<boolean> | null>(null);

  const save = useCallback(async (s: StoredSession | null) => {
    ref.current = s;
    setSession(s);
    setStatus(s ? 'signed-in' : 'signed-out');
    if (s) await AsyncStorage.setItem(STORAGE_KEY, JSON.stringify(s));
    else await AsyncStorage.removeItem(STORAGE_KEY);
  }, []);

  useEffect(() => {
    let live = true;
    AsyncStorage.getItem(STORAGE_KEY).then((raw) => {
      if (!live) return;
      const s = parseStoredSession(raw);
      ref.current = s;
      setSession(s);
      setStatus(s ? 'signed-in' : 'signed-out');
    });
    return () => {
      live = false;
    };
  }, []);

  const tokens: TokenSource = useMemo(
    () => ({
      getAccessToken: () => ref.current?.accessToken ?? null,
      refresh: () => {
        if (!refreshing.current) {
          refreshing.current = (async () => {
            const cur = ref.current;
            if (!cur) return false;
            try {
              const r = RefreshResponse.parse(
                await rawRequest('/api/auth/refresh', { method: 'POST', json: { refreshToken: cur.refreshToken } }),
              );
              await save({ ...cur, accessToken: r.accessToken, refreshToken: r.refreshToken });
              return true;
            } catch (e) {
              if (e instanceof ApiError && (e.status === 401 || e.status === 400)) {
                await save(null);
                queryClient.clear();
              }
              return false;
            } finally {
              refreshing.current = null;
            }
          })();
        }
        return refreshing.current;
      },
    }),
    [queryClient, save],
  );

  const value: SessionValue = useMemo(() => {
    const user = session?.user ?? null;
    const membership = user?.memberships.find((m) => m.siteId === session?.siteId) ?? user?.memberships[0] ?? null;
    return {
      status,
      user,
      membership,
      async signIn(email, password) {
        const r: SignInResponse = SignInResponse.parse(
          await rawRequest('/api/auth/sign-in', { method: 'POST', json: { email, password } }),
        );
        queryClient.clear();
        await save({
          version: 1,
          accessToken: r.accessToken,
          refreshToken: r.refreshToken,
          user: r.user,
          siteId: r.user.memberships[0]?.siteId ?? null,
        });
        return r.user;
      },
      async signOut() {
        const cur = ref.current;
        if (cur) {
          await rawRequest(
            '/api/auth/sign-out',
            { method: 'POST', json: { refreshToken: cur.refreshToken } },
            cur.accessToken,
          ).catch(() => undefined);
        }
        queryClient.clear();
        await save(null);
      },
      async changePassword(currentPassword, newPassword) {
        const r = TokenPair.parse(
          await authedRequest(tokens, '/api/auth/password', { method: 'POST', json: { currentPassword, newPassword } }),
        );
        if (ref.current) await save({ ...ref.current, accessToken: r.accessToken, refreshToken: r.refreshToken });
      },
      chooseSite(siteId) {
        if (ref.current) void save({ ...ref.current, siteId });
      },
      request: (path, init) => authedRequest(tokens, path, init),
    };
  }, [session, status, queryClient, save, tokens]);

  return <SessionContext.Provider value={value}>{children}</SessionContext.Provider>;
}

export function useSession(): SessionValue {
  const v = useContext(SessionContext);
  if (!v) throw new Error('useSession outside SessionProvider');
  return v;
}

/** Where each role starts. */
export const homeFor = {
  technician: '/tech',
  planner: '/plan',
  engineer: '/eng',
  admin: '/admin',
} as const satisfies Record<Role, Href>;
