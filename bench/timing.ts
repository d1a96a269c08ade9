/**
 * Median ms per call of `a` and `b`, measured interleaved so that machine load hits both alike.
 * `warmup` calls of each first; then at least `minReps` pairs and at least `minMs` of wall time.
 */
export function timePair(
  a: () => unknown,
  b: () => unknown,
  opts: { minMs?: number; minReps?: number; warmup?: number } = {},
): { a: number; b: number; reps: number } {
  const { minMs = 1500, minReps = 15, warmup = 20 } = opts;
  for (let i = 0; i < warmup; i++) {
    a();
    b();
  }
  const sa: number[] = [];
  const sb: number[] = [];
  const start = performance.now();
  while (sa.length < minReps || performance.now() - start < minMs) {
    let t0 = performance.now();
    a();
    sa.push(performance.now() - t0);
    t0 = performance.now();
    b();
    sb.push(performance.now() - t0);
  }
  const med = (x: number[]) => x.sort((p, q) => p - q)[Math.floor(x.length / 2)];
  return { a: med(sa), b: med(sb), reps: sa.length };
}
