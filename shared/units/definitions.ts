/**
 * The units a plant reading may be typed in, and their factors to SI.
 *
 * Factors: NIST Special Publication 811 (2008 edition), "Guide for the Use of the International
 * System of Units (SI)", Appendix B.8 (factors for units listed alphabetically) and B.9 (by kind of
 * quantity). Where SP 811 prints a rounded factor but the unit is defined exactly through other
 * exact constants (psi, lb/h), the exact product is used and the SP 811 figure is quoted beside it;
 * tests hold the two together to the digits SP 811 prints.
 *
 * Mercury and water columns use the *conventional* units of SP 811 (not a column at a measured
 * temperature): mmHg = 13 595.1 kg/m³ × 0.001 m × g_n = 133.322 387 415 Pa exactly (a mercury density
 * at 0 °C, standard gravity); inHg = 25.4 × mmHg = 3 386.388 640 341 Pa (SP 811: inHg conventional
 * 3.386 389 E+03; inHg at 32 °F is 3.386 38 E+03, at 60 °F 3.376 85 E+03 — a gauge calibrated "at 60 °F"
 * reads about 0.3 % differently and is not covered here); mmH₂O = 1000 kg/m³ × 0.001 m × g_n =
 * 9.806 65 Pa exactly (SP 811: millimeter of water, conventional, 9.806 65 E+00).
 *
 * SI value = (value + shift) × factor. `shift` is non-zero only for °C and °F, as in SP 811 B.8:
 * T/K = t/°C + 273.15 and T/K = (t/°F + 459.67)/1.8. A *difference* of temperatures converts by the
 * factor alone (1 °F interval = 5/9 K), see toSIDelta.
 */

export const QUANTITIES = ['pressure', 'temperature', 'massFlow', 'power', 'level'] as const;
export type Quantity = (typeof QUANTITIES)[number];

/** absolute; gauge: absolute = gauge + barometric; vacuum: absolute = barometric − vacuum. */
export const PRESSURE_REFERENCES = ['absolute', 'gauge', 'vacuum'] as const;
export type PressureRef = (typeof PRESSURE_REFERENCES)[number];

export const PRESSURE_UNITS = ['Pa', 'kPa', 'MPa', 'bar', 'mbar', 'psi', 'kgf/cm²', 'inHg', 'mmHg', 'mmH₂O'] as const;
export const TEMPERATURE_UNITS = ['°C', '°F', 'K'] as const;
export const MASS_FLOW_UNITS = ['kg/s', 'kg/h', 't/h', 'lb/h'] as const;
export const POWER_UNITS = ['W', 'kW', 'MW'] as const;
export const LEVEL_UNITS = ['%', 'mm'] as const;

export type PressureUnit = (typeof PRESSURE_UNITS)[number];
export type TemperatureUnit = (typeof TEMPERATURE_UNITS)[number];
export type MassFlowUnit = (typeof MASS_FLOW_UNITS)[number];
export type PowerUnit = (typeof POWER_UNITS)[number];
export type LevelUnit = (typeof LEVEL_UNITS)[number];
export type Unit = PressureUnit | TemperatureUnit | MassFlowUnit | PowerUnit | LevelUnit;

/** The units of each quantity, in the order a picker shows them. */
export const UNITS_BY_QUANTITY: { readonly [Q in Quantity]: readonly Unit[] } = {
  pressure: PRESSURE_UNITS,
  temperature: TEMPERATURE_UNITS,
  massFlow: MASS_FLOW_UNITS,
  power: POWER_UNITS,
  level: LEVEL_UNITS,
};

/** Each quantity as a message or a picker names it. */
export const QUANTITY_NAMES: { readonly [Q in Quantity]: string } = {
  pressure: 'pressure',
  temperature: 'temperature',
  massFlow: 'mass flow',
  power: 'power',
  level: 'level',
};

/** The SI unit each quantity is carried in across module boundaries. */
export const SI_UNIT: { readonly [Q in Quantity]: string } = {
  pressure: 'Pa',
  temperature: 'K',
  massFlow: 'kg/s',
  power: 'W',
  // Level has two dimensions: % of the instrument span (SI: a fraction, 1 = 100 %) and a height
  // (SI: m). Turning one into the other needs the instrument's span and is not done here.
  level: '1 (fraction) or m',
};

export interface UnitInfo {
  readonly unit: Unit;
  readonly quantity: Quantity;
  /** Long name, for pickers and messages. */
  readonly name: string;
  /** SI = (value + shift) × factor. */
  readonly factor: number;
  readonly shift: number;
  /** Units of one quantity convert into each other only within one dimension (level: % vs mm). */
  readonly dimension: string;
  /** Other spellings accepted when parsing (ASCII and common variants). */
  readonly aliases: readonly string[];
}

// Exact defining constants (SP 811 B.8 / SI Brochure).
/** Standard acceleration of gravity g_n, m/s² (exact, SP 811). */
export const STANDARD_GRAVITY = 9.80665;
/** Avoirdupois pound, kg (exact, SP 811 B.8: pound (avoirdupois) 4.535 924 E−01, exact 0.453 592 37). */
export const POUND_KG = 0.45359237;
/** International inch, m (exact). */
export const INCH_M = 0.0254;
/** Conventional millimetre of mercury, Pa (exact by definition: 13 595.1 kg/m³ × 1 mm × g_n). */
export const MMHG_PA = 133.322387415;

const info = (
  unit: Unit,
  quantity: Quantity,
  name: string,
  factor: number,
  aliases: readonly string[] = [],
  extra: { shift?: number; dimension?: string } = {},
): UnitInfo => ({
  unit,
  quantity,
  name,
  factor,
  shift: extra.shift ?? 0,
  dimension: extra.dimension ?? quantity,
  aliases,
});

const TABLE: readonly UnitInfo[] = [
  // Pressure → Pa
  info('Pa', 'pressure', 'pascal', 1, ['pascal']),
  info('kPa', 'pressure', 'kilopascal', 1e3),
  info('MPa', 'pressure', 'megapascal', 1e6),
  // SP 811 B.8: bar 1.0 E+05 Pa (exact); millibar 1.0 E+02 Pa (exact). hPa is the same size as mbar.
  info('bar', 'pressure', 'bar', 1e5),
  info('mbar', 'pressure', 'millibar', 1e2, ['hPa']),
  // SP 811 B.8: pound-force per square inch (psi) 6.894 757 E+03 Pa; exact value lb × g_n / in².
  info('psi', 'pressure', 'pound-force per square inch', (POUND_KG * STANDARD_GRAVITY) / (INCH_M * INCH_M), [
    'lbf/in2',
    'lbf/in²',
    'lb/in2',
    'lb/in²',
  ]),
  // SP 811 B.8: kilogram-force per square centimeter 9.806 65 E+04 Pa (exact).
  info('kgf/cm²', 'pressure', 'kilogram-force per square centimetre', STANDARD_GRAVITY * 1e4, [
    'kgf/cm2',
    'kgf/cm^2',
    'kg/cm2',
    'kg/cm²',
    'kg/cm^2',
  ]),
  // SP 811 B.8: inch of mercury, conventional (inHg) 3.386 389 E+03 Pa (= 25.4 mm × mmHg conventional).
  info('inHg', 'pressure', 'inch of mercury, conventional', 25.4 * MMHG_PA, ['in Hg', 'in.Hg', 'in. Hg']),
  // SP 811 B.8: millimeter of mercury, conventional (mmHg) 1.333 224 E+02 Pa; exact 133.322 387 415 Pa.
  info('mmHg', 'pressure', 'millimetre of mercury, conventional', MMHG_PA, ['mm Hg']),
  // SP 811 B.8: millimeter of water, conventional (mmH2O) 9.806 65 E+00 Pa (exact).
  info('mmH₂O', 'pressure', 'millimetre of water, conventional', STANDARD_GRAVITY, [
    'mmH2O',
    'mm H2O',
    'mm H₂O',
    'mmWC',
    'mm WC',
  ]),

  // Temperature → K (SP 811 B.8, "degree Celsius" and "degree Fahrenheit").
  info('°C', 'temperature', 'degree Celsius', 1, ['degC', 'deg C', 'C', '℃', 'ºC'], { shift: 273.15 }),
  info('°F', 'temperature', 'degree Fahrenheit', 1 / 1.8, ['degF', 'deg F', 'F', '℉', 'ºF'], { shift: 459.67 }),
  info('K', 'temperature', 'kelvin', 1, ['kelvin']),

  // Mass flow → kg/s
  info('kg/s', 'massFlow', 'kilogram per second', 1),
  info('kg/h', 'massFlow', 'kilogram per hour', 1 / 3600, ['kg/hr']),
  // SP 811 B.8: ton, metric (t) 1.0 E+03 kg (exact).
  info('t/h', 'massFlow', 'tonne per hour', 1000 / 3600, ['t/hr']),
  // SP 811 B.8: pound per hour (lb/h) 1.259 979 E−04 kg/s; exact value lb / 3600 s.
  info('lb/h', 'massFlow', 'pound per hour', POUND_KG / 3600, ['lb/hr', 'lbs/h', 'lbs/hr']),

  // Power → W
  info('W', 'power', 'watt', 1),
  info('kW', 'power', 'kilowatt', 1e3),
  info('MW', 'power', 'megawatt', 1e6),

  // Level → fraction of span, or m
  info('%', 'level', 'percent of span', 0.01, ['percent'], { dimension: 'fraction' }),
  info('mm', 'level', 'millimetre', 1e-3, [], { dimension: 'length' }),
];

const BY_UNIT = new Map<string, UnitInfo>(TABLE.map((u) => [u.unit, u]));
const BY_SPELLING = new Map<string, UnitInfo>();
const BY_FOLDED = new Map<string, UnitInfo>();
for (const u of TABLE) {
  for (const spelling of [u.unit, ...u.aliases]) {
    BY_SPELLING.set(spelling, u);
    BY_FOLDED.set(spelling.toLowerCase(), u);
  }
}

/** Every spelling the parser accepts, for tests and help texts. */
export function allSpellings(): readonly { spelling: string; unit: Unit }[] {
  return TABLE.flatMap((u) => [u.unit, ...u.aliases].map((spelling) => ({ spelling, unit: u.unit })));
}

/** Info for a unit id exactly as in the lists above; undefined if it is not one. */
export function unitInfo(unit: string): UnitInfo | undefined {
  return BY_UNIT.get(unit);
}

/**
 * Finds a unit by any accepted spelling: exact first, then ignoring letter case ("kpa", "MBAR",
 * "mw"). Ignoring case is safe because no two spellings in the table differ only by case (a test
 * holds this); it reads "mw" as MW since no milliwatt unit is offered.
 */
export function lookupUnit(spelling: string): UnitInfo | undefined {
  const s = spelling.trim();
  return BY_SPELLING.get(s) ?? BY_FOLDED.get(s.toLowerCase());
}

export function isQuantity(q: unknown): q is Quantity {
  return typeof q === 'string' && (QUANTITIES as readonly string[]).includes(q);
}

export function isPressureRef(r: unknown): r is PressureRef {
  return typeof r === 'string' && (PRESSURE_REFERENCES as readonly string[]).includes(r);
}
