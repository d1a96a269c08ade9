/**
 * Where the offline core gets ids and time. The app passes expo-crypto's `randomUUID` and
 * `Date.now`; tests pass deterministic ones.
 */
export interface Clock {
  /** Milliseconds since the Unix epoch (device time: recorded as data, never used to order). */
  now(): number;
}

export interface IdSource {
  /** A new UUID (version 4, RFC 9562 §5.4). */
  uuid(): string;
}

export const UUID_PATTERN = /^[0-9a-f]{8}-[0-9a-f]{4}-[1-8][0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/i;

/**
 * Formats 16 bytes as a version-4 UUID: sets the version nibble (byte 6 high nibble = 0100) and
 * the variant bits (byte 8 top bits = 10), RFC 9562 §4.1–4.2 and §5.4.
 */
export function uuidV4FromBytes(bytes: Uint8Array): string {
  if (bytes.length !== 16) throw new RangeError(`a UUID needs 16 bytes, got ${bytes.length}`);
  const b = Uint8Array.from(bytes);
  b[6] = (b[6] & 0x0f) | 0x40;
  b[8] = (b[8] & 0x3f) | 0x80;
  const h = Array.from(b, (x) => x.toString(16).padStart(2, '0')).join('');
  return `${h.slice(0, 8)}-${h.slice(8, 12)}-${h.slice(12, 16)}-${h.slice(16, 20)}-${h.slice(20)}`;
}

export const systemClock: Clock = { now: () => Date.now() };

/** An ISO 8601 UTC timestamp of a clock reading. */
export function isoTime(ms: number): string {
  return new Date(ms).toISOString();
}
