/**
 * An instrument's health figures said in words, in the unit on the gauge's face (bar, kPa, °C,
 * t/h, %, MW) with digits its uncertainty supports. Pure (no React).
 *
 * Digits: the standard uncertainty is given to two significant digits and the estimate rounded to
 * the same decimal place (GUM, JCGM 100:2008, §7.2.6). A bias counts as evidence only where it
 * lies outside its expanded uncertainty at k = 2 (about 95 %, GUM §6.3); inside it the words are
 * "no evidence of a bias", never "reads true".
 */
import type { InstrumentHealth } from '@/shared/api/analysis';
import { fromSI, fromSIDelta, type PressureRef, type Quantity } from '@/shared/units';

/** Decimal places that show `u` with two significant digits (GUM §7.2.6). */
export function decimalsFor(u: number): number {
  if (!(u > 0) || !Number.isFinite(u)) return 0;
  return Math.max(0, 1 - Math.floor(Math.log10(u)));
}

/** `x` to `d` decimals, without a "-0". */
export function fixed(x: number, d: number): string {
  const s = x.toFixed(d);
  return /^-0(\.0+)?$/.test(s) ? s.slice(1) : s;
}

/**
 * A reading and, beside it, the balances' value with its ±2σ, in the gauge's unit: both to the
 * decimal place of 2σ at two significant digits (GUM §7.2.6). "8.74 kPa abs · balance 10.91 ± 0.31 kPa abs".
 */
export function pointInWords(
  q: Quantity,
  unit: string,
  reference: PressureRef | null,
  barometricPa: number | null,
  reading: number | null,
  ref: number | null,
  sigma: number | null,
): string {
  const label = gaugeUnitLabel(unit, reference);
  const U = sigma === null ? null : deltaInUnit(q, 2 * sigma, unit);
  const d = U !== null && U > 0 ? decimalsFor(U) : 2;
  const r = reading === null ? null : valueInUnit(q, reading, unit, reference, barometricPa);
  const b = ref === null ? null : valueInUnit(q, ref, unit, reference, barometricPa);
  const read = reading === null ? 'no reading' : r === null ? 'not shown' : `${fixed(r, d)} ${label}`;
  if (b === null) return read;
  return `${read} · balance ${fixed(b, d)}${U !== null && U > 0 ? ` ± ${fixed(U, d)}` : ''} ${label}`;
}

/** A difference (SI) in the gauge's unit, as a number; null where the unit cannot take it. */
export function deltaInUnit(q: Quantity, dSi: number, unit: string): number | null {
  try {
    return fromSIDelta(q, dSi, unit);
  } catch {
    return null;
  }
}

/** "bar(g)", "kPa vacuum", "°C": the unit as the gauge shows it. */
export function gaugeUnitLabel(unit: string, reference: PressureRef | null): string {
  if (reference === 'gauge') return `${unit}(g)`;
  if (reference === 'vacuum') return `${unit} vacuum`;
  if (reference === 'absolute') return `${unit} abs`;
  return unit;
}

/**
 * The estimated bias in words: "reads 0.52 K high (± 0.18 K, 95 %)", "no evidence of a bias
 * (within ± 0.012 bar, 95 %)", "no estimate". A pressure difference has no reference: "bar", not
 * "bar(g)".
 */
export function biasInWords(q: Quantity, unit: string, biasSi: number | null, uSi: number | null): string {
  if (biasSi === null) return 'no estimate';
  const b = deltaInUnit(q, biasSi, unit);
  if (b === null) return 'no estimate';
  const u = uSi === null ? null : deltaInUnit(q, uSi, unit);
  // no uncertainty of the difference: the balances do not correct it (no redundancy), so a mean
  // difference of zero says nothing about its bias
  if (u === null || !(u > 0)) return 'bias not determinable from these instruments';
  const U = 2 * Math.abs(u);
  const d = decimalsFor(U);
  if (Math.abs(b) <= U) return `no evidence of a bias (within ± ${fixed(U, d)} ${unit}, 95 %)`;
  return `reads ${fixed(Math.abs(b), d)} ${unit} ${b > 0 ? 'high' : 'low'} (± ${fixed(U, d)} ${unit}, 95 %)`;
}

export type HealthMark = { glyph: string; word: string; level: 1 | 2 | 3 | 'ok' };

/**
 * The status said with the evidence: an instrument with strong evidence against it is never shown
 * as in service with a tick, whatever its recorded status; one no balance tests gets no tick either.
 */
export function healthMark(status: string, evidence: InstrumentHealth['evidence']): HealthMark {
  if (status === 'out-of-service') return { glyph: '▲', word: 'Out of service', level: 2 };
  if (status === 'suspect') return { glyph: '◆', word: 'Suspect', level: 1 };
  if (evidence.level === 'strong') return { glyph: '◆', word: 'Evidence against it', level: 1 };
  if (evidence.level === 'some') return { glyph: '▲', word: 'In service, some evidence against it', level: 2 };
  if (evidence.level === 'untested') return { glyph: '●', word: 'In service, not tested since calibration', level: 3 };
  return { glyph: '✓', word: 'In service, no evidence against it', level: 'ok' };
}

/** "strong evidence it reads high: CUSUM 9.4 (alarm at 6) over 23 rounds since its calibration of 2026-10-01". */
export function evidenceInWords(e: InstrumentHealth['evidence']): string {
  if (e.level === 'untested') return 'no round has tested it since its last calibration';
  const since = e.since ? `since ${e.since.slice(0, 10)}` : 'since its first analysed round';
  const rounds = `${e.rounds} round${e.rounds === 1 ? '' : 's'} ${since}`;
  const stat = `CUSUM ${e.cusum.toFixed(1)}, alarm at ${e.threshold}`;
  if (e.level === 'strong') return `strong evidence it reads ${e.direction ?? 'off'}: ${stat}, over ${rounds}`;
  if (e.level === 'some') return `some evidence it reads ${e.direction ?? 'off'}: ${stat}, over ${rounds}`;
  return `no evidence against it: ${stat}, over ${rounds}`;
}

/** What the calibrations said of the evidence, or that none has been recorded. */
export function calibrationsInWords(c: InstrumentHealth['calibrations']): string {
  if (c.closed === 0) return 'no calibration record yet: nothing has confirmed or refuted the evidence';
  const undecided = c.closed - c.confirmed - c.refuted;
  return `${c.closed} calibration${c.closed === 1 ? '' : 's'} recorded: ${c.confirmed} found it off by more than 2σ (confirmed), ${c.refuted} within 2σ (refuted)${undecided ? `, ${undecided} without a σ to compare` : ''}`;
}

/** A reading (SI) as the gauge shows it; gauge and vacuum need the round's barometric pressure. */
export function valueInUnit(
  q: Quantity,
  si: number,
  unit: string,
  reference: PressureRef | null,
  barometricPa: number | null,
): number | null {
  try {
    return fromSI(
      q,
      si,
      unit,
      q === 'pressure' ? (reference ?? 'absolute') : undefined,
      barometricPa === null ? undefined : { barometricPa },
    );
  } catch {
    return null;
  }
}
