/**
 * Node-only tool: the state of water or steam (IAPWS-IF97) from two properties typed as on a
 * round, with their units.
 *
 *   npm run steam -- "p=12 bar(g)" "T=250 °C" --elevation 180
 *   npx tsx scripts/steam.ts "p=1 MPa(a)" "h=2800 kJ/kg" --json
 *
 * Prints a table (each property in the units a plant engineer reads) or, with --json, the state in
 * SI. Bad input prints one line naming the argument and exits with code 2; no stack trace.
 */

import { ph, ps, pt, px, tsat, tx, SteamRangeError, type SteamState } from '../shared/steam';
import { fromSI, unitLabel, UnitError } from '../shared/units';
import { parseSteamArgs, SteamArgError, USAGE, type SteamArgs } from './steam-args';

type StateRequest = Extract<SteamArgs, { kind: 'state' }>;
type Row = readonly [quantity: string, value: string, unit: string];

function solve(req: StateRequest): SteamState {
  const [a, b] = req.values;
  switch (req.pair) {
    case 'pt':
      return pt(a, b);
    case 'ph':
      return ph(a, b);
    case 'ps':
      return ps(a, b);
    case 'px':
      return px(a, b);
    case 'tx':
      return tx(a, b);
  }
}

const fixed = (v: number | null | undefined, digits: number): string =>
  v === null || v === undefined ? '—' : v.toFixed(digits);
const significant = (v: number | null | undefined, digits: number): string =>
  v === null || v === undefined ? '—' : Number(v.toPrecision(digits)).toString();
const kilo = (v: number | null | undefined): number | null => (v === null || v === undefined ? null : v / 1000);

function saturationTemperature(p: number): number | null {
  try {
    return tsat(p);
  } catch (e) {
    if (e instanceof SteamRangeError) return null; // above the critical pressure: no saturation
    throw e;
  }
}

function rows(state: SteamState, req: StateRequest): Row[] {
  const out: Row[] = [];
  const bar = fromSI('pressure', state.p, 'bar', 'absolute');
  out.push(['pressure p', fixed(bar, 5), unitLabel('bar', 'absolute')]);
  out.push(['', fixed(state.p / 1e6, 6), 'MPa']);
  if (req.barometric) {
    const gauge = fromSI('pressure', state.p, 'bar', 'gauge', { barometricPa: req.barometric.pa });
    out.push(['', fixed(gauge, 5), unitLabel('bar', 'gauge')]);
  }
  out.push(['temperature T', fixed(state.T - 273.15, 3), '°C']);
  out.push(['', fixed(state.T, 3), 'K']);
  const ts = saturationTemperature(state.p);
  if (ts !== null) out.push(['saturation temperature at p', fixed(ts - 273.15, 3), '°C']);
  out.push(['specific enthalpy h', fixed(kilo(state.h), 3), 'kJ/kg']);
  out.push(['specific entropy s', fixed(kilo(state.s), 5), 'kJ/(kg·K)']);
  out.push(['specific internal energy u', fixed(kilo(state.u), 3), 'kJ/kg']);
  out.push(['specific volume v', significant(state.v, 6), 'm³/kg']);
  out.push(['density ρ', significant(1 / state.v, 6), 'kg/m³']);
  out.push(['isobaric heat capacity cp', fixed(kilo(state.cp), 5), 'kJ/(kg·K)']);
  out.push(['isochoric heat capacity cv', fixed(kilo(state.cv), 5), 'kJ/(kg·K)']);
  out.push(['speed of sound w', fixed(state.w, 2), 'm/s']);
  out.push(['vapour fraction x', fixed(state.x, 5), '']);
  out.push(['IF97 region', String(state.region), '']);
  out.push(['phase', String(state.phase), '']);
  if (req.barometric) {
    const source =
      req.barometric.source === 'elevation'
        ? `(ICAO standard atmosphere at ${req.barometric.text} m)`
        : `(reading ${req.barometric.text})`;
    out.push(['barometric pressure', fixed(req.barometric.pa / 100, 2), `mbar ${source}`]);
  }
  return out;
}

function table(all: readonly Row[]): string {
  const header: Row = ['quantity', 'value', 'unit'];
  const lines = [header, ...all];
  const w0 = Math.max(...lines.map((r) => r[0].length));
  const w1 = Math.max(...lines.map((r) => r[1].length));
  return lines
    .map((r, i) => {
      const value = i === 0 ? r[1].padEnd(w1) : r[1].padStart(w1);
      return `${r[0].padEnd(w0)}  ${value}  ${r[2]}`.trimEnd();
    })
    .join('\n');
}

function main(argv: readonly string[]): number {
  try {
    const args = parseSteamArgs(argv);
    if (args.kind === 'help') {
      process.stdout.write(`${USAGE}\n`);
      return 0;
    }
    const state = solve(args);
    if (args.json) {
      const input = Object.fromEntries(Object.entries(args.inputs).map(([k, v]) => [k, { text: v.text, si: v.si }]));
      const out = { pair: args.pair, input, barometricPa: args.barometric?.pa ?? null, state };
      process.stdout.write(`${JSON.stringify(out, null, 2)}\n`);
    } else {
      process.stdout.write(`${table(rows(state, args))}\n`);
    }
    return 0;
  } catch (e) {
    if (e instanceof SteamArgError || e instanceof UnitError || e instanceof SteamRangeError) {
      process.stderr.write(`steam: ${e.message}\n`);
      return 2;
    }
    process.stderr.write(`steam: unexpected error: ${e instanceof Error ? e.message : String(e)}\n`);
    return 1;
  }
}

process.exitCode = main(process.argv.slice(2));
