/**
 * Command-line parsing of scripts/steam.ts. Expected SI values come from NIST SP 811 (2008) B.8
 * factors and the ICAO standard atmosphere (Doc 7488; 1000 m geometric = 89 876 Pa, from memory);
 * error texts are the project's own.
 */

import { parseSteamArgs, SteamArgError, USAGE } from '@/scripts/steam-args';
import { barometricFromElevation, UnitError } from '@/shared/units';
import { thrown } from './thrown';

function state(argv: string[]) {
  const a = parseSteamArgs(argv);
  if (a.kind !== 'state') throw new Error('expected a state request');
  return a;
}

describe('steam CLI arguments: pairs and units', () => {
  test('"p=12 bar(g)" "T=250 °C" --elevation 180 → pt with p absolute from the ICAO atmosphere', () => {
    const a = state(['p=12 bar(g)', 'T=250 °C', '--elevation', '180']);
    expect(a.pair).toBe('pt');
    expect(a.values[0]).toBeCloseTo(1.2e6 + barometricFromElevation(180), 6);
    expect(a.values[1]).toBeCloseTo(523.15, 12);
    expect(a.barometric).toEqual({ pa: barometricFromElevation(180), source: 'elevation', text: '180' });
    expect(a.inputs.p?.text).toBe('12 bar(g)');
    expect(a.json).toBe(false);
  });

  test('--elevation=1000 form and "1000 m" (ICAO: 89 876 Pa at 1000 m)', () => {
    for (const argv of [['--elevation=1000'], ['--elevation', '1000 m']]) {
      const a = state(['p=0 bar(g)', 'T=100 °C', ...argv]);
      expect(Math.abs(a.values[0] - 89876)).toBeLessThanOrEqual(1);
    }
  });

  test('--barometric "1013 mbar" instead of the elevation; order of arguments is free', () => {
    const a = state(['--barometric', '1013 mbar', 'T=250 °C', 'p=12 bar(g)', '--json']);
    expect(a.pair).toBe('pt');
    expect(a.values[0]).toBeCloseTo(1_301_300, 6);
    expect(a.barometric).toEqual({ pa: 101_300, source: 'reading', text: '1013 mbar' });
    expect(a.json).toBe(true);
  });

  test('p,h in kJ/kg or J/kg; p,s in kJ/(kg K) spellings; p,x; T,x (pairs of the IF97 module)', () => {
    expect(state(['p=1 MPa(a)', 'h=2800 kJ/kg']).values).toEqual([1e6, 2.8e6]);
    expect(state(['p=1 MPa(a)', 'h=2.8e6 J/kg']).values).toEqual([1e6, 2.8e6]);
    for (const s of ['6.5 kJ/(kg K)', '6.5 kJ/(kg·K)', '6.5 kJ/kgK', '6.5 kJ/kg/K', '6500 J/(kg*K)']) {
      const a = state(['p=1 MPa(a)', `s=${s}`]);
      expect(a.pair).toBe('ps');
      expect(a.values[1]).toBeCloseTo(6500, 9);
    }
    expect(state(['p=1 MPa(a)', 'x=0.9'])).toMatchObject({ pair: 'px', values: [1e6, 0.9] });
    expect(state(['T=180 °C', 'x=90 %'])).toMatchObject({ pair: 'tx', values: [453.15, 0.9] });
    expect(state(['x=1', 'T=356 °F']).pair).toBe('tx');
  });

  test('psig and °F (SP 811 B.8: psi 6 894.757 Pa, T/K = (t/°F + 459.67)/1.8)', () => {
    const a = state(['p=150 psig', 'T=482 °F', '--barometric', '14.696 psia']);
    expect(a.values[0]).toBeCloseTo(164.696 * 6894.757293168, 4);
    expect(a.values[1]).toBeCloseTo(523.15, 10);
  });

  test('--help and -h', () => {
    expect(parseSteamArgs(['--help'])).toEqual({ kind: 'help' });
    expect(parseSteamArgs(['p=1 bar(a)', '-h'])).toEqual({ kind: 'help' });
    expect(USAGE).toContain('p+T, p+h, p+s, p+x, T+x');
  });
});

describe('steam CLI arguments: refusals name the argument', () => {
  test.each([
    [[], 'command line', 'give exactly two properties, one of the pairs p+T, p+h, p+s, p+x, T+x; got none'],
    [['p=1 bar(a)'], 'command line', 'give exactly two properties, one of the pairs p+T, p+h, p+s, p+x, T+x; got p'],
    [
      ['p=1 bar(a)', 'T=100 °C', 'h=100 kJ/kg'],
      'command line',
      'give exactly two properties, one of the pairs p+T, p+h, p+s, p+x, T+x; got p, T, h',
    ],
    [['T=100 °C', 'h=100 kJ/kg'], 'command line', 'T+h is not a supported pair; use one of p+T, p+h, p+s, p+x, T+x'],
    [['p=1 bar(a)', 'p=2 bar(a)'], 'p', 'p given twice'],
    [['q=1', 'T=100 °C'], 'q', 'unknown property "q" in "q=1"; use p, T, h, s or x'],
    [
      ['p=12', 'bar(g)'],
      'bar(g)',
      'unexpected argument "bar(g)"; give properties as name=value and quote each one, e.g. "p=12 bar(g)"',
    ],
    [['--verbose'], '--verbose', 'unknown option --verbose; see --help'],
    [['--elevation'], '--elevation', '--elevation needs a value'],
    [['--elevation', '1', '--elevation', '2'], '--elevation', '--elevation given twice'],
    [['--elevation', '1', '--barometric', '1 bar'], '--barometric', 'give --elevation or --barometric, not both'],
    [
      ['--elevation', '180 ft', 'p=1 bar(g)', 'T=100 °C'],
      '--elevation',
      '--elevation 180 ft: give metres above sea level, e.g. --elevation 180',
    ],
    [
      ['--barometric', '1013 mbar(g)', 'p=1 bar(g)', 'T=100 °C'],
      '--barometric',
      '--barometric 1013 mbar(g): a barometric pressure is absolute, not gauge',
    ],
    [['p=1 MPa(a)', 'h=2800 kJ'], 'h', 'h=2800 kJ: unknown unit "kJ"; allowed: kJ/kg, J/kg, MJ/kg'],
    [['p=1 MPa(a)', 'h=2800'], 'h', 'h=2800: no unit; allowed: kJ/kg, J/kg, MJ/kg'],
    [['p=1 MPa(a)', 's=6.5 kJ/kg'], 's', 's=6.5 kJ/kg: unknown unit "kJ/kg"; allowed: kJ/(kg K), J/(kg K)'],
    [['p=1 MPa(a)', 'x=1.2'], 'x', 'x=1.2: vapour fraction must be from 0 to 1, got 1.2'],
    [['p=1 MPa(a)', 'x=0.5 kg'], 'x', 'x=0.5 kg: x is a fraction from 0 to 1 (or a percentage with %), got unit "kg"'],
  ])('%j', (argv, field, message) => {
    const e = thrown(SteamArgError, () => parseSteamArgs(argv));
    expect(e.field).toBe(field);
    expect(e.message).toBe(message);
  });

  test('unit errors come back naming the argument, with the UnitError as cause', () => {
    const noBaro = thrown(SteamArgError, () => parseSteamArgs(['p=12 bar(g)', 'T=250 °C']));
    expect(noBaro.field).toBe('p');
    expect(noBaro.message).toBe(
      "p=12 bar(g): 12 bar gauge is a gauge pressure and needs the site's barometric pressure " +
        '(a barometer reading or the site elevation); none was given; add --elevation <m> or --barometric "<value unit>"',
    );
    expect((noBaro.cause as UnitError).code).toBe('missingBarometric');

    const noRef = thrown(SteamArgError, () => parseSteamArgs(['p=12 bar', 'T=250 °C']));
    expect((noRef.cause as UnitError).code).toBe('missingReference');
    expect(noRef.message).toBe(
      'p=12 bar: pressure 12 bar has no reference; say whether it is absolute, gauge or vacuum (e.g. "bar(a)", "bar(g)", "kPa vac")',
    );

    const wrong = thrown(SteamArgError, () => parseSteamArgs(['p=250 °C', 'T=250 °C']));
    expect(wrong.message).toBe(
      'p=250 °C: in "250 °C": "°C" is a temperature unit, not a pressure unit; allowed: Pa, kPa, MPa, bar, mbar, psi, kgf/cm², inHg, mmHg, mmH₂O',
    );

    const high = thrown(SteamArgError, () => parseSteamArgs(['--elevation', '20000', 'p=1 bar(g)', 'T=100 °C']));
    expect(high.field).toBe('--elevation');
    expect(high.message).toBe(
      '--elevation 20000: elevation 20000 m is outside -1000 m to 11000 m (the ICAO standard troposphere)',
    );

    const baro = thrown(SteamArgError, () => parseSteamArgs(['--barometric', '1013 kPa', 'p=1 bar(g)', 'T=100 °C']));
    expect(baro.message).toBe(
      '--barometric 1013 kPa: barometric pressure 1013000 Pa is outside 20000 Pa to 120000 Pa; check its unit',
    );

    const vac = thrown(SteamArgError, () => parseSteamArgs(['p=1.2 bar vac', 'x=0', '--barometric', '1 bar']));
    expect(vac.message).toBe(
      'p=1.2 bar vac: 1.2 bar vacuum with barometric pressure 100000 Pa gives absolute pressure -20000 Pa, not above 0 Pa ' +
        '(a vacuum cannot exceed the barometric pressure)',
    );

    const nan = thrown(SteamArgError, () => parseSteamArgs(['p=NaN bar(a)', 'T=1 K']));
    expect(nan.message).toBe('p=NaN bar(a): "NaN bar(a)" is not a finite number');

    const empty = thrown(SteamArgError, () => parseSteamArgs(['p=', 'T=1 K']));
    expect(empty.message).toBe('p=: empty input; expected a number and a unit, e.g. "12 bar(g)"');
  });
});
