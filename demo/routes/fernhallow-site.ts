/**
 * What the Fernhallow Works routes are checked against: the demo unit's cycle model
 * (shared/cycle/demo-unit.ts) plus the site's barometer. The barometer is not a cycle instrument
 * (it measures the air, not the steam), so it is not in the model; the seed stores it as an
 * instrument of the unit marked as the barometer, and gauge and vacuum readings of a round that
 * has its reading refer to it (else to the site's elevation).
 *
 * Fernhallow Works and everything in it is invented demo data.
 */
import { demoUnit } from '../unit';
import type { Instrument } from '../../shared/cycle/model';
import type { RouteModel } from '../../checklists/validate';

/** Aneroid barometer in the boiler-house entrance, read in mbar (hPa). Range 800–1100 mbar absolute. */
export const fernhallowBarometer: Instrument = Object.freeze({
  tag: 'PI-001',
  label: 'Site barometer (boiler house entrance)',
  device: 'aneroid barometer',
  quantity: 'pressure',
  pressureReference: 'absolute',
  range: { min: 80_000, max: 110_000 },
  // ±1 hPa tolerance and 0.5 hPa divisions: a typical aneroid station barometer (common practice)
  accuracy: { kind: 'absolute', value: 100, basis: 'tolerance', resolution: 50 },
  unit: 'mbar',
}) as Instrument;

/** The demo unit's instruments and the site barometer, as the route validator sees them. */
export const fernhallowRouteModel: RouteModel = {
  id: demoUnit.id,
  instruments: [...demoUnit.instruments, fernhallowBarometer],
};
