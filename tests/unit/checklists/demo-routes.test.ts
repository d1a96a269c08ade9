/**
 * The demo routes (invented Fernhallow Works and Brackenmoor data) against the demo unit's cycle
 * model. The design readings come from demo/unit.ts (IAPWS-IF97 design point) shown
 * at the site's standard-atmosphere barometric pressure (ICAO Doc 7488, 112 m).
 */
import { validateRoute } from '@/checklists/validate';
import {
  boilerHouseRoute,
  brackenmoorBoilerRoute,
  condenserCoolingWaterRoute,
  fernhallowBarometer,
  fernhallowRouteModel,
  fernhallowRoutes,
  turbineHallRoute,
} from '@/demo/routes';
import { demoDesignReadings, demoUnit } from '@/demo/unit';
import { validateModel } from '@/shared/cycle/validate';
import { barometricFromElevation } from '@/shared/units';

test('the three Fernhallow routes validate against the demo model (with the site barometer)', () => {
  expect(fernhallowRoutes.map((r) => r.name)).toEqual(['Boiler house', 'Turbine hall', 'Condenser and cooling water']);
  for (const r of [boilerHouseRoute, turbineHallRoute, condenserCoolingWaterRoute]) {
    expect({ id: r.id, ...validateRoute(r, fernhallowRouteModel) }).toMatchObject({ id: r.id, ok: true, issues: [] });
    expect(r.unitId).toBe(demoUnit.id);
  }
});

test('the demo model itself is valid, and only the barometer on the routes is outside it', () => {
  expect(validateModel(demoUnit).ok).toBe(true);
  const strict = validateRoute(boilerHouseRoute, demoUnit);
  expect(strict.ok ? [] : strict.issues).toEqual([
    {
      path: 'stops.0.readings.0.tag',
      message: `${fernhallowBarometer.tag} is not an instrument of unit "${demoUnit.id}"`,
    },
  ]);
  expect(validateRoute(turbineHallRoute, demoUnit).ok).toBe(true);
  expect(validateRoute(condenserCoolingWaterRoute, demoUnit).ok).toBe(true);
});

test('every instrument of the demo unit is read on exactly one Fernhallow route', () => {
  const tags = fernhallowRoutes.flatMap((r) => r.stops.flatMap((s) => s.readings.map((x) => x.tag)));
  expect(new Set(tags).size).toBe(tags.length);
  expect([...tags].sort()).toEqual([...demoUnit.instruments.map((i) => i.tag), fernhallowBarometer.tag].sort());
});

test('each band holds the design reading as the gauge face shows it at 112 m (p_baro ≈ 99 987 Pa)', () => {
  const pBaro = barometricFromElevation(112);
  const design = new Map(demoDesignReadings(pBaro).map((d) => [d.instrumentTag, d.shown]));
  for (const r of fernhallowRoutes) {
    for (const s of r.stops) {
      for (const x of s.readings) {
        if (x.tag === fernhallowBarometer.tag) {
          // 999.9 mbar standard atmosphere at 112 m
          expect(pBaro / 100).toBeGreaterThan(x.band.min);
          expect(pBaro / 100).toBeLessThan(x.band.max);
          continue;
        }
        const shown = design.get(x.tag)!;
        expect({ tag: x.tag, unit: shown.unit, reference: shown.reference }).toEqual({
          tag: x.tag,
          unit: x.unit,
          reference: x.reference,
        });
        expect({ tag: x.tag, inBand: shown.value > x.band.min && shown.value < x.band.max }).toEqual({
          tag: x.tag,
          inBand: true,
        });
      }
    }
  }
});

test('hot, rotating and live stops carry a caution; the main-steam stops warn about the lagging', () => {
  const stops = fernhallowRoutes.flatMap((r) => r.stops);
  expect(stops.filter((s) => s.caution).length).toBeGreaterThanOrEqual(10);
  for (const id of ['superheater-outlet', 'turbine-stop-valve']) {
    expect(stops.find((s) => s.id === id)!.caution).toContain(
      'Hot surfaces: main-steam line lagging above 400 °C — do not touch, keep to the walkway',
    );
  }
  expect(stops.find((s) => s.id === 'generator-panel')!.caution).toMatch(/Live switchgear/);
  expect(stops.find((s) => s.id === 'feed-pump')!.caution).toMatch(/Rotating equipment/);
});

test('the Brackenmoor route passes the ISA-letter and unit checks without a model', () => {
  expect(validateRoute(brackenmoorBoilerRoute)).toMatchObject({ ok: true });
});
