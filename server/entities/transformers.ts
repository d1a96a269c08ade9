import type { ValueTransformer } from 'typeorm';

/**
 * pg returns bigint and numeric as strings (they may not fit a JS number). The values kept in
 * them here do: sequence numbers (< 2^53 for centuries), clock skews in ms, typed readings.
 */
export const numberFromText: ValueTransformer = {
  to: (v: number | null | undefined) => v,
  from: (v: string | number | null) => (v === null || v === undefined ? v : Number(v)),
};
