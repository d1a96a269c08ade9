/** Shared helpers of the cycle tests (not a test file). */
import { execFileSync } from 'node:child_process';
import type { RoundReading } from '@/shared/cycle';

/** Runs a Python snippet with Debian's python3-iapws and parses its JSON output. */
export function python<T>(script: string): T {
  const out = execFileSync('/usr/bin/python3', ['-c', script], { encoding: 'utf8', timeout: 20000 });
  return JSON.parse(out) as T;
}

/** Paths of every number in a value that is not finite (NaN, ±Infinity). */
export function nonFinite(value: unknown, path = '$', out: string[] = []): string[] {
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) out.push(path);
  } else if (Array.isArray(value)) value.forEach((v, i) => nonFinite(v, `${path}[${i}]`, out));
  else if (value && typeof value === 'object')
    for (const [k, v] of Object.entries(value)) nonFinite(v, `${path}.${k}`, out);
  return out;
}

/** The readings with one instrument's value changed. */
export function withValue(readings: RoundReading[], tag: string, f: (v: number) => number): RoundReading[] {
  let hit = false;
  const out = readings.map((r) => {
    if (r.instrumentTag !== tag) return { instrumentTag: r.instrumentTag, valueSI: r.valueSI };
    hit = true;
    return { instrumentTag: r.instrumentTag, valueSI: f(r.valueSI) };
  });
  if (!hit) throw new Error(`no reading of ${tag}`);
  return out;
}

/** Plain readings (tag, value) without the display part. */
export function plain(readings: RoundReading[]): RoundReading[] {
  return readings.map((r) => ({ instrumentTag: r.instrumentTag, valueSI: r.valueSI }));
}

/** Deterministic pseudo-random numbers (Park–Miller), for reproducible noise. */
export function lcg(seed: number): () => number {
  let s = seed;
  return () => (s = (s * 16807) % 2147483647) / 2147483647;
}
