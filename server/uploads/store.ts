/**
 * Where photo bytes live: one small interface, two drivers (local disk by default, S3-compatible
 * object storage through the AWS SDK). Keys are made by the server from photo ids
 * ("photos/<uuid>.jpg", "thumbs/<uuid>.jpg"), and every driver refuses a key that is not of the
 * safe shape, so nothing a client sends can point outside the store.
 */
import type { Readable } from 'node:stream';

export interface StoredObject {
  body: Readable;
  /** Size in bytes, when the store knows it. */
  bytes?: number;
  mime?: string;
}

export interface PhotoStore {
  /** Writes (or overwrites) the object. */
  put(key: string, bytes: Buffer, mime: string): Promise<void>;
  /** The object as a stream, or null when there is none. */
  get(key: string): Promise<StoredObject | null>;
  has(key: string): Promise<boolean>;
}

/** Path segments of lower-case letters, digits, "-", "_" and one "." before an extension; no "..", no leading "/". */
const SAFE_KEY = /^(?:[a-z0-9][a-z0-9_-]{0,63}\/){0,3}[a-z0-9][a-z0-9_-]{0,63}(?:\.[a-z0-9]{1,8})?$/;

export class UnsafeKeyError extends Error {
  constructor(key: string) {
    super(
      `photo store key ${JSON.stringify(key)} is not a safe key (segments of a–z, 0–9, "-", "_"; no "..", no leading "/")`,
    );
    this.name = 'UnsafeKeyError';
  }
}

export function assertSafeKey(key: string): void {
  if (typeof key !== 'string' || key.length > 200 || !SAFE_KEY.test(key)) throw new UnsafeKeyError(String(key));
}

export const photoKey = (id: string, ext: string) => `photos/${id}.${ext}`;
export const thumbKey = (id: string) => `thumbs/${id}.jpg`;
