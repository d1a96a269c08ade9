/**
 * Conversion between the units a reading is typed in and the SI values every other module uses
 * (Pa absolute, K, kg/s, W; level as a fraction of span or in m).
 */

import { barometricFromElevation } from './atmosphere';
import {
  isPressureRef,
  isQuantity,
  lookupUnit,
  PRESSURE_REFERENCES,
  QUANTITIES,
  QUANTITY_NAMES,
  UNITS_BY_QUANTITY,
  type PressureRef,
  type Quantity,
  type Unit,
  type UnitInfo,
} from './definitions';
import { quote, UnitError } from './errors';
import { splitReference } from './parse';

/** A value as typed: number, unit (any accepted spelling) and, for a pressure, its reference. */
export interface Measure {
  quantity: Quantity;
  value: number;
  unit: Unit | string;
  reference?: PressureRef;
}

/**
 * What the site tells a gauge or vacuum pressure: the barometric pressure read on the round (Pa
 * absolute) or, failing that, the site's elevation (geometric m above sea level) for the ICAO
 * standard atmosphere. A reading wins over the elevation when both are given.
 */
export interface SiteContext {
  barometricPa?: number;
  elevationM?: number;
}

/**
 * Plausible barometric pressures, Pa absolute. Project choice: wide enough for any site from
 * −1000 m to 11 000 m in any weather, narrow enough to catch a reading typed in the wrong unit
 * (1013 kPa for 1013 hPa, 1.013 Pa for 1.013 bar).
 */
export const BAROMETRIC_MIN_PA = 20_000;
export const BAROMETRIC_MAX_PA = 120_000;

/** SI symbol of each quantity in messages (level is a fraction or metres, depending on its unit). */
const SI_SYMBOL: { readonly [Q in Quantity]: string } = {
  pressure: 'Pa',
  temperature: 'K',
  massFlow: 'kg/s',
  power: 'W',
  level: '(SI)',
};

/** Six significant figures, without trailing zeros: for numbers shown inside messages. */
export function fmt(x: number): string {
  return Number.isFinite(x) ? String(Number(x.toPrecision(6))) : String(x);
}

/**
 * The site's barometric pressure in Pa absolute, from a reading or from the elevation; undefined if
 * the context gives neither. A reading outside the plausible range is refused.
 */
export function siteBarometricPa(ctx: SiteContext = {}): number | undefined {
  if (ctx.barometricPa !== undefined) {
    const b = ctx.barometricPa;
    if (typeof b !== 'number' || !Number.isFinite(b)) {
      throw new UnitError(`barometric pressure must be a finite number of Pa, got ${String(b)}`, {
        code: 'notFinite',
        input: typeof b === 'number' ? b : String(b),
        quantity: 'pressure',
      });
    }
    if (b < BAROMETRIC_MIN_PA || b > BAROMETRIC_MAX_PA) {
      throw new UnitError(
        `barometric pressure ${fmt(b)} Pa is outside ${BAROMETRIC_MIN_PA} Pa to ${BAROMETRIC_MAX_PA} Pa; ` +
          `check its unit`,
        {
          code: 'badBarometric',
          input: b,
          quantity: 'pressure',
          unit: 'Pa',
          allowed: [`${BAROMETRIC_MIN_PA} Pa to ${BAROMETRIC_MAX_PA} Pa`],
        },
      );
    }
    return b;
  }
  if (ctx.elevationM !== undefined) return barometricFromElevation(ctx.elevationM);
  return undefined;
}

/** The unit's info, checked to be a known unit of `quantity`. */
export function resolveUnit(quantity: Quantity, unit: string): UnitInfo {
  if (!isQuantity(quantity)) {
    throw new UnitError(`unknown quantity ${quote(String(quantity))}; allowed: ${QUANTITIES.join(', ')}`, {
      code: 'wrongQuantity',
      input: String(quantity),
      allowed: QUANTITIES,
    });
  }
  const allowed = UNITS_BY_QUANTITY[quantity];
  if (typeof unit !== 'string' || unit.trim() === '') {
    throw new UnitError(`${QUANTITY_NAMES[quantity]} unit is empty; allowed: ${allowed.join(', ')}`, {
      code: 'empty',
      input: typeof unit === 'string' ? unit : String(unit),
      quantity,
      allowed,
    });
  }
  const found = lookupUnit(unit);
  if (!found) {
    const split = splitReference(unit);
    if (split) {
      throw new UnitError(
        `unit ${quote(unit)} carries a pressure reference; give unit ${quote(split.unit.unit)} ` +
          `with reference ${quote(split.reference)}`,
        { code: 'unknownUnit', input: unit, quantity, allowed },
      );
    }
    throw new UnitError(`unknown ${QUANTITY_NAMES[quantity]} unit ${quote(unit)}; allowed: ${allowed.join(', ')}`, {
      code: 'unknownUnit',
      input: unit,
      quantity,
      allowed,
    });
  }
  if (found.quantity !== quantity) {
    throw new UnitError(
      `${quote(unit)} is a ${QUANTITY_NAMES[found.quantity]} unit, not a ${QUANTITY_NAMES[quantity]} unit; allowed: ${allowed.join(', ')}`,
      { code: 'wrongQuantity', input: unit, quantity, unit: found.unit, allowed },
    );
  }
  return found;
}

function checkValue(value: number, what: string, quantity: Quantity, unit: string): void {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new UnitError(`${what} must be a finite number, got ${String(value)} (unit ${unit})`, {
      code: 'notFinite',
      input: typeof value === 'number' ? value : String(value),
      quantity,
      unit,
    });
  }
}

/**
 * A conversion result that overflowed double precision (1e305 MPa, 1e306 kg/h shown in kg/h…)
 * is refused rather than returned as ±Infinity.
 */
function finiteResult(result: number, input: string, quantity: Quantity, unit: string): number {
  if (!Number.isFinite(result)) {
    throw new UnitError(`${input} is too large to convert: the result ${String(result)} is not a finite number`, {
      code: 'outOfRange',
      input,
      quantity,
      unit,
      allowed: [`|value| up to ${fmt(Number.MAX_VALUE)} after conversion`],
    });
  }
  return result;
}

function checkReference(quantity: Quantity, reference: unknown, input: string): PressureRef | undefined {
  if (quantity !== 'pressure') {
    if (reference !== undefined) {
      throw new UnitError(
        `${QUANTITY_NAMES[quantity]} ${input} takes no pressure reference, got ${quote(String(reference))}`,
        {
          code: 'badReference',
          input: String(reference),
          quantity,
        },
      );
    }
    return undefined;
  }
  if (reference === undefined) {
    throw new UnitError(
      `pressure ${input} has no reference; say whether it is absolute, gauge or vacuum ` +
        `(e.g. "bar(a)", "bar(g)", "kPa vac")`,
      { code: 'missingReference', input, quantity, allowed: PRESSURE_REFERENCES },
    );
  }
  if (!isPressureRef(reference)) {
    throw new UnitError(
      `pressure reference ${quote(String(reference))} of ${input} is not one of ${PRESSURE_REFERENCES.join(', ')}`,
      { code: 'badReference', input: String(reference), quantity, allowed: PRESSURE_REFERENCES },
    );
  }
  return reference;
}

function needBarometric(ctx: SiteContext | undefined, reference: PressureRef, input: string): number {
  const b = siteBarometricPa(ctx);
  if (b === undefined) {
    throw new UnitError(
      `${input} is a ${reference} pressure and needs the site's barometric pressure ` +
        `(a barometer reading or the site elevation); none was given`,
      { code: 'missingBarometric', input, quantity: 'pressure' },
    );
  }
  return b;
}

function describe(value: number | string, unit: string, reference?: PressureRef): string {
  const ref =
    reference === 'gauge' ? ' gauge' : reference === 'vacuum' ? ' vacuum' : reference === 'absolute' ? ' absolute' : '';
  return `${value} ${unit}${ref}`;
}

/** A measure in SI: Pa absolute, K, kg/s, W; level as a fraction (from %) or m (from mm). */
export function toSI(measure: Measure, ctx?: SiteContext): number {
  const { quantity, value, unit } = measure;
  const u = resolveUnit(quantity, unit);
  checkValue(value, `${QUANTITY_NAMES[quantity]} value`, quantity, u.unit);
  const input = describe(value, u.unit, quantity === 'pressure' ? measure.reference : undefined);
  const reference = checkReference(quantity, measure.reference, input);
  const own = finiteResult((value + u.shift) * u.factor, input, quantity, u.unit);

  if (quantity === 'pressure') {
    if (reference === 'absolute') {
      if (!(own > 0)) {
        throw new UnitError(`absolute pressure ${input} is ${fmt(own)} Pa, not above 0 Pa`, {
          code: 'nonPositiveAbsolute',
          input,
          quantity,
          unit: u.unit,
        });
      }
      return own;
    }
    const b = needBarometric(ctx, reference!, input);
    const abs = reference === 'gauge' ? b + own : b - own;
    if (!(abs > 0)) {
      throw new UnitError(
        `${input} with barometric pressure ${fmt(b)} Pa gives absolute pressure ${fmt(abs)} Pa, ` +
          `not above 0 Pa` +
          (reference === 'vacuum' ? ` (a vacuum cannot exceed the barometric pressure)` : ''),
        { code: 'nonPositiveAbsolute', input, quantity, unit: u.unit },
      );
    }
    return finiteResult(abs, input, quantity, u.unit);
  }
  if (quantity === 'temperature' && !(own > 0)) {
    throw new UnitError(`temperature ${input} is ${fmt(own)} K, not above absolute zero`, {
      code: 'nonPositiveAbsolute',
      input,
      quantity,
      unit: u.unit,
    });
  }
  return own;
}

/** An SI value (Pa absolute, K, kg/s, W, fraction or m) in `unit`, with `reference` for pressure. */
export function fromSI(
  quantity: Quantity,
  si: number,
  unit: Unit | string,
  reference?: PressureRef,
  ctx?: SiteContext,
): number {
  const u = resolveUnit(quantity, unit);
  checkValue(si, `SI ${QUANTITY_NAMES[quantity]} value`, quantity, u.unit);
  const ref = checkReference(quantity, reference, `${fmt(si)} ${SI_SYMBOL[quantity]} shown in ${u.unit}`);
  if (quantity === 'pressure' && !(si > 0)) {
    throw new UnitError(`absolute pressure ${fmt(si)} Pa is not above 0 Pa`, {
      code: 'nonPositiveAbsolute',
      input: si,
      quantity,
      unit: 'Pa',
    });
  }
  if (quantity === 'temperature' && !(si > 0)) {
    throw new UnitError(`temperature ${fmt(si)} K is not above absolute zero`, {
      code: 'nonPositiveAbsolute',
      input: si,
      quantity,
      unit: 'K',
    });
  }
  let own = si;
  if (quantity === 'pressure' && ref !== 'absolute') {
    const b = needBarometric(ctx, ref!, `${fmt(si)} Pa shown as ${u.unit} ${ref}`);
    own = ref === 'gauge' ? si - b : b - si;
  }
  return finiteResult(
    own / u.factor - u.shift,
    `${fmt(si)} ${SI_SYMBOL[quantity]} shown in ${u.unit}`,
    quantity,
    u.unit,
  );
}

/**
 * A difference of two values in SI (Pa, K, kg/s, W…). Offsets cancel in a difference, so a
 * temperature interval converts by the factor alone: 9 °F of difference = 5 K, 5 °C = 5 K; a
 * pressure difference has no reference.
 */
export function toSIDelta(delta: { quantity: Quantity; value: number; unit: Unit | string }): number {
  const u = resolveUnit(delta.quantity, delta.unit);
  checkValue(delta.value, `${QUANTITY_NAMES[delta.quantity]} difference`, delta.quantity, u.unit);
  return finiteResult(
    delta.value * u.factor,
    `${QUANTITY_NAMES[delta.quantity]} difference ${delta.value} ${u.unit}`,
    delta.quantity,
    u.unit,
  );
}

/** An SI difference (Pa, K…) in `unit`; see toSIDelta. */
export function fromSIDelta(quantity: Quantity, si: number, unit: Unit | string): number {
  const u = resolveUnit(quantity, unit);
  checkValue(si, `SI ${QUANTITY_NAMES[quantity]} difference`, quantity, u.unit);
  return finiteResult(
    si / u.factor,
    `${QUANTITY_NAMES[quantity]} difference ${fmt(si)} ${SI_SYMBOL[quantity]} shown in ${u.unit}`,
    quantity,
    u.unit,
  );
}

/**
 * A measure in another unit (and, for pressure, another reference) of the same quantity. Level
 * in % and level in mm are refused: turning one into the other needs the instrument's span.
 */
export function convert(measure: Measure, toUnit: Unit | string, toReference?: PressureRef, ctx?: SiteContext): number {
  const from = resolveUnit(measure.quantity, measure.unit);
  const to = resolveUnit(measure.quantity, toUnit);
  if (from.dimension !== to.dimension) {
    throw new UnitError(
      `cannot convert ${QUANTITY_NAMES[measure.quantity]} from ${from.unit} (${from.dimension}) to ${to.unit} (${to.dimension}) ` +
        `without the instrument's span`,
      { code: 'incompatibleUnits', input: from.unit, quantity: measure.quantity, unit: to.unit },
    );
  }
  return fromSI(measure.quantity, toSI(measure, ctx), to.unit, toReference, ctx);
}
