/**
 * Command-line arguments of scripts/steam.ts, parsed into SI values without touching the steam
 * property module, so the parsing is tested on its own.
 *
 *   "p=12 bar(g)" "T=250 °C" --elevation 180
 *   "p=1 MPa(a)" "h=2800 kJ/kg" --json
 *   "T=180 °C" "x=0.9"
 */

import {
  parseLeadingNumber,
  parseQuantity,
  siteBarometricPa,
  toSI,
  UnitError,
  type SiteContext,
} from '../shared/units';

export class SteamArgError extends Error {
  /** The argument at fault: p, T, h, s, x, --elevation, --barometric, or the whole command line. */
  readonly field: string;
  constructor(message: string, field: string, options?: { cause?: unknown }) {
    super(message, options);
    this.name = 'SteamArgError';
    this.field = field;
  }
}

export type StateVariable = 'p' | 'T' | 'h' | 's' | 'x';
/** The pairs the steam module solves: pt(p,T), ph(p,h), ps(p,s), px(p,x), tx(T,x). */
export type SteamPair = 'pt' | 'ph' | 'ps' | 'px' | 'tx';

export const SUPPORTED_PAIRS: readonly { pair: SteamPair; vars: readonly [StateVariable, StateVariable] }[] = [
  { pair: 'pt', vars: ['p', 'T'] },
  { pair: 'ph', vars: ['p', 'h'] },
  { pair: 'ps', vars: ['p', 's'] },
  { pair: 'px', vars: ['p', 'x'] },
  { pair: 'tx', vars: ['T', 'x'] },
];

const PAIRS_TEXT = SUPPORTED_PAIRS.map((p) => `${p.vars[0]}+${p.vars[1]}`).join(', ');

export interface SteamInput {
  /** As typed after "name=". */
  text: string;
  /** SI: Pa absolute, K, J/kg, J/(kg·K), or the vapour fraction. */
  si: number;
}

export interface Barometric {
  pa: number;
  source: 'reading' | 'elevation';
  /** As typed: "1013 mbar" or "180". */
  text: string;
}

export type SteamArgs =
  | { kind: 'help' }
  | {
      kind: 'state';
      pair: SteamPair;
      /** SI values in the order of the pair: pt → [p, T]. */
      values: [number, number];
      inputs: Partial<Record<StateVariable, SteamInput>>;
      barometric?: Barometric;
      json: boolean;
    };

export const USAGE = `Usage: npm run steam -- <two of p, T, h, s, x> [options]

State of water or steam (IAPWS-IF97) from a pair of properties:
  ${PAIRS_TEXT}

  p=<value unit>   pressure with its reference: "p=12 bar(g)", "p=1.2 MPa(a)", "p=150 psig", "p=600 mmHg vac"
  T=<value unit>   temperature: "T=250 °C", "T=250 degC", "T=482 F", "T=523.15 K"
  h=<value unit>   specific enthalpy: "h=2800 kJ/kg", "h=2.8e6 J/kg"
  s=<value unit>   specific entropy: "s=6.5 kJ/(kg K)", "s=6500 J/(kg K)"
  x=<value>        vapour fraction: "x=0.9" (or "x=90 %")

Options:
  --elevation <m>        site elevation above sea level, for gauge and vacuum pressures (ICAO standard atmosphere)
  --barometric <value>   barometric pressure read on site instead, e.g. "1013 mbar"
  --json                 print the state as JSON in SI units
  --help                 this text

Quote each value: "p=12 bar(g)". Errors exit with code 2.`;

/** Specific enthalpy units → J/kg. */
const ENTHALPY_UNITS: Readonly<Record<string, number>> = { 'j/kg': 1, 'kj/kg': 1e3, 'mj/kg': 1e6 };
/** Specific entropy units → J/(kg·K); spellings are folded: no spaces, no "·*.⋅", lower case. */
const ENTROPY_UNITS: Readonly<Record<string, number>> = {
  'j/(kgk)': 1,
  'j/kgk': 1,
  'j/kg/k': 1,
  'kj/(kgk)': 1e3,
  'kj/kgk': 1e3,
  'kj/kg/k': 1e3,
};

const fold = (unit: string): string => unit.replace(/[\s·⋅*.]/g, '').toLowerCase();

function specificUnit(name: 'h' | 's', text: string, table: Readonly<Record<string, number>>, allowed: string): number {
  const { value, rest } = parseLeadingNumber(text);
  const factor = table[fold(rest)];
  if (factor === undefined) {
    throw new SteamArgError(
      rest === ''
        ? `${name}=${text}: no unit; allowed: ${allowed}`
        : `${name}=${text}: unknown unit "${rest}"; allowed: ${allowed}`,
      name,
    );
  }
  return value * factor;
}

function vapourFraction(text: string): number {
  const { value, rest } = parseLeadingNumber(text);
  let x: number;
  if (rest === '') x = value;
  else if (rest === '%') x = value / 100;
  else
    throw new SteamArgError(`x=${text}: x is a fraction from 0 to 1 (or a percentage with %), got unit "${rest}"`, 'x');
  if (x < 0 || x > 1) {
    throw new SteamArgError(`x=${text}: vapour fraction must be from 0 to 1, got ${x}`, 'x');
  }
  return x;
}

const NAMES: Readonly<Record<string, StateVariable>> = {
  p: 'p',
  P: 'p',
  t: 'T',
  T: 'T',
  h: 'h',
  H: 'h',
  s: 's',
  S: 's',
  x: 'x',
  X: 'x',
};

function elevationMetres(text: string): number {
  const { value, rest } = parseLeadingNumber(text);
  if (rest !== '' && rest !== 'm') {
    throw new SteamArgError(`--elevation ${text}: give metres above sea level, e.g. --elevation 180`, '--elevation');
  }
  return value;
}

function barometricReading(text: string): number {
  const q = parseQuantity(text, { expect: 'pressure' });
  if (q.reference !== undefined && q.reference !== 'absolute') {
    throw new SteamArgError(
      `--barometric ${text}: a barometric pressure is absolute, not ${q.reference}`,
      '--barometric',
    );
  }
  const pa = toSI({ ...q, reference: 'absolute' });
  return siteBarometricPa({ barometricPa: pa })!;
}

/** Rethrows a UnitError as a SteamArgError naming the argument; passes other errors on. */
function named<T>(field: string, prefix: string, f: () => T): T {
  try {
    return f();
  } catch (e) {
    if (e instanceof UnitError) {
      const hint = e.code === 'missingBarometric' ? '; add --elevation <m> or --barometric "<value unit>"' : '';
      throw new SteamArgError(`${prefix}: ${e.message}${hint}`, field, { cause: e });
    }
    throw e;
  }
}

/** Parses the command line (without node and the script name). */
export function parseSteamArgs(argv: readonly string[]): SteamArgs {
  if (argv.includes('--help') || argv.includes('-h')) return { kind: 'help' };

  let json = false;
  let elevationText: string | undefined;
  let barometricText: string | undefined;
  const texts: Partial<Record<StateVariable, string>> = {};

  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i];
    const option = /^--(elevation|barometric)(?:=(.*))?$/s.exec(arg);
    if (option) {
      const name = `--${option[1]}`;
      let value = option[2];
      if (value === undefined) {
        if (i + 1 >= argv.length) throw new SteamArgError(`${name} needs a value`, name);
        value = argv[++i];
      }
      if (name === '--elevation') {
        if (elevationText !== undefined) throw new SteamArgError(`--elevation given twice`, name);
        elevationText = value;
      } else {
        if (barometricText !== undefined) throw new SteamArgError(`--barometric given twice`, name);
        barometricText = value;
      }
      continue;
    }
    if (arg === '--json') {
      json = true;
      continue;
    }
    if (arg.startsWith('-')) {
      throw new SteamArgError(`unknown option ${arg}; see --help`, arg);
    }
    const pair = /^\s*([A-Za-z]+)\s*=(.*)$/s.exec(arg);
    if (!pair) {
      throw new SteamArgError(
        `unexpected argument "${arg}"; give properties as name=value and quote each one, e.g. "p=12 bar(g)"`,
        arg,
      );
    }
    const name = NAMES[pair[1]];
    if (!name) {
      throw new SteamArgError(`unknown property "${pair[1]}" in "${arg}"; use p, T, h, s or x`, pair[1]);
    }
    if (texts[name] !== undefined) throw new SteamArgError(`${name} given twice`, name);
    texts[name] = pair[2].trim();
  }

  if (elevationText !== undefined && barometricText !== undefined) {
    throw new SteamArgError(`give --elevation or --barometric, not both`, '--barometric');
  }
  let barometric: Barometric | undefined;
  if (elevationText !== undefined) {
    const text = elevationText;
    const metres = named('--elevation', `--elevation ${text}`, () => elevationMetres(text));
    const ctx: SiteContext = { elevationM: metres };
    barometric = {
      pa: named('--elevation', `--elevation ${text}`, () => siteBarometricPa(ctx)!),
      source: 'elevation',
      text,
    };
  } else if (barometricText !== undefined) {
    const text = barometricText;
    barometric = {
      pa: named('--barometric', `--barometric ${text}`, () => barometricReading(text)),
      source: 'reading',
      text,
    };
  }

  const given = (Object.keys(texts) as StateVariable[]).sort((a, b) => 'pThsx'.indexOf(a) - 'pThsx'.indexOf(b));
  if (given.length !== 2) {
    throw new SteamArgError(
      `give exactly two properties, one of the pairs ${PAIRS_TEXT}; got ${given.length === 0 ? 'none' : given.join(', ')}`,
      'command line',
    );
  }
  const match = SUPPORTED_PAIRS.find((p) => p.vars[0] === given[0] && p.vars[1] === given[1]);
  if (!match) {
    throw new SteamArgError(`${given.join('+')} is not a supported pair; use one of ${PAIRS_TEXT}`, 'command line');
  }

  const ctx: SiteContext = barometric ? { barometricPa: barometric.pa } : {};
  const inputs: Partial<Record<StateVariable, SteamInput>> = {};
  for (const name of given) {
    const text = texts[name]!;
    const si = named(name, `${name}=${text}`, () => {
      switch (name) {
        case 'p':
          return toSI(parseQuantity(text, { expect: 'pressure' }), ctx);
        case 'T':
          return toSI(parseQuantity(text, { expect: 'temperature' }));
        case 'h':
          return specificUnit('h', text, ENTHALPY_UNITS, 'kJ/kg, J/kg, MJ/kg');
        case 's':
          return specificUnit('s', text, ENTROPY_UNITS, 'kJ/(kg K), J/(kg K)');
        case 'x':
          return vapourFraction(text);
      }
    });
    inputs[name] = { text, si };
  }
  return {
    kind: 'state',
    pair: match.pair,
    values: [inputs[match.vars[0]]!.si, inputs[match.vars[1]]!.si],
    inputs,
    barometric,
    json,
  };
}
