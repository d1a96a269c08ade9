/**
 * The one error type of the units module. Every refusal names what was given and what is allowed,
 * so a screen or a command line can show the message as it is and a program can branch on `code`.
 */

export type UnitErrorCode =
  /** An empty string, or no number where one was expected. */
  | 'empty'
  /** Text that is not a number (or uses a decimal comma). */
  | 'badNumber'
  /** NaN, Infinity or -Infinity. */
  | 'notFinite'
  /** A unit this module does not know. */
  | 'unknownUnit'
  /** A known unit of another quantity (°C given for a pressure). */
  | 'wrongQuantity'
  /** A pressure without `absolute | gauge | vacuum`. */
  | 'missingReference'
  /** A pressure reference given to a quantity that has none, or not one of the three. */
  | 'badReference'
  /** Gauge or vacuum pressure with no barometric pressure to refer it to. */
  | 'missingBarometric'
  /** A barometric pressure that is not a plausible absolute air pressure. */
  | 'badBarometric'
  /** Absolute pressure ≤ 0 Pa or temperature ≤ 0 K after conversion. */
  | 'nonPositiveAbsolute'
  /** A value outside the range a formula is valid for (elevation above the troposphere…). */
  | 'outOfRange'
  /** Two units of one quantity that cannot be turned into each other (level % and mm). */
  | 'incompatibleUnits';

export interface UnitErrorDetails {
  code: UnitErrorCode;
  /** What was given, as given (text, number or unit). */
  input: string | number;
  quantity?: string;
  unit?: string;
  /** What would have been accepted (unit names, references, a range written out). */
  allowed?: readonly string[];
}

export class UnitError extends Error {
  readonly code: UnitErrorCode;
  readonly input: string | number;
  readonly quantity?: string;
  readonly unit?: string;
  readonly allowed?: readonly string[];

  constructor(message: string, details: UnitErrorDetails) {
    super(message);
    this.name = 'UnitError';
    this.code = details.code;
    this.input = details.input;
    this.quantity = details.quantity;
    this.unit = details.unit;
    this.allowed = details.allowed;
  }
}

/** `"…"` around text so empty strings and stray spaces show in messages. */
export function quote(input: string | number): string {
  return typeof input === 'number' ? String(input) : JSON.stringify(input);
}
