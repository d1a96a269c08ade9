/**
 * The one error of the steam tables: an input outside IAPWS-IF97's range, not a finite number,
 * or inconsistent (a quality outside 0…1, a (p,h) or (p,s) pair that no region holds).
 */

/** Name of the offending input. */
export type SteamInput = 'p' | 'T' | 'h' | 's' | 'x';

/** Which side of the limit the value lies on; 'finite' for NaN and ±Infinity. */
export type SteamRangeSide = 'below' | 'above' | 'finite';

export class SteamRangeError extends RangeError {
  /** the input that is out of range */
  readonly input: SteamInput;
  /** its value in SI base units (Pa, K, J/kg, J/(kg·K), –) */
  readonly value: number;
  /** the limit it crosses, in the same unit; null when the value is not a finite number */
  readonly limit: number | null;
  readonly side: SteamRangeSide;

  constructor(input: SteamInput, value: number, limit: number | null, side: SteamRangeSide, message: string) {
    super(message);
    this.name = 'SteamRangeError';
    this.input = input;
    this.value = value;
    this.limit = limit;
    this.side = side;
    Object.setPrototypeOf(this, SteamRangeError.prototype);
  }
}

function trimNumber(x: number, digits: number): string {
  if (x === 0) return '0';
  return Number(x.toPrecision(Math.min(digits, 17))).toString();
}

/** A value in the unit a person reads for that input: MPa/kPa/Pa, K, kJ/kg, kJ/(kg·K). */
export function formatQuantity(input: SteamInput, value: number, digits = 6): string {
  if (!Number.isFinite(value)) return String(value);
  switch (input) {
    case 'p': {
      const a = Math.abs(value);
      if (a >= 1e6) return `${trimNumber(value / 1e6, digits)} MPa`;
      if (a >= 1e3) return `${trimNumber(value / 1e3, digits)} kPa`;
      return `${trimNumber(value, digits)} Pa`;
    }
    case 'T':
      return `${trimNumber(value, digits)} K`;
    case 'h':
      return `${trimNumber(value / 1e3, digits)} kJ/kg`;
    case 's':
      return `${trimNumber(value / 1e3, digits)} kJ/(kg·K)`;
    case 'x':
      return trimNumber(value, digits);
  }
}

/** Throws when value is NaN or infinite. */
export function requireFinite(input: SteamInput, value: number): void {
  if (!Number.isFinite(value)) {
    throw new SteamRangeError(input, value, null, 'finite', `${input} = ${String(value)} is not a finite number`);
  }
}

/**
 * Builds the error for a value beyond a limit, e.g. "p = 120 MPa is above the IF97 limit of
 * 100 MPa". `what` replaces "the IF97 limit" where a more specific name helps; `context` is
 * appended (e.g. "at p = 60 MPa").
 */
export function rangeError(
  input: SteamInput,
  value: number,
  limit: number,
  side: 'below' | 'above',
  what = 'the IF97 limit',
  context = '',
): SteamRangeError {
  const tail = context ? ` ${context}` : '';
  // print enough digits that value and limit read differently (100.0000001 MPa vs 100 MPa)
  let digits = 6;
  let v = formatQuantity(input, value, digits);
  let l = formatQuantity(input, limit, digits);
  while (v === l && digits < 17) {
    digits += 2;
    v = formatQuantity(input, value, digits);
    l = formatQuantity(input, limit, digits);
  }
  return new SteamRangeError(input, value, limit, side, `${input} = ${v} is ${side} ${what} of ${l}${tail}`);
}
