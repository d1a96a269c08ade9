/**
 * On-the-spot checks on the demo unit (invented data): at its design values, which close every
 * balance with IAPWS-IF97, no reading is flagged; a drum thermometer 8 K above the boiling point at
 * the drum pressure is (saturation per IAPWS-IF97 region 4); a twin pair far apart is.
 */
import { demoDesignReadings, demoUnit } from '@/demo/unit';
import { checkInstrumentReading, rangeAbsolute } from '@/shared/checks';
import { barometricFromElevation } from '@/shared/units';

const baro = barometricFromElevation(112);
const design = demoDesignReadings(baro);
const values = Object.fromEntries(design.map((r) => [r.instrumentTag, r.valueSI]));

test('no flag at design values, for any of the demo unit’s instruments', () => {
  for (const r of design) {
    expect({
      tag: r.instrumentTag,
      flags: checkInstrumentReading(demoUnit, r.instrumentTag, r.valueSI, { roundValues: values, barometricPa: baro }),
    }).toEqual({
      tag: r.instrumentTag,
      flags: [],
    });
  }
});

test('a drum thermometer 8 K above the boiling point is flagged against the drum pressure gauge', () => {
  const flags = checkInstrumentReading(demoUnit, 'TI-101', values['TI-101'] + 8, {
    roundValues: values,
    barometricPa: baro,
  });
  expect(flags.map((f) => f.kind)).toEqual(['saturation']);
  expect(flags[0].message).toMatch(
    /^Drum steam: TI-101 reads [\d.]+ °C, 8\.0 K above the boiling point at PI-101's [\d.]+ bar\(g\)/,
  );
});

test('main-steam twins 15 K apart are flagged on either instrument', () => {
  const v: Record<string, number> = { ...values, 'TI-102B': values['TI-102B'] - 15 };
  expect(
    checkInstrumentReading(demoUnit, 'TI-102A', v['TI-102A'], { roundValues: v, barometricPa: baro }).map(
      (f) => f.kind,
    ),
  ).toContain('twin');
  expect(
    checkInstrumentReading(demoUnit, 'TI-102B', v['TI-102B'], { roundValues: v, barometricPa: baro }).map(
      (f) => f.kind,
    ),
  ).toContain('twin');
});

test('a gauge scale becomes absolute with the barometric pressure; without one it is unknown', () => {
  const pi = demoUnit.instruments.find((i) => i.tag === 'PI-101')!;
  expect(rangeAbsolute(pi, baro)).toEqual({ min: pi.range.min + baro, max: pi.range.max + baro });
  expect(rangeAbsolute(pi, undefined)).toBeUndefined();
});

test('an unknown tag is refused by name', () => {
  expect(() => checkInstrumentReading(demoUnit, 'TI-999', 300, { roundValues: {} })).toThrow(
    `instrument TI-999 is not in the model ${demoUnit.id}`,
  );
});
