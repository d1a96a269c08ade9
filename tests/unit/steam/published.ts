/**
 * Comparison with values printed in the IAPWS releases ("0.100215168e-2"): a computed value
 * matches when it rounds to the printed digits, i.e. lies within half a unit of the last printed
 * digit (plus 1e-13 relative for round-off in the last place).
 */
export function publishedUnit(printed: string): number {
  const m = /^-?(\d+)\.(\d+)(?:e([+-]?\d+))?$/.exec(printed.trim());
  if (!m) throw new Error(`not a printed number: ${printed}`);
  const [, int, frac] = m;
  const digits = (int.replace(/^0+/, '') + frac).replace(/^0+/, '').length;
  const value = Math.abs(Number(printed));
  const magnitude = Math.floor(Math.log10(value)) + 1;
  return 10 ** (magnitude - digits);
}

/** |actual − printed| ≤ ½ unit of the last printed digit (+1e-13 relative). */
export function matchesPublished(actual: number, printed: string): boolean {
  const v = Number(printed);
  return Math.abs(actual - v) <= 0.5 * publishedUnit(printed) + 1e-13 * Math.abs(v);
}

/** A readable failure line, or null when the value matches. */
export function mismatch(label: string, actual: number, printed: string): string | null {
  return matchesPublished(actual, printed) ? null : `${label}: computed ${actual}, published ${printed}`;
}
