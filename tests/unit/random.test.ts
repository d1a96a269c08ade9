/**
 * The seeded generator (shared/random.ts). Reference sequence: mulberry32 as published by Tommy
 * Ettinger (public domain; the reference C in his gist, `z = (x += 0x6D2B79F5UL); z = (z ^ (z >> 15))
 * * (z | 1UL); z ^= z + (z ^ (z >> 7)) * (z | 61UL); return z ^ (z >> 14);`), evaluated here with
 * Python's integers modulo 2^32 (/usr/bin/python3), independent of the JavaScript under test.
 */
import { execFileSync } from 'node:child_process';
import { mulberry32 } from '@/shared/random';

const reference = (seed: number, n: number): number[] =>
  JSON.parse(
    execFileSync(
      '/usr/bin/python3',
      [
        '-c',
        `import json
M=0xFFFFFFFF
x=${seed}&M
out=[]
for _ in range(${n}):
    x=(x+0x6D2B79F5)&M
    z=x
    z=((z^(z>>15))*(z|1))&M
    z=(z^((z+((z^(z>>7))*(z|61)))&M))&M
    out.append((z^(z>>14))/4294967296)
print(json.dumps(out))`,
      ],
      { encoding: 'utf8' },
    ),
  );

describe('mulberry32', () => {
  test.each([0, 1, 7, 20251204, 0xffffffff])('seed %d gives the reference sequence', (seed) => {
    const r = mulberry32(seed);
    const got = Array.from({ length: 50 }, () => r());
    expect(got).toEqual(reference(seed, 50));
  });

  test('stays in [0, 1) and two generators of one seed agree', () => {
    const a = mulberry32(42);
    const b = mulberry32(42);
    for (let i = 0; i < 10_000; i++) {
      const x = a();
      expect(x).toBeGreaterThanOrEqual(0);
      expect(x).toBeLessThan(1);
      expect(b()).toBe(x);
    }
  });
});
