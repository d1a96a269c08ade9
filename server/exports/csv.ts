/**
 * CSV for spreadsheets (RFC 4180 through csv-stringify), with spreadsheet formula injection
 * neutralised as the OWASP "CSV Injection" guidance says: a text cell starting with = + - @, a tab
 * or a carriage return gets a leading single quote, so a spreadsheet shows it as text instead of
 * running it. Numbers stay numbers (a negative reading is not text and is left alone); null is an
 * empty cell; dates are ISO 8601 UTC.
 */
import { stringify } from 'csv-stringify/sync';

export type Cell = string | number | boolean | Date | null | undefined;

const FORMULA_START = /^[=+\-@\t\r]/;

export function neutralise(text: string): string {
  return FORMULA_START.test(text) ? `'${text}` : text;
}

export function cell(v: Cell): string | number {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') return Number.isFinite(v) ? v : '';
  if (typeof v === 'boolean') return v ? 'true' : 'false';
  if (v instanceof Date) return v.toISOString();
  return neutralise(v);
}

/** Rows to CSV text; `header` once when given. Lines end in CRLF (RFC 4180). */
export function toCsv(rows: readonly Cell[][], header?: readonly string[]): string {
  const body = rows.map((r) => r.map(cell));
  return stringify(header ? [header.map((h) => neutralise(h)), ...body] : body, { record_delimiter: 'windows' });
}
