/**
 * Axis ticks of a time trend: value ticks at a 1-2-5 step (common practice for chart axes) with at
 * least a given count, and date ticks at whole hours or UTC days with at least a given count where
 * the span allows. Pure.
 */

/** Ticks on [min, max] at the largest 1-2-5 step that gives at least `atLeast` of them. */
export function valueTicks(min: number, max: number, atLeast = 5): number[] {
  const span = max - min;
  if (!(span > 0) || !Number.isFinite(span)) return [min];
  let mag = 10 ** Math.ceil(Math.log10(span));
  for (let guard = 0; guard < 40; guard++) {
    for (const m of [5, 2, 1]) {
      const step = m * mag;
      const first = Math.ceil(min / step - 1e-9);
      const last = Math.floor(max / step + 1e-9);
      if (last - first + 1 >= atLeast) {
        const out: number[] = [];
        for (let k = first; k <= last; k++) out.push(Number((k * step).toPrecision(12)));
        return out;
      }
    }
    mag /= 10;
  }
  return [min, max];
}

/** Decimal places that show every tick of a 1-2-5 series distinctly. */
export function tickDecimals(ticks: readonly number[]): number {
  if (ticks.length < 2) return 0;
  const step = Math.abs(ticks[1] - ticks[0]);
  return Math.max(0, Math.ceil(-Math.log10(step) - 1e-9));
}

const HOUR = 3_600_000;
const DAY = 24 * HOUR;
const STEPS = [1, 2, 3, 6, 12].map((h) => h * HOUR).concat([1, 2, 3, 7, 14, 28, 56, 91].map((d) => d * DAY));

/**
 * Times (ms) of the date ticks on [t0, t1]: the largest step of whole hours or days (aligned to
 * UTC midnight) that gives at least `atLeast` ticks; when even hourly ticks give fewer, the ends.
 */
export function dateTicks(t0: number, t1: number, atLeast = 4): { ticks: number[]; stepMs: number } {
  if (!(t1 > t0)) return { ticks: [t0], stepMs: 0 };
  for (const step of [...STEPS].reverse()) {
    const first = Math.ceil(t0 / step) * step;
    const out: number[] = [];
    for (let t = first; t <= t1; t += step) out.push(t);
    if (out.length >= atLeast) return { ticks: out, stepMs: step };
  }
  return { ticks: [t0, t1], stepMs: t1 - t0 };
}

/** A date tick's label: "12-04" for day steps (ISO month-day, UTC), "12-04 06:00" or "06:00" below a day. */
export function dateTickLabel(t: number, stepMs: number, first: boolean): string {
  const iso = new Date(t).toISOString();
  if (stepMs >= DAY) return iso.slice(5, 10);
  return first || iso.slice(11, 16) === '00:00' ? `${iso.slice(5, 10)} ${iso.slice(11, 16)}` : iso.slice(11, 16);
}
