/** Showing SI values in the unit a screen or a report asks for: "12.00 bar(g)", "250.0 °C". */

import { fromSI, resolveUnit, type SiteContext } from './convert';
import type { PressureRef, Quantity, Unit } from './definitions';
import { quote, UnitError } from './errors';

/**
 * The unit as shown, with its pressure reference: bar(a), bar(g), kPa vac; psi follows the trade's
 * own psia / psig. Without a reference, the unit alone. parseUnit reads every label back.
 */
export function unitLabel(unit: Unit, reference?: PressureRef): string {
  if (reference === undefined) return unit;
  if (unit === 'psi' && reference !== 'vacuum') return reference === 'gauge' ? 'psig' : 'psia';
  switch (reference) {
    case 'absolute':
      return `${unit}(a)`;
    case 'gauge':
      return `${unit}(g)`;
    case 'vacuum':
      return `${unit} vac`;
  }
  throw new UnitError(`pressure reference ${quote(String(reference))} is not one of absolute, gauge, vacuum`, {
    code: 'badReference',
    input: String(reference),
    allowed: ['absolute', 'gauge', 'vacuum'],
  });
}

export interface FormatOptions extends SiteContext {
  /** Digits after the decimal point (0–12); 2 unless given. */
  digits?: number;
}

/** An SI value shown in `unit` (and reference): formatValue(1.3e6, 'pressure', 'bar', 'gauge', …) → "11.99 bar(g)". */
export function formatValue(
  si: number,
  quantity: Quantity,
  unit: Unit,
  reference?: PressureRef,
  options: FormatOptions = {},
): string {
  const digits = options.digits ?? 2;
  if (!Number.isInteger(digits) || digits < 0 || digits > 12) {
    throw new UnitError(`digits must be a whole number from 0 to 12, got ${String(digits)}`, {
      code: 'outOfRange',
      input: typeof digits === 'number' ? digits : String(digits),
      allowed: ['0 to 12'],
    });
  }
  const u = resolveUnit(quantity, unit);
  const value = fromSI(quantity, si, u.unit, reference, options);
  let text = value.toFixed(digits);
  // "-0.00" says nothing a reader can use; show the rounded zero unsigned.
  if (/^-0(\.0*)?$/.test(text)) text = text.slice(1);
  return `${text} ${unitLabel(u.unit, reference)}`;
}
