/**
 * Asks the browser to keep the device store (`navigator.storage.persist()`, Storage Standard
 * §4), so storage pressure does not evict the outbox. Asked once, on the first run; later runs
 * only look at `persisted()`. Chromium grants or refuses without a prompt; Firefox asks the user,
 * which is why this is not repeated on every start. No DOM types: the storage manager is looked
 * up on globalThis and can be passed in by tests.
 */
import { isoTime } from './ids';
import { META_KEYS, type Store } from './store';

export interface StorageManagerLike {
  persisted?(): Promise<boolean>;
  persist?(): Promise<boolean>;
}

export type PersistOutcome =
  /** Already persistent. */
  | 'persisted'
  /** Asked now, and granted. */
  | 'granted'
  /** Asked now, and refused (the browser may evict the store under storage pressure). */
  | 'denied'
  /** Asked on an earlier run and not persistent. */
  | 'not-persistent'
  /** No storage manager here (native app, old browser, insecure context). */
  | 'unsupported';

export function browserStorageManager(): StorageManagerLike | null {
  const nav = (globalThis as { navigator?: { storage?: StorageManagerLike } }).navigator;
  return nav?.storage ?? null;
}

export async function ensurePersistentStorage(
  store: Store,
  storage: StorageManagerLike | null = browserStorageManager(),
): Promise<PersistOutcome> {
  if (!storage || typeof storage.persist !== 'function') return 'unsupported';
  try {
    if (typeof storage.persisted === 'function' && (await storage.persisted())) return 'persisted';
    const asked = await store.getMeta(META_KEYS.PERSIST_ASKED);
    if (asked) return 'not-persistent';
    const granted = await storage.persist();
    await store.setMeta(META_KEYS.PERSIST_ASKED, JSON.stringify({ at: isoTime(store.clock.now()), granted }));
    return granted ? 'granted' : 'denied';
  } catch {
    return 'unsupported';
  }
}
