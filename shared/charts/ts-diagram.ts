/**
 * The temperature–entropy diagram of water: the saturation dome from IAPWS-IF97 and the scales
 * that place state points on it. Pure; the app draws it with react-native-svg.
 */
import { P_CRIT, T_CRIT, psat, px, tsat } from '../steam';

export interface DomePoint {
  /** K */
  T: number;
  /** J/(kg·K) */
  s: number;
}

/**
 * The saturation dome as one closed line: the saturated-liquid side from the triple point up to
 * the critical point, then the saturated-vapour side back down. Points are spaced evenly in
 * pressure on a log scale, and closer near the critical point where the dome turns.
 */
export function saturationDome(n = 60): DomePoint[] {
  const pLow = psat(273.16);
  const liquid: DomePoint[] = [];
  const vapour: DomePoint[] = [];
  for (let i = 0; i <= n; i++) {
    // u runs 0 → 1; the square root bunches points toward the critical end.
    const u = Math.sqrt(i / n);
    const p = Math.min(Math.exp(Math.log(pLow) + u * (Math.log(P_CRIT) - Math.log(pLow))), P_CRIT * (1 - 1e-6));
    const f = px(p, 0);
    const g = px(p, 1);
    liquid.push({ T: f.T, s: f.s });
    vapour.push({ T: g.T, s: g.s });
  }
  const top = px(P_CRIT * (1 - 1e-6), 0);
  return [...liquid, { T: T_CRIT, s: (top.s + px(P_CRIT * (1 - 1e-6), 1).s) / 2 }, ...vapour.reverse()];
}

/** An isobar across the dome between two entropies (for drawing a condenser or a boiler). */
export function isobarInDome(p: number): { T: number; sF: number; sG: number } {
  const T = tsat(p);
  return { T, sF: px(p, 0).s, sG: px(p, 1).s };
}

export interface Scale {
  min: number;
  max: number;
  /** Pixel at min and at max. */
  from: number;
  to: number;
}

/** A value's pixel on a linear scale (the scale's `from` when the scale has no span). */
export const project = (v: number, s: Scale): number =>
  s.max === s.min ? s.from : s.from + ((v - s.min) / (s.max - s.min)) * (s.to - s.from);

/** "Nice" tick values (1, 2, 5 × 10ⁿ steps) between min and max. */
export function ticks(min: number, max: number, count = 6): number[] {
  const span = max - min;
  if (!(span > 0)) return [min];
  const raw = span / count;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * mag).find((st) => st >= raw)!;
  const out: number[] = [];
  for (let v = Math.ceil(min / step) * step; v <= max + step * 1e-9; v += step) out.push(Number(v.toPrecision(12)));
  return out;
}
