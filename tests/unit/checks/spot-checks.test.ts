/**
 * On-the-spot checks of a reading. Saturation temperatures from IAPWS-IF97 Table 35
 * (Tsat(1 MPa) = 453.035632 K, Tsat(10 MPa) = 584.149488 K); coverage factor k = 2 per GUM §6.3.
 */
import { checkReading, saturationFlag, type SpotReading } from '@/shared/checks';

const baro = 101_325;
const drumP = (valueSI: number): SpotReading => ({
  tag: 'PI-110',
  quantity: 'pressure',
  valueSI,
  sigma: 5_000,
  display: { unit: 'bar', reference: 'gauge' },
  range: { min: baro, max: 16e5 + baro },
});
const drumT = (kelvin: number): SpotReading => ({
  tag: 'TI-111',
  quantity: 'temperature',
  valueSI: kelvin,
  sigma: 0.5,
  display: { unit: '°C', digits: 1 },
  range: { min: 273.15, max: 673.15 },
});

describe('saturation (IAPWS-IF97 Table 35: Tsat(1 MPa) = 453.035632 K)', () => {
  test('a drum at 1 MPa and 180.0 °C agrees (0.11 K off, allowed about ±1.1 K)', () => {
    expect(saturationFlag(drumT(453.15), drumP(1e6), 'Drum')).toBeNull();
  });

  test('a drum at 1 MPa reading 185.0 °C is flagged, with the boiling point in the message', () => {
    const f = saturationFlag(drumT(458.15), drumP(1e6), 'Drum');
    expect(f).not.toBeNull();
    expect(f!.kind).toBe('saturation');
    expect(f!.evidence.tsat as number).toBeCloseTo(453.035632, 5);
    expect(f!.evidence.difference as number).toBeCloseTo(458.15 - 453.035632, 5);
    // σ = hypot(0.5 K, dTsat/dp · 5 kPa); dTsat/dp at 1 MPa ≈ 4.3e-5 K/Pa (Clausius–Clapeyron, T·Δv/Δh with steam-table volumes) → σ ≈ 0.55 K, allowed ≈ 1.09 K
    expect(f!.evidence.allowed as number).toBeGreaterThan(1.0);
    expect(f!.evidence.allowed as number).toBeLessThan(1.1);
    expect(f!.message).toBe(
      "Drum: TI-111 reads 185.0 °C, 5.1 K above the boiling point at PI-110's 10.00 bar(a) (179.9 °C; allowed ±1.1 K). Re-read TI-111.",
    );
  });

  test('either reading can be the one being checked', () => {
    const f = checkReading(drumP(1e6), {
      barometricPa: baro,
      saturation: { pointLabel: 'Drum', partner: drumT(458.15) },
    });
    expect(f.map((x) => x.kind)).toEqual(['saturation']);
    expect(f[0].message).toContain('8.99 bar(g)');
    expect(f[0].message).toContain('Re-read PI-110 and TI-111');
  });

  test('at 10 MPa the boiling point is 584.149488 K (IF97 Table 35)', () => {
    const f = saturationFlag(drumT(590), drumP(10e6), 'Drum');
    expect(f!.evidence.tsat as number).toBeCloseTo(584.149488, 5);
  });

  test('a pressure where water cannot boil (above the critical point) says so', () => {
    const f = saturationFlag(drumT(600), drumP(25e6), 'Drum', { barometricPa: baro });
    expect(f!.kind).toBe('if97');
    expect(f!.severity).toBe(1);
  });
});

describe('range, band, twin and jump (common practice)', () => {
  const ti = (valueSI: number): SpotReading => ({
    tag: 'TI-201',
    quantity: 'temperature',
    valueSI,
    sigma: 1,
    display: { unit: '°C', digits: 1 },
    range: { min: 273.15, max: 773.15 },
    band: { min: 273.15 + 480, max: 273.15 + 500 },
  });

  test('inside band and range: no flag', () => {
    expect(checkReading(ti(273.15 + 490))).toEqual([]);
  });

  test('outside the expected band: a re-read is asked, the band is in the message', () => {
    const f = checkReading(ti(273.15 + 470));
    expect(f.map((x) => x.kind)).toEqual(['band']);
    expect(f[0].message).toBe('TI-201 reads 470.0 °C; this round expects 480.0 °C to 500.0 °C. Re-read the gauge.');
  });

  test('off the scale comes first (severity 1) and the band flag follows', () => {
    const f = checkReading(ti(273.15 + 510));
    expect(f.map((x) => x.kind)).toEqual(['range', 'band']);
  });

  test('twins 3 K apart with σ = 1 K each disagree (allowed 2·√2 = 2.83 K)', () => {
    const twin = { ...ti(273.15 + 487), tag: 'TI-202' };
    const f = checkReading(ti(273.15 + 490), { twin });
    expect(f.map((x) => x.kind)).toEqual(['twin']);
    expect(f[0].evidence.allowed as number).toBeCloseTo(2 * Math.SQRT2, 12);
    expect(f[0].message).toContain('differ by 3.0 K, more than their combined uncertainty allows (±2.8 K)');
  });

  test('twins 2.5 K apart agree', () => {
    expect(checkReading(ti(273.15 + 490), { twin: { ...ti(273.15 + 487.5), tag: 'TI-202' } })).toEqual([]);
  });

  test('a change of more than a fifth of the span since the last round is noted', () => {
    const f = checkReading(ti(273.15 + 490), { previous: { valueSI: 273.15 + 380, hoursAgo: 8 } });
    expect(f.map((x) => x.kind)).toEqual(['jump']);
    expect(f[0].severity).toBe(3);
    expect(checkReading(ti(273.15 + 490), { previous: { valueSI: 273.15 + 450, hoursAgo: 8 } })).toEqual([]);
  });

  test('bad input names the tag and the limit', () => {
    expect(() => checkReading({ ...ti(NaN) })).toThrow('TI-201: value is not a finite number');
    expect(() => checkReading({ ...ti(700), sigma: 0 })).toThrow(
      'TI-201: sigma must be a positive finite number, got 0',
    );
  });
});
