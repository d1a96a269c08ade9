/**
 * The offline store for the screens: <OfflineProvider session={…}> opens the
 * device database after mount, runs its migrations, asks for persistent storage, registers the
 * service worker, and runs the sync client while someone is signed in.
 *
 *   const { state, store, actions, error } = useStore();       // state: opening | ready | locked | error
 *   const readings = useStoreQuery((s) => s.roundReadings(roundId), roundId);
 *   const status = useOutboxStatus();                          // counts, refused items, last sync…
 *   const { syncNow, retryRefused, running } = useSyncNow();
 *   const { prepare, signOut } = useSignOut(session.signOut);   // prepare sends the person's own records first and says what is left
 *
 * Records carry the signed-in person as their author and are sent only while that person is
 * signed in (./sync.ts): on a shared phone, another person's records wait for them.
 * A second browser tab gets state "locked" and `error.message` saying the app is open in another tab.
 */
import * as Crypto from 'expo-crypto';
import { createContext, useCallback, useContext, useEffect, useRef, useState, type ReactNode } from 'react';
import { createActions, toHex, type Actions } from './actions';
import { StoreLockedError } from './errors';
import { openExpoDb } from './expo-db';
import { createHttpTransport, type AuthedRequest } from './http-transport';
import { systemClock, type IdSource } from './ids';
import type { LocalDb } from './local-db';
import { ensurePersistentStorage } from './persist';
import { registerServiceWorker } from './register-sw';
import { openStore, type Store } from './store';
import { createSyncClient, type SyncClient, type SyncResult, type SyncStatus } from './sync';

export type OfflineState = 'opening' | 'ready' | 'locked' | 'error';

interface OfflineValue {
  state: OfflineState;
  error: Error | null;
  store: Store | null;
  actions: Actions | null;
  sync: SyncClient | null;
}

const OfflineContext = createContext<OfflineValue | null>(null);

const deviceIds: IdSource = { uuid: () => Crypto.randomUUID() };
const sha256 = async (bytes: Uint8Array) =>
  toHex(new Uint8Array(await Crypto.digest(Crypto.CryptoDigestAlgorithm.SHA256, bytes as Uint8Array<ArrayBuffer>)));

const browserTimers = {
  setTimeout: (fn: () => void, ms: number) => setTimeout(fn, ms),
  clearTimeout: (h: unknown) => clearTimeout(h as ReturnType<typeof setTimeout>),
};

/** What the offline store needs of the signed-in session (hooks/session.tsx supplies it). */
export interface OfflineSession {
  /** the session's authorised request (refreshes the access token on 401) */
  request: AuthedRequest;
  signedIn: boolean;
  siteId: string | null;
  /** the signed-in person: the author of what they record, and whose records a sync sends */
  author: OfflineAuthor | null;
}

export interface OfflineAuthor {
  id: string;
  name: string;
}

export function OfflineProvider({ session, children }: { session: OfflineSession; children: ReactNode }) {
  const [value, setValue] = useState<OfflineValue>({
    state: 'opening',
    error: null,
    store: null,
    actions: null,
    sync: null,
  });
  const requestRef = useRef<AuthedRequest>(session.request);
  requestRef.current = session.request;
  const siteRef = useRef<string | null>(session.siteId);
  siteRef.current = session.siteId;
  const authorRef = useRef<OfflineAuthor | null>(session.author);
  authorRef.current = session.signedIn ? session.author : null;

  // Open after mount, never at module load.
  useEffect(() => {
    let live = true;
    let db: LocalDb | null = null;
    (async () => {
      try {
        db = await openExpoDb();
        const store = await openStore(db, { clock: systemClock });
        const actions = createActions({
          store,
          ids: deviceIds,
          clock: systemClock,
          sha256,
          author: () => authorRef.current,
        });
        const sync = createSyncClient({
          store,
          transport: createHttpTransport(() => requestRef.current),
          ids: deviceIds,
          clock: systemClock,
          siteId: () => siteRef.current,
          author: () => authorRef.current?.id ?? null,
          timers: browserTimers,
        });
        if (!live) return;
        setValue({ state: 'ready', error: null, store, actions, sync });
        void ensurePersistentStorage(store);
      } catch (e) {
        if (!live) return;
        const err = e instanceof Error ? e : new Error(String(e));
        setValue({
          state: err instanceof StoreLockedError ? 'locked' : 'error',
          error: err,
          store: null,
          actions: null,
          sync: null,
        });
      }
    })();
    void registerServiceWorker();
    return () => {
      live = false;
      void db?.close();
    };
  }, []);

  // Sync while signed in; a site change pulls that site's reference data.
  const { sync } = value;
  const { signedIn, siteId } = session;
  useEffect(() => {
    if (!sync || !signedIn) return;
    sync.start();
    const online = () => void sync.syncNow({ force: true });
    const g = globalThis as {
      addEventListener?: (t: string, f: () => void) => void;
      removeEventListener?: (t: string, f: () => void) => void;
    };
    g.addEventListener?.('online', online);
    return () => {
      g.removeEventListener?.('online', online);
      sync.stop();
    };
  }, [sync, signedIn]);
  useEffect(() => {
    if (sync && signedIn && siteId) void sync.syncNow({ force: true });
  }, [sync, signedIn, siteId]);

  return <OfflineContext.Provider value={value}>{children}</OfflineContext.Provider>;
}

export function useOffline(): OfflineValue {
  const v = useContext(OfflineContext);
  if (!v) throw new Error('useOffline outside OfflineProvider');
  return v;
}

/** The store and the actions, once open. */
export function useStore(): Pick<OfflineValue, 'state' | 'error' | 'store' | 'actions'> {
  const { state, error, store, actions } = useOffline();
  return { state, error, store, actions };
}

/**
 * Reads from the store and reads again after every write and whenever `key` changes (the values
 * the read depends on, joined into one string, so the effect's dependencies stay a fixed list).
 * `data` is undefined until the first read; a failed read gives `error`.
 */
export function useStoreQuery<T>(
  read: (store: Store) => Promise<T>,
  key: string,
): { data: T | undefined; error: Error | null } {
  const { store } = useOffline();
  const [data, setData] = useState<T | undefined>(undefined);
  const [error, setError] = useState<Error | null>(null);
  const readRef = useRef(read);
  readRef.current = read;
  useEffect(() => {
    if (!store) return;
    let live = true;
    let seq = 0;
    const load = () => {
      const mine = ++seq;
      readRef.current(store).then(
        (v) => live && mine === seq && (setData(v), setError(null)),
        (e: unknown) => live && mine === seq && setError(e instanceof Error ? e : new Error(String(e))),
      );
    };
    load();
    const off = store.onChange(load);
    return () => {
      live = false;
      off();
    };
  }, [store, key]);
  return { data, error };
}

/** The outbox screen's figures; null until the store is open. */
export function useOutboxStatus(): SyncStatus | null {
  const { sync } = useOffline();
  const [status, setStatus] = useState<SyncStatus | null>(null);
  useEffect(() => {
    if (!sync) return;
    let live = true;
    const off = sync.subscribe((s) => live && setStatus(s));
    sync.status().then(
      (s) => live && setStatus(s),
      () => undefined,
    );
    return () => {
      live = false;
      off();
    };
  }, [sync]);
  return status;
}

/** What signing out now would leave behind: whether the device has signal, and how many of the person's records are unsent. */
export interface SignOutCheck {
  online: boolean;
  /** The signed-in person's records still on this device only (0 outside the technician's screens). */
  unsent: number;
}

/**
 * Sign-out in two steps. `prepare` first tries to send the person's own waiting records (they would
 * otherwise wait on this device until the same person signs in here again) and says what is left,
 * for the confirmation; `signOut` then ends the session whatever the network said.
 */
export function useSignOut(signOut: () => Promise<void>): {
  prepare: () => Promise<SignOutCheck>;
  signOut: () => Promise<void>;
} {
  // outside the technician's screens there is no device store: a plain sign-out
  const sync = useContext(OfflineContext)?.sync ?? null;
  const prepare = useCallback(async (): Promise<SignOutCheck> => {
    const online = globalThis.navigator?.onLine !== false;
    if (!sync) return { online, unsent: 0 };
    let s = await sync.status().catch(() => null);
    if (s && s.waiting > 0 && online) {
      await sync.syncNow({ force: true }).catch(() => null);
      s = await sync.status().catch(() => s);
    }
    return { online: globalThis.navigator?.onLine !== false, unsent: s?.waiting ?? 0 };
  }, [sync]);
  return { prepare, signOut };
}

export function useSyncNow(): {
  syncNow: () => Promise<SyncResult | null>;
  retryRefused: (seqs?: number[]) => Promise<number>;
  running: boolean;
} {
  const { sync } = useOffline();
  const [running, setRunning] = useState(false);
  const syncNow = useCallback(async () => {
    if (!sync) return null;
    setRunning(true);
    try {
      return await sync.syncNow({ force: true });
    } finally {
      setRunning(false);
    }
  }, [sync]);
  const retryRefused = useCallback(
    async (seqs?: number[]) => {
      if (!sync) return 0;
      const n = await sync.retryRefused(seqs);
      void sync.syncNow({ force: true });
      return n;
    },
    [sync],
  );
  return { syncNow, retryRefused, running };
}
