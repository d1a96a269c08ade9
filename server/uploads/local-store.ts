/**
 * Photo store on local disk (the default): `<root>/<key>`. Writes go to a temporary file first
 * and are renamed into place, so a reader never sees half a photo.
 */
import { createReadStream } from 'node:fs';
import { mkdir, rename, stat, unlink, writeFile } from 'node:fs/promises';
import { randomBytes } from 'node:crypto';
import path from 'node:path';
import { assertSafeKey, UnsafeKeyError, type PhotoStore, type StoredObject } from './store';

export class LocalPhotoStore implements PhotoStore {
  readonly root: string;

  constructor(root: string) {
    this.root = path.resolve(root);
  }

  /** The file of a key, checked twice: the key's shape, and that the path stays under the root. */
  pathOf(key: string): string {
    assertSafeKey(key);
    const p = path.resolve(this.root, key);
    if (!p.startsWith(this.root + path.sep)) throw new UnsafeKeyError(key);
    return p;
  }

  async put(key: string, bytes: Buffer, _mime: string): Promise<void> {
    const file = this.pathOf(key);
    await mkdir(path.dirname(file), { recursive: true });
    const tmp = `${file}.${randomBytes(6).toString('hex')}.tmp`;
    try {
      await writeFile(tmp, bytes);
      await rename(tmp, file);
    } catch (e) {
      // a full disk leaves a torn temporary file behind: remove it (best effort)
      await unlink(tmp).catch(() => undefined);
      throw e;
    }
  }

  async get(key: string): Promise<StoredObject | null> {
    const file = this.pathOf(key);
    try {
      const s = await stat(file);
      if (!s.isFile()) return null;
      return { body: createReadStream(file), bytes: s.size };
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code === 'ENOENT') return null;
      throw e;
    }
  }

  async has(key: string): Promise<boolean> {
    const file = this.pathOf(key);
    try {
      return (await stat(file)).isFile();
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code === 'ENOENT') return false;
      throw e;
    }
  }
}
