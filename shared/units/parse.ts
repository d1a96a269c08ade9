/**
 * Reading what a technician types: "12 bar(g)", "-0.6 barg", "680 mmHg vac", "250 °C", "45 t/h",
 * "101 325 Pa", "1.2e5 Pa". Case is ignored where no two units differ by it ("kpa", "PSIG").
 */

import {
  lookupUnit,
  QUANTITY_NAMES,
  UNITS_BY_QUANTITY,
  type PressureRef,
  type Quantity,
  type Unit,
  type UnitInfo,
} from './definitions';
import { quote, UnitError } from './errors';

export interface ParsedUnit {
  unit: Unit;
  quantity: Quantity;
  /** Present only when the text names one ("bar(g)", "psia", "kPa vac"). */
  reference?: PressureRef;
}

export interface ParsedQuantity extends ParsedUnit {
  value: number;
}

const REFERENCE_WORDS: Readonly<Record<string, PressureRef>> = {
  a: 'absolute',
  abs: 'absolute',
  absolute: 'absolute',
  g: 'gauge',
  gauge: 'gauge',
  gage: 'gauge',
  vac: 'vacuum',
  vacuum: 'vacuum',
};

const WORDS = Object.keys(REFERENCE_WORDS).join('|');
/** "bar(g)", "kPa (vac)", "psi(abs)" */
const IN_PARENS = new RegExp(`^(.*?)\\s*\\(\\s*(${WORDS})\\s*\\)$`, 'i');
/** "bar g", "kPa vacuum", "mmHg vac", "MPa abs" */
const AS_WORD = new RegExp(`^(.*?)\\s+(${WORDS})$`, 'i');
/** "barg", "bara", "psig", "psia", "kPag" */
const GLUED = /^(.*?)([ga])$/i;

/**
 * Splits a unit text with a pressure reference ("bar(g)") into its unit and reference; undefined
 * when the text has no reference suffix or what is left is not a known unit.
 */
export function splitReference(text: string): { unit: UnitInfo; reference: PressureRef } | undefined {
  for (const pattern of [IN_PARENS, AS_WORD, GLUED]) {
    const m = pattern.exec(text.trim());
    if (!m) continue;
    const unit = lookupUnit(m[1]);
    if (unit) return { unit, reference: REFERENCE_WORDS[m[2].toLowerCase()] };
  }
  return undefined;
}

const ALL_UNITS: readonly string[] = Object.values(UNITS_BY_QUANTITY).flat();

/** A unit text, with an optional pressure reference: "bar(g)", "psia", "kPa vac", "°C", "t/h". */
export function parseUnit(text: string): ParsedUnit {
  if (typeof text !== 'string' || text.trim() === '') {
    throw new UnitError(`unit is empty; allowed: ${ALL_UNITS.join(', ')}`, {
      code: 'empty',
      input: typeof text === 'string' ? text : String(text),
      allowed: ALL_UNITS,
    });
  }
  const plain = lookupUnit(text);
  if (plain) return { unit: plain.unit, quantity: plain.quantity };
  const split = splitReference(text);
  if (split) {
    if (split.unit.quantity !== 'pressure') {
      throw new UnitError(
        `unit ${quote(text)}: ${QUANTITY_NAMES[split.unit.quantity]} takes no pressure reference (${split.reference})`,
        { code: 'badReference', input: text, quantity: split.unit.quantity, unit: split.unit.unit },
      );
    }
    return { unit: split.unit.unit, quantity: 'pressure', reference: split.reference };
  }
  throw new UnitError(
    `unknown unit ${quote(text)}; allowed: ${ALL_UNITS.join(', ')} ` +
      `(pressures with (a), (g) or vac, e.g. "bar(g)", "psia", "kPa vac")`,
    { code: 'unknownUnit', input: text, allowed: ALL_UNITS },
  );
}

/**
 * A number: optional sign (also the minus sign U+2212), digits grouped in threes by spaces or thin
 * spaces allowed ("101 325", SP 811 §10.5.3), decimal point, optional exponent.
 */
const NUMBER = /^[+\-\u2212]?(?:(?:\d{1,3}(?:[ \u00a0\u2009\u202f]\d{3})+|\d+)(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?/;
const NOT_FINITE = /^[+\-\u2212]?(?:nan|inf(?:inity)?)\b/i;

/**
 * The number a text starts with, and the rest of the text (trimmed): "12 bar(g)" → 12, "bar(g)".
 * Refuses empty text, NaN/Infinity, text not starting with a number, and decimal commas.
 */
export function parseLeadingNumber(text: string, quantity?: Quantity): { value: number; rest: string } {
  if (typeof text !== 'string' || text.trim() === '') {
    throw new UnitError(`empty input; expected a number and a unit, e.g. "12 bar(g)"`, {
      code: 'empty',
      input: typeof text === 'string' ? text : String(text),
      quantity,
    });
  }
  const s = text.trim();
  if (NOT_FINITE.test(s)) {
    throw new UnitError(`${quote(text)} is not a finite number`, { code: 'notFinite', input: text, quantity });
  }
  const m = NUMBER.exec(s);
  if (!m) {
    throw new UnitError(`${quote(text)} does not start with a number; expected e.g. "12 bar(g)"`, {
      code: 'badNumber',
      input: text,
      quantity,
    });
  }
  const rest = s.slice(m[0].length);
  if (/^,\d/.test(rest)) {
    throw new UnitError(`${quote(text)} uses a decimal comma; write a decimal point, e.g. "12.5"`, {
      code: 'badNumber',
      input: text,
      quantity,
    });
  }
  const value = Number(m[0].replace(/[ \u00a0\u2009\u202f]/g, '').replace('\u2212', '-'));
  if (!Number.isFinite(value)) {
    throw new UnitError(`${quote(text)} is not a finite number`, { code: 'notFinite', input: text, quantity });
  }
  return { value, rest: rest.trim() };
}

/**
 * A value with its unit, as typed: "12 bar(g)" → { value: 12, unit: 'bar', reference: 'gauge',
 * quantity: 'pressure' }. With `expect`, a unit of another quantity is refused. The result can be
 * passed straight to toSI (a pressure with no reference in the text is refused there).
 */
export function parseQuantity(text: string, options: { expect?: Quantity } = {}): ParsedQuantity {
  const { value, rest } = parseLeadingNumber(text, options.expect);
  const allowed = options.expect ? UNITS_BY_QUANTITY[options.expect] : ALL_UNITS;
  const unitText = rest;
  if (unitText === '') {
    throw new UnitError(`${quote(text)} has no unit; allowed: ${allowed.join(', ')}`, {
      code: 'unknownUnit',
      input: text,
      quantity: options.expect,
      allowed,
    });
  }
  let parsed: ParsedUnit;
  try {
    parsed = parseUnit(unitText);
  } catch (e) {
    if (!(e instanceof UnitError)) throw e;
    const message =
      options.expect && e.code === 'unknownUnit'
        ? `unknown ${QUANTITY_NAMES[options.expect]} unit ${quote(unitText)}; allowed: ${allowed.join(', ')}` +
          (options.expect === 'pressure' ? ` with (a), (g) or vac, e.g. "bar(g)", "psia", "kPa vac"` : '')
        : e.message;
    throw new UnitError(`in ${quote(text)}: ${message}`, {
      code: e.code,
      input: text,
      quantity: e.quantity ?? options.expect,
      unit: unitText,
      allowed: options.expect && e.code === 'unknownUnit' ? allowed : e.allowed,
    });
  }
  if (options.expect && parsed.quantity !== options.expect) {
    throw new UnitError(
      `in ${quote(text)}: ${quote(unitText)} is a ${QUANTITY_NAMES[parsed.quantity]} unit, not a ${QUANTITY_NAMES[options.expect]} unit; ` +
        `allowed: ${allowed.join(', ')}`,
      { code: 'wrongQuantity', input: text, quantity: options.expect, unit: parsed.unit, allowed },
    );
  }
  return { value, ...parsed };
}
