/**
 * One seeded pseudo-random generator for everything that needs reproducible noise: the demo
 * history, API test rounds, benchmarks. Not used by the analysis itself (shared code stays free
 * of random numbers so the phone and the server agree); it is here because seed, tests and
 * benches on both sides import it.
 */

/**
 * mulberry32 (Tommy Ettinger's 32-bit generator, public domain): uniform in [0, 1), the same
 * sequence for the same seed on every JavaScript engine.
 */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
