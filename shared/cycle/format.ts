/**
 * Numbers in findings' messages, in the unit on the instrument's face: "231.4 °C ± 1.6 K",
 * "4.37 bar(g)", "8.95 kPa vac". Pure.
 */
import { fromSI, fromSIDelta, unitLabel, type PressureRef, type Quantity, type Unit } from '../units';

export interface Shown {
  quantity: Quantity;
  unit: Unit;
  reference?: PressureRef;
}

/** Digits after the point so that a spread of `spread` (display units) shows one or two significant figures. */
export function digitsFor(spread: number): number {
  if (!(spread > 0) || !Number.isFinite(spread)) return 2;
  return Math.min(4, Math.max(0, 1 - Math.floor(Math.log10(spread))));
}

function fixed(x: number, digits: number): string {
  let t = x.toFixed(digits);
  if (/^-0(\.0*)?$/.test(t)) t = t.slice(1);
  return t;
}

/** The unit of a difference: a temperature difference is in K whatever the scale. */
export function deltaUnit(s: Shown): string {
  if (s.quantity === 'temperature') return 'K';
  return s.unit;
}

function toDeltaDisplay(s: Shown, deltaSI: number): number {
  if (s.quantity === 'temperature') return deltaSI;
  return fromSIDelta(s.quantity, deltaSI, s.unit);
}

/** A value (SI absolute) as the instrument shows it; falls back to SI when the conversion refuses it. */
export function showValue(s: Shown, si: number, barometricPa: number, spreadSI: number): string {
  const spread = Math.abs(toDeltaDisplay(s, spreadSI));
  const d = digitsFor(spread);
  try {
    const v = fromSI(s.quantity, si, s.unit, s.reference, { barometricPa });
    return `${fixed(v, d)} ${unitLabel(s.unit, s.reference)}`;
  } catch {
    return `${String(Number(si.toPrecision(6)))} ${s.quantity === 'pressure' ? 'Pa' : s.quantity === 'temperature' ? 'K' : s.quantity === 'massFlow' ? 'kg/s' : s.quantity === 'power' ? 'W' : ''}`.trim();
  }
}

/** A difference (SI) in the instrument's unit: "6.2 K", "1.01 bar". */
export function showDelta(s: Shown, deltaSI: number, spreadSI?: number): string {
  const v = toDeltaDisplay(s, deltaSI);
  const spread = spreadSI === undefined ? Math.abs(v) / 10 : Math.abs(toDeltaDisplay(s, spreadSI));
  return `${fixed(v, digitsFor(spread))} ${deltaUnit(s)}`;
}

/** "231.4 °C ± 1.6 K" */
export function showWithSpread(s: Shown, si: number, spreadSI: number, barometricPa: number): string {
  return `${showValue(s, si, barometricPa, spreadSI)} ± ${showDelta(s, spreadSI, spreadSI)}`;
}

/** Pa shown as kPa (barometric pressure in messages). */
export function showKPa(pa: number): string {
  return `${fixed(pa / 1000, 1)} kPa`;
}

/** A plain SI number with its unit, 4 significant figures: "3.21 MW", "12.4 kg/s". */
export function showSI(x: number, unit: 'kg/s' | 'W' | 'J/kg' | 'K'): string {
  if (unit === 'W') {
    const a = Math.abs(x);
    if (a >= 1e6) return `${Number((x / 1e6).toPrecision(4))} MW`;
    if (a >= 1e3) return `${Number((x / 1e3).toPrecision(4))} kW`;
    return `${Number(x.toPrecision(4))} W`;
  }
  if (unit === 'J/kg') return `${Number((x / 1e3).toPrecision(5))} kJ/kg`;
  return `${Number(x.toPrecision(4))} ${unit}`;
}
