/**
 * Plant units: what a technician types or a screen shows, to and from the SI values every other
 * module uses (Pa absolute, K, kg/s, W). Pure TypeScript; runs on the server and in the browser.
 */

export { UnitError, type UnitErrorCode, type UnitErrorDetails } from './errors';
export {
  QUANTITIES,
  QUANTITY_NAMES,
  PRESSURE_REFERENCES,
  PRESSURE_UNITS,
  TEMPERATURE_UNITS,
  MASS_FLOW_UNITS,
  POWER_UNITS,
  LEVEL_UNITS,
  UNITS_BY_QUANTITY,
  SI_UNIT,
  STANDARD_GRAVITY,
  POUND_KG,
  INCH_M,
  MMHG_PA,
  allSpellings,
  isPressureRef,
  isQuantity,
  lookupUnit,
  unitInfo,
  type Quantity,
  type PressureRef,
  type Unit,
  type UnitInfo,
  type PressureUnit,
  type TemperatureUnit,
  type MassFlowUnit,
  type PowerUnit,
  type LevelUnit,
} from './definitions';
export {
  ICAO,
  ELEVATION_MIN_M,
  ELEVATION_MAX_M,
  barometricFromElevation,
  geopotentialAltitude,
  pressureAtGeopotential,
} from './atmosphere';
export {
  BAROMETRIC_MIN_PA,
  BAROMETRIC_MAX_PA,
  convert,
  fromSI,
  fromSIDelta,
  resolveUnit,
  siteBarometricPa,
  toSI,
  toSIDelta,
  type Measure,
  type SiteContext,
} from './convert';
export {
  parseLeadingNumber,
  parseQuantity,
  parseUnit,
  splitReference,
  type ParsedQuantity,
  type ParsedUnit,
} from './parse';
export { formatValue, unitLabel, type FormatOptions } from './format';
