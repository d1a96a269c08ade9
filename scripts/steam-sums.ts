/**
 * Writes shared/steam/sums.generated.ts: the hot IAPWS-IF97 power sums Σ n x^I y^J of
 * shared/steam/*.coefficients.ts turned into straight-line code (the powers each table needs
 * built by repeated squaring, the coefficients and their products n·J, n·J(J − 1) as literals).
 * The tables stay the one source: `npm run steam:sums` regenerates the file, and
 * tests/unit/steam/generated-sums.test.ts fails when it is stale or differs from the generic
 * evaluator (shared/steam/power-sum.ts).
 *
 * Straight-line code runs about three times faster than the generic table loop in V8
 * (measured in `npm run bench -- steam`); it is generated at development time, not at run time,
 * because the app runs where `new Function` is not allowed.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Term } from '../shared/steam/power-sum';
import { REGION1_GIBBS, REGION1_T_PH, REGION1_T_PS } from '../shared/steam/region1.coefficients';
import {
  B2BC_N,
  REGION2A_T_PH,
  REGION2A_T_PS,
  REGION2B_T_PH,
  REGION2B_T_PS,
  REGION2C_T_PH,
  REGION2C_T_PS,
  REGION2_IDEAL,
  REGION2_RESIDUAL,
} from '../shared/steam/region2.coefficients';
import {
  H3AB_N,
  REGION3A_T_PH,
  REGION3A_T_PS,
  REGION3A_V_PH,
  REGION3A_V_PS,
  REGION3B_T_PH,
  REGION3B_T_PS,
  REGION3B_V_PH,
  REGION3B_V_PS,
  REGION3_HELMHOLTZ,
  REGION3_N1,
  REGION3_PSAT_H,
  REGION3_PSAT_S,
} from '../shared/steam/region3.coefficients';
import { REGION5_IDEAL, REGION5_RESIDUAL } from '../shared/steam/region5.coefficients';

/**
 * derivs: (x, y, out) fills out = [f, f_x, f_xx, f_y, f_yy, f_xy] like PowerSum.derivs;
 * derivsY: (y, out) for tables without x (every I is 0) fills out[0], out[3], out[4] (f, f_y, f_yy);
 * value: (x, y) returns f.
 */
export type SumKind = 'derivs' | 'derivsY' | 'value';

export interface SumSpec {
  readonly name: string;
  readonly doc: string;
  readonly rows: readonly Term[];
  readonly kind: SumKind;
  /** multiply every I by this (the caller passes x^(1/iScale)), as PowerSum's iScale */
  readonly iScale?: number;
}

export const SUMS: readonly SumSpec[] = [
  {
    name: 'region1GibbsSum',
    doc: 'IF97 Eq. (7), Table 2: γ of region 1, x = 7.1 − π, y = τ − 1.222',
    rows: REGION1_GIBBS,
    kind: 'derivs',
  },
  {
    name: 'region2ResidualSum',
    doc: 'IF97 Eq. (17), Table 11: γʳ of region 2, x = π, y = τ − 0.5',
    rows: REGION2_RESIDUAL,
    kind: 'derivs',
  },
  {
    name: 'region2IdealSum',
    doc: 'IF97 Eq. (16), Table 10: γ° of region 2 without ln π, y = τ',
    rows: REGION2_IDEAL,
    kind: 'derivsY',
  },
  {
    name: 'region3HelmholtzSum',
    doc: 'IF97 Eq. (28), Table 30: φ of region 3 without n1 ln δ, x = δ, y = τ',
    rows: REGION3_HELMHOLTZ,
    kind: 'derivs',
  },
  {
    name: 'region5ResidualSum',
    doc: 'IF97 Eq. (34), Table 38: γʳ of region 5, x = π, y = τ',
    rows: REGION5_RESIDUAL,
    kind: 'derivs',
  },
  {
    name: 'region5IdealSum',
    doc: 'IF97 Eq. (33), Table 37: γ° of region 5 without ln π, y = τ',
    rows: REGION5_IDEAL,
    kind: 'derivsY',
  },
  { name: 'region1TPhSum', doc: 'IF97 Eq. (11), Table 6', rows: REGION1_T_PH, kind: 'value' },
  { name: 'region1TPsSum', doc: 'IF97 Eq. (13), Table 8', rows: REGION1_T_PS, kind: 'value' },
  { name: 'region2aTPhSum', doc: 'IF97 Eq. (22), Table 20', rows: REGION2A_T_PH, kind: 'value' },
  { name: 'region2bTPhSum', doc: 'IF97 Eq. (23), Table 21', rows: REGION2B_T_PH, kind: 'value' },
  { name: 'region2cTPhSum', doc: 'IF97 Eq. (24), Table 22', rows: REGION2C_T_PH, kind: 'value' },
  {
    name: 'region2aTPsSum',
    doc: 'IF97 Eq. (25), Table 25 (I in quarters: x = π^(1/4))',
    rows: REGION2A_T_PS,
    kind: 'value',
    iScale: 4,
  },
  { name: 'region2bTPsSum', doc: 'IF97 Eq. (26), Table 26', rows: REGION2B_T_PS, kind: 'value' },
  { name: 'region2cTPsSum', doc: 'IF97 Eq. (27), Table 27', rows: REGION2C_T_PS, kind: 'value' },
  { name: 'region3aTPhSum', doc: 'SR3 Eq. (2)', rows: REGION3A_T_PH, kind: 'value' },
  { name: 'region3bTPhSum', doc: 'SR3 Eq. (3)', rows: REGION3B_T_PH, kind: 'value' },
  { name: 'region3aVPhSum', doc: 'SR3 Eq. (4)', rows: REGION3A_V_PH, kind: 'value' },
  { name: 'region3bVPhSum', doc: 'SR3 Eq. (5)', rows: REGION3B_V_PH, kind: 'value' },
  { name: 'region3aTPsSum', doc: 'SR3 Eq. (6)', rows: REGION3A_T_PS, kind: 'value' },
  { name: 'region3bTPsSum', doc: 'SR3 Eq. (7)', rows: REGION3B_T_PS, kind: 'value' },
  { name: 'region3aVPsSum', doc: 'SR3 Eq. (8)', rows: REGION3A_V_PS, kind: 'value' },
  { name: 'region3bVPsSum', doc: 'SR3 Eq. (9)', rows: REGION3B_V_PS, kind: 'value' },
  { name: 'region3PsatHSum', doc: 'SR3 Eq. (10)', rows: REGION3_PSAT_H, kind: 'value' },
  { name: 'region3PsatSSum', doc: 'SR3 Eq. (11)', rows: REGION3_PSAT_S, kind: 'value' },
];

/**
 * The few single coefficients the region modules need besides the sums, copied so that the app
 * bundle does not carry the row tables (the tables are for this generator and the tests).
 */
const CONSTANTS: readonly { name: string; doc: string; value: number | readonly number[] }[] = [
  { name: 'B2BC_N', doc: 'IF97 Table 19, Eqs. (20), (21): n1 … n5 of the 2b/2c boundary', value: B2BC_N },
  { name: 'H3AB_N', doc: 'SR3 Eq. (1): n1 … n4 of the 3a/3b boundary h3ab(p)', value: H3AB_N },
  { name: 'REGION3_N1', doc: 'IF97 Table 30: n1 of Eq. (28), the coefficient of ln δ', value: REGION3_N1 },
];

/** A double as the shortest literal that reads back to it. */
function lit(v: number): string {
  if (!Number.isFinite(v)) throw new Error(`steam-sums: ${v} is not a finite coefficient`);
  return String(v);
}

/** `c · name` terms joined into one sum, signs folded in ("a - 0.5 * y3"); "0" when empty. */
function sum(terms: readonly { c: number; v: string }[], indent: string): string {
  const parts = terms.filter((t) => t.c !== 0);
  if (parts.length === 0) return '0';
  return parts
    .map((t, i) => {
      const mag = t.c < 0 ? -t.c : t.c;
      const body = t.v === '1' ? lit(mag) : mag === 1 ? t.v : `${lit(mag)} * ${t.v}`;
      if (i === 0) return t.c < 0 ? `-${body}` : body;
      return `${indent}${t.c < 0 ? '- ' : '+ '}${body}`;
    })
    .join('\n');
}

/**
 * Statements that define the powers base^e for every e in `needed` (named p1, p2, pm1 … for
 * prefix p), each from two smaller ones (e = ⌊e/2⌋ + ⌈e/2⌉), so the chains stay short.
 */
function powers(prefix: string, base: string, needed: Iterable<number>): string[] {
  const name = (e: number) => (e === 1 ? base : `${prefix}${e < 0 ? `m${-e}` : e}`);
  const have = new Set<number>([1]);
  const lines: string[] = [];
  const ensure = (e: number): void => {
    if (have.has(e) || e === 0) return;
    if (e === -1) {
      lines.push(`const ${name(-1)} = 1 / ${base};`);
      have.add(-1);
      return;
    }
    const half = Math.sign(e) * Math.floor(Math.abs(e) / 2);
    ensure(half);
    ensure(e - half);
    lines.push(`const ${name(e)} = ${name(half)} * ${name(e - half)};`);
    have.add(e);
  };
  for (const e of [...new Set(needed)].sort((a, b) => Math.abs(a) - Math.abs(b))) ensure(e);
  return lines;
}

const pow = (prefix: string, base: string, e: number): string => (e === 1 ? base : `${prefix}${e < 0 ? `m${-e}` : e}`);

/** Signature and doc words of each kind of generated function. */
const KIND_TEXT: Readonly<Record<SumKind, { sig: string; what: string }>> = {
  derivs: {
    sig: '(x: number, y: number, out: Float64Array): void',
    what: 'fills out = [f, f_x, f_xx, f_y, f_yy, f_xy]',
  },
  derivsY: { sig: '(y: number, out: Float64Array): void', what: 'fills out[0], out[3], out[4] = f, f_y, f_yy' },
  value: { sig: '(x: number, y: number): number', what: 'returns Σ nᵢ x^Iᵢ y^Jᵢ' },
};

function generateOne(spec: SumSpec): string {
  const iScale = spec.iScale ?? 1;
  const rows = spec.rows.map((r) => ({ I: r.I * iScale, J: r.J, n: r.n })).sort((a, b) => a.I - b.I || a.J - b.J);
  for (const r of rows) {
    if (!Number.isInteger(r.I) || !Number.isInteger(r.J))
      throw new Error(`steam-sums: ${spec.name} has exponents ${r.I}, ${r.J} that are not integers`);
  }
  const groups = [...new Set(rows.map((r) => r.I))].map((I) => ({ I, rows: rows.filter((r) => r.I === I) }));
  if (spec.kind === 'derivsY' && groups.some((g) => g.I !== 0))
    throw new Error(`steam-sums: ${spec.name} has powers of x`);
  const ind = '    ';
  const y = (J: number) => (J === 0 ? '1' : pow('y', 'y', J));
  const body: string[] = [];
  body.push(
    ...powers(
      'x',
      'x',
      groups.map((g) => g.I).filter((I) => I !== 0),
    ),
  );
  body.push(
    ...powers(
      'y',
      'y',
      rows.map((r) => r.J).filter((J) => J !== 0),
    ),
  );
  const xI = (I: number) => (I === 0 ? '' : `${pow('x', 'x', I)} * `);
  const withDerivs = spec.kind !== 'value';
  groups.forEach((g, gi) => {
    body.push(`// I = ${g.I}`);
    body.push(
      `const a${gi} =\n${ind}${sum(
        g.rows.map((r) => ({ c: r.n, v: y(r.J) })),
        ind,
      )};`,
    );
    if (withDerivs) {
      body.push(
        `const b${gi} =\n${ind}${sum(
          g.rows.map((r) => ({ c: r.n * r.J, v: y(r.J) })),
          ind,
        )};`,
      );
      body.push(
        `const c${gi} =\n${ind}${sum(
          g.rows.map((r) => ({ c: r.n * r.J * (r.J - 1), v: y(r.J) })),
          ind,
        )};`,
      );
    }
  });
  const over = (f: (g: { I: number }, gi: number) => { c: number; v: string } | null) =>
    sum(
      groups.map(f).filter((t): t is { c: number; v: string } => t !== null),
      ind,
    );
  const f0 = over((g, gi) => ({ c: 1, v: `${xI(g.I)}a${gi}` }));
  if (spec.kind === 'value') {
    body.push(`return (\n${ind}${f0}\n  );`);
  } else {
    const fy = over((g, gi) => ({ c: 1, v: `${xI(g.I)}b${gi}` }));
    const fyy = over((g, gi) => ({ c: 1, v: `${xI(g.I)}c${gi}` }));
    body.push('const iy = 1 / y;');
    body.push(`out[0] =\n${ind}${f0};`);
    body.push(`out[3] =\n${ind}(${fy}) * iy;`);
    body.push(`out[4] =\n${ind}(${fyy}) * iy * iy;`);
    if (spec.kind === 'derivs') {
      const fx = over((g, gi) => (g.I === 0 ? null : { c: g.I, v: `${xI(g.I)}a${gi}` }));
      const fxx = over((g, gi) => (g.I === 0 || g.I === 1 ? null : { c: g.I * (g.I - 1), v: `${xI(g.I)}a${gi}` }));
      const fxy = over((g, gi) => (g.I === 0 ? null : { c: g.I, v: `${xI(g.I)}b${gi}` }));
      body.push('const ix = 1 / x;');
      body.push(`out[1] =\n${ind}(${fx}) * ix;`);
      body.push(`out[2] =\n${ind}(${fxx}) * ix * ix;`);
      body.push(`out[5] =\n${ind}(${fxy}) * ix * iy;`);
    }
  }
  const { sig, what } = KIND_TEXT[spec.kind];
  return `/** ${spec.doc}: ${spec.rows.length} terms; ${what}. */\nexport function ${spec.name}${sig} {\n${body
    .map((l) => l.replace(/^/gm, '  '))
    .join('\n')}\n}\n`;
}

/** The whole text of shared/steam/sums.generated.ts. */
export function generate(): string {
  return [
    '/**',
    ' * GENERATED by scripts/steam-sums.ts from the {I, J, n} tables of shared/steam/*.coefficients.ts;',
    ' * do not edit: change the tables and run `npm run steam:sums`. Each function evaluates one table',
    ' * Σ nᵢ x^Iᵢ y^Jᵢ (and its derivatives) as straight-line code, with the same meaning as',
    ' * PowerSum.value / PowerSum.derivs of shared/steam/power-sum.ts on that table.',
    ' */',
    '',
    ...CONSTANTS.map(
      (c) =>
        `/** ${c.doc}. */\nexport const ${c.name}${typeof c.value === 'number' ? ` = ${lit(c.value)}` : `: readonly number[] = [${c.value.map(lit).join(', ')}]`};\n`,
    ),
    SUMS.map(generateOne).join('\n'),
  ].join('\n');
}

if (process.argv[1] && /steam-sums\.ts$/.test(process.argv[1])) {
  const file = join(__dirname, '..', 'shared', 'steam', 'sums.generated.ts');
  writeFileSync(file, generate());
  console.log(`wrote ${file}`);
}
