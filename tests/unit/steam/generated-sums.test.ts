/**
 * shared/steam/sums.generated.ts against its sources: the file must be what scripts/steam-sums.ts
 * writes from today's coefficient tables (a table changed without `npm run steam:sums` fails
 * here), and every generated function must give what the generic evaluator PowerSum gives on the
 * same table (power-sum.ts; it and the tables are held to the IF97 and SR3 verification tables in
 * if97-tables.test.ts and supplementary-tables.test.ts). The tolerance is round-off: 1e-14 of the
 * sum of the terms' magnitudes (summation order differs between the two).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { PowerSum, type Term } from '@/shared/steam/power-sum';
import * as generated from '@/shared/steam/sums.generated';
import { SUMS, generate } from '@/scripts/steam-sums';

type DerivsFn = (x: number, y: number, out: Float64Array) => void;
type DerivsYFn = (y: number, out: Float64Array) => void;
type ValueFn = (x: number, y: number) => number;

/** Σ |n x^I y^J| · |weight(I, J)| over the rows: the scale of the round-off of one sum. */
function magnitude(rows: readonly Term[], x: number, y: number, weight: (I: number, J: number) => number): number {
  let m = 0;
  for (const r of rows) m += Math.abs(r.n * weight(r.I, r.J) * x ** r.I * y ** r.J);
  return m;
}

/** Points inside the unit square shifted to [0.6, 1.9]: the reduced variables' usual size. */
const POINTS: readonly (readonly [number, number])[] = [
  [0.6, 0.75],
  [0.93, 1.41],
  [1.27, 0.62],
  [1.9, 1.9],
  [0.71, 1.66],
];

describe('generated IF97 power sums', () => {
  it('sums.generated.ts is what scripts/steam-sums.ts writes from the current tables', () => {
    const file = readFileSync(join(__dirname, '..', '..', '..', 'shared', 'steam', 'sums.generated.ts'), 'utf8');
    expect(file === generate()).toBe(true);
  });

  for (const spec of SUMS) {
    it(`${spec.name} equals PowerSum on the same table (${spec.doc})`, () => {
      const iScale = spec.iScale ?? 1;
      const ref = new PowerSum(spec.rows, iScale);
      const rows = spec.rows.map((r) => ({ ...r, I: r.I * iScale }));
      const fn = (generated as Record<string, unknown>)[spec.name];
      expect(typeof fn).toBe('function');
      const bad: string[] = [];
      const check = (label: string, got: number, want: number, scale: number) => {
        if (!(Math.abs(got - want) <= 1e-14 * scale)) bad.push(`${label}: ${got} vs ${want} (scale ${scale})`);
      };
      for (const [x0, y] of POINTS) {
        const x = spec.kind === 'derivsY' ? 1 : x0;
        if (spec.kind === 'value') {
          check(
            `(${x}, ${y})`,
            (fn as ValueFn)(x, y),
            ref.value(x, y),
            magnitude(rows, x, y, () => 1),
          );
          continue;
        }
        const want = new Float64Array(6);
        const got = new Float64Array(6);
        ref.derivs(x, y, want);
        if (spec.kind === 'derivs') (fn as DerivsFn)(x, y, got);
        else (fn as DerivsYFn)(y, got);
        const weights: ((I: number, J: number) => number)[] = [
          () => 1,
          (I) => I / x,
          (I) => (I * (I - 1)) / (x * x),
          (_, J) => J / y,
          (_, J) => (J * (J - 1)) / (y * y),
          (I, J) => (I * J) / (x * y),
        ];
        const which = spec.kind === 'derivs' ? [0, 1, 2, 3, 4, 5] : [0, 3, 4];
        for (const k of which) check(`(${x}, ${y}) [${k}]`, got[k], want[k], magnitude(rows, x, y, weights[k]));
      }
      expect(bad).toEqual([]);
    });
  }
});
