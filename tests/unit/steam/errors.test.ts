/**
 * Every error path of SteamRangeError. The limits are IF97's range of validity (IAPWS
 * R7-97(2012) Sect. 2: 273.15 K ≤ T ≤ 1073.15 K at p ≤ 100 MPa, 1073.15 K < T ≤ 2273.15 K at
 * p ≤ 50 MPa) and of its saturation line (Sect. 8: 273.15 K … 647.096 K, i.e. 611.213 Pa …
 * 22.064 MPa); a quality is a mass fraction, 0 … 1 (common practice).
 */
import { SteamRangeError, ph, ps, psat, pt, px, regionPH, regionPS, regionPT, tsat, tx } from '@/shared/steam';

const MPa = 1e6;

function caught(f: () => unknown): SteamRangeError {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(SteamRangeError);
    expect(e).toBeInstanceOf(RangeError);
    return e as SteamRangeError;
  }
  throw new Error('expected a SteamRangeError');
}

function expectError(f: () => unknown, message: string | RegExp, fields: Partial<SteamRangeError>): SteamRangeError {
  const e = caught(f);
  if (typeof message === 'string') expect(e.message).toBe(message);
  else expect(e.message).toMatch(message);
  expect(e.name).toBe('SteamRangeError');
  expect(e).toMatchObject(fields);
  return e;
}

describe('SteamRangeError: non-finite input', () => {
  test.each([
    ['pt p', () => pt(NaN, 300), 'p = NaN is not a finite number', 'p'],
    ['pt T', () => pt(1 * MPa, Infinity), 'T = Infinity is not a finite number', 'T'],
    ['ph h', () => ph(1 * MPa, NaN), 'h = NaN is not a finite number', 'h'],
    ['ps s', () => ps(1 * MPa, -Infinity), 's = -Infinity is not a finite number', 's'],
    ['px p', () => px(NaN, 0.5), 'p = NaN is not a finite number', 'p'],
    ['px x', () => px(1 * MPa, NaN), 'x = NaN is not a finite number', 'x'],
    ['tx T', () => tx(NaN, 0.5), 'T = NaN is not a finite number', 'T'],
    ['tsat p', () => tsat(NaN), 'p = NaN is not a finite number', 'p'],
    ['psat T', () => psat(-Infinity), 'T = -Infinity is not a finite number', 'T'],
  ] as const)('%s', (_, f, message, input) => {
    expectError(f, message, { input, limit: null, side: 'finite' });
  });
});

describe('SteamRangeError: (p, T) outside IF97', () => {
  test('T below 273.15 K and above 2273.15 K', () => {
    expectError(() => pt(1 * MPa, 270), 'T = 270 K is below the IF97 limit of 273.15 K', {
      input: 'T',
      value: 270,
      limit: 273.15,
      side: 'below',
    });
    expectError(() => pt(1 * MPa, 2300), 'T = 2300 K is above the IF97 limit of 2273.15 K', {
      input: 'T',
      value: 2300,
      limit: 2273.15,
      side: 'above',
    });
  });

  test('p not positive, above 100 MPa, above 50 MPa in region 5', () => {
    expectError(() => pt(0, 300), 'p = 0 Pa is not above the IF97 limit of 0 Pa (absolute pressure must be positive)', {
      input: 'p',
      value: 0,
      limit: 0,
    });
    expectError(
      () => pt(-5, 300),
      'p = -5 Pa is not above the IF97 limit of 0 Pa (absolute pressure must be positive)',
      { input: 'p', value: -5 },
    );
    expectError(() => pt(120 * MPa, 300), 'p = 120 MPa is above the IF97 limit of 100 MPa', {
      input: 'p',
      value: 120e6,
      limit: 100e6,
      side: 'above',
    });
    expectError(() => pt(60 * MPa, 1500), 'p = 60 MPa is above the IF97 limit of 50 MPa for T above 1073.15 K', {
      input: 'p',
      limit: 50e6,
    });
    // just over a limit: enough digits to tell value and limit apart
    expectError(() => regionPT(100.0000001 * MPa, 300), 'p = 100.0000001 MPa is above the IF97 limit of 100 MPa', {
      input: 'p',
    });
  });
});

describe('SteamRangeError: (p, h) and (p, s) outside every region', () => {
  test('h below the 273.15 K state, named with its limit and the pressure', () => {
    const e = expectError(
      () => ph(1 * MPa, -10e3),
      /^h = -10 kJ\/kg is below the IF97 limit of 0\.9758\d* kJ\/kg at p = 1 MPa \(273\.15 K\)$/,
      { input: 'h', value: -10e3, side: 'below' },
    );
    expect(e.limit).toBeCloseTo(pt(1 * MPa, 273.15).h, 6);
    // below p_sat(273.15 K) the lowest state is vapour
    const f = expectError(
      () => ph(100, 1000e3),
      /^h = 1000 kJ\/kg is below the IF97 limit of 2501\.3\d* kJ\/kg at p = 100 Pa \(273\.15 K\)$/,
      { input: 'h' },
    );
    expect(f.limit).toBeCloseTo(pt(100, 273.15).h, 6);
  });

  test('h above the 2273.15 K state (p ≤ 50 MPa) or the 1073.15 K state (p > 50 MPa)', () => {
    const e = expectError(
      () => ph(10 * MPa, 9000e3),
      /^h = 9000 kJ\/kg is above the IF97 limit of 7374\.\d+ kJ\/kg at p = 10 MPa \(2273\.15 K\)$/,
      { input: 'h', side: 'above' },
    );
    expect(e.limit).toBeCloseTo(pt(10 * MPa, 2273.15).h, 6);
    const f = expectError(
      () => ph(60 * MPa, 5000e3),
      /^h = 5000 kJ\/kg is above the IF97 limit of 3880\.\d+ kJ\/kg at p = 60 MPa \(1073\.15 K\)$/,
      { input: 'h' },
    );
    expect(f.limit).toBeCloseTo(pt(60 * MPa, 1073.15).h, 6);
  });

  test('s below and above the range', () => {
    const e = expectError(
      () => ps(1 * MPa, -100),
      /^s = -0\.1 kJ\/\(kg·K\) is below the IF97 limit of -0\.0000884\d* kJ\/\(kg·K\) at p = 1 MPa \(273\.15 K\)$/,
      { input: 's' },
    );
    expect(e.limit).toBeCloseTo(pt(1 * MPa, 273.15).s, 9);
    const f = expectError(
      () => ps(1 * MPa, 20e3),
      /^s = 20 kJ\/\(kg·K\) is above the IF97 limit of 10\.489\d* kJ\/\(kg·K\) at p = 1 MPa \(2273\.15 K\)$/,
      { input: 's', side: 'above' },
    );
    expect(f.limit).toBeCloseTo(pt(1 * MPa, 2273.15).s, 6);
    const g = expectError(
      () => ps(80 * MPa, 8e3),
      /^s = 8 kJ\/\(kg·K\) is above the IF97 limit of 6\.2038\d* kJ\/\(kg·K\) at p = 80 MPa \(1073\.15 K\)$/,
      { input: 's' },
    );
    expect(g.limit).toBeCloseTo(pt(80 * MPa, 1073.15).s, 6);
  });

  test('pressure checks come first, and regionPH / regionPS throw the same errors', () => {
    expectError(() => ph(101 * MPa, 1e6), 'p = 101 MPa is above the IF97 limit of 100 MPa', { input: 'p' });
    expectError(() => ps(0, 1e3), 'p = 0 Pa is not above the IF97 limit of 0 Pa (absolute pressure must be positive)', {
      input: 'p',
    });
    expectError(() => regionPH(1 * MPa, -10e3), /^h = -10 kJ\/kg is below/, { input: 'h' });
    expectError(() => regionPS(1 * MPa, 20e3), /^s = 20 kJ\/\(kg·K\) is above/, { input: 's' });
  });
});

describe('SteamRangeError: saturation line and quality', () => {
  test('x outside 0…1', () => {
    expectError(() => px(1 * MPa, -0.1), 'x = -0.1 is below the quality limit of 0', {
      input: 'x',
      value: -0.1,
      limit: 0,
      side: 'below',
    });
    expectError(() => px(1 * MPa, 1.2), 'x = 1.2 is above the quality limit of 1', {
      input: 'x',
      value: 1.2,
      limit: 1,
      side: 'above',
    });
    expectError(() => tx(400, 2), 'x = 2 is above the quality limit of 1', { input: 'x' });
  });

  test('p below p_sat(273.15 K) or above the critical pressure (px, tsat)', () => {
    for (const f of [() => px(500, 0.5), () => tsat(500)]) {
      const e = expectError(
        f,
        'p = 500 Pa is below the IF97 saturation-line limit of 611.213 Pa (p_sat at 273.15 K, just below the triple point)',
        { input: 'p', value: 500, side: 'below' },
      );
      expect(e.limit).toBeCloseTo(psat(273.15), 9);
    }
    for (const f of [() => px(23 * MPa, 0.5), () => tsat(23 * MPa)]) {
      expectError(f, 'p = 23 MPa is above the critical pressure of 22.064 MPa', {
        input: 'p',
        value: 23e6,
        limit: 22.064e6,
        side: 'above',
      });
    }
  });

  test('T below 273.15 K or above the critical temperature (tx, psat)', () => {
    for (const f of [() => tx(270, 0.5), () => psat(270)]) {
      expectError(f, 'T = 270 K is below the IF97 saturation-line limit of 273.15 K', {
        input: 'T',
        limit: 273.15,
        side: 'below',
      });
    }
    for (const f of [() => tx(650, 0.5), () => psat(650)]) {
      expectError(f, 'T = 650 K is above the critical temperature of 647.096 K', {
        input: 'T',
        limit: 647.096,
        side: 'above',
      });
    }
  });

  test('the saturation line ends are inside: 273.15 K / 611.213 Pa and the critical point', () => {
    expect(tsat(psat(273.15))).toBeCloseTo(273.15, 6);
    expect(psat(647.096)).toBeCloseTo(22.064e6, -1);
    expect(px(22.064e6, 0.5).region).toBe(4);
    expect(tx(273.15, 0).region).toBe(4);
  });
});
