import type { ValueTransformer } from 'typeorm';

/**
 * pg returns bigint and numeric as strings (they may not fit a JS number). The values kept in
 * them here do: sequence numbers (< 2^53 for centuries), clock skews in ms, typed readings.
 */
export const numberFromText: ValueTransformer = {
  to: (v: number | null | undefined) => v,
  from: (v: string | number | null) => (v === null || v === undefined ? v : Number(v)),
};

/** Default of every synced row's sync_version; the sync_stamp trigger overwrites it under a lock. */
export const SYNC_VERSION_DEFAULT = () => "nextval('sync_seq')";

/**
 * The sync_version column of a row that pull serves: stamped by the database (never written by
 * the app), read back as a number. Spread it into an EntitySchema's columns.
 */
export const syncVersionColumn = {
  name: 'sync_version',
  type: 'bigint',
  default: SYNC_VERSION_DEFAULT,
  insert: false,
  update: false,
  transformer: numberFromText,
} as const;
