/**
 * How an instrument's SI figures are said on screen: absolute pressure in bar (kPa below one
 * bar), temperature in °C, differences in K or kPa, flow in t/h, power in MW, level in %. The
 * quantity comes from the health table or, in evidence, from the tag's first ISA-5.1 letter.
 */
import { healthMark } from '@/lib/instrument-figures';
import type { InstrumentHealth } from '@/shared/api/analysis';
import type { Quantity } from '@/shared/units';
import { SeverityMark } from './severity-mark';
import { ThemedText } from './themed-text';

export function quantityOfTag(tag: string): Quantity | null {
  const first = tag.trim().toUpperCase()[0];
  return first === 'P'
    ? 'pressure'
    : first === 'T'
      ? 'temperature'
      : first === 'F'
        ? 'massFlow'
        : first === 'J' || first === 'W'
          ? 'power'
          : first === 'L'
            ? 'level'
            : null;
}

const fix = (x: number, d: number) => (Math.abs(x) < 0.5 * 10 ** -d ? (0).toFixed(d) : x.toFixed(d));

/** A value as shown with its unit. */
export function showValueOf(q: Quantity | null, si: number): string {
  switch (q) {
    case 'pressure':
      return si < 100_000 ? `${fix(si / 1000, 2)} kPa abs` : `${fix(si / 1e5, 3)} bar abs`;
    case 'temperature':
      return `${fix(si - 273.15, 1)} °C`;
    case 'massFlow':
      return `${fix(si * 3.6, 2)} t/h`;
    case 'power':
      return `${fix(si / 1e6, 3)} MW`;
    case 'level':
      return `${fix(si * 100, 1)} %`;
    default:
      return fix(si, 3);
  }
}

/** A difference (bias, uncertainty) with its unit, unsigned. */
export function showDeltaOf(q: Quantity | null, dSi: number, digits?: number): string {
  const a = Math.abs(dSi);
  switch (q) {
    case 'pressure':
      return a < 1000
        ? `${fix(a, digits ?? 0)} Pa`
        : a < 100_000
          ? `${fix(a / 1000, digits ?? 1)} kPa`
          : `${fix(a / 1e5, digits ?? 3)} bar`;
    case 'temperature':
      return `${fix(a, digits ?? 1)} K`;
    case 'massFlow':
      return `${fix(a * 3.6, digits ?? 2)} t/h`;
    case 'power':
      return `${fix(a / 1e3, digits ?? 0)} kW`;
    case 'level':
      return `${fix(a * 100, digits ?? 1)} %`;
    default:
      return fix(a, digits ?? 3);
  }
}

/** The numeric part only, for a chart's axis (display units). */
export function displayNumber(q: Quantity | null, si: number): number {
  switch (q) {
    case 'pressure':
      return si / 1e5;
    case 'temperature':
      return si - 273.15;
    case 'massFlow':
      return si * 3.6;
    case 'power':
      return si / 1e6;
    case 'level':
      return si * 100;
    default:
      return si;
  }
}
export function displayScale(q: Quantity | null): number {
  return q === 'pressure' ? 1e-5 : q === 'massFlow' ? 3.6 : q === 'power' ? 1e-6 : q === 'level' ? 100 : 1;
}
export function displayUnit(q: Quantity | null): string {
  return q === 'pressure'
    ? 'bar abs'
    : q === 'temperature'
      ? '°C'
      : q === 'massFlow'
        ? 't/h'
        : q === 'power'
          ? 'MW'
          : q === 'level'
            ? '%'
            : '';
}

/** "reads 6.2 K high" / "reads 0.4 kPa low" / "no evidence of a bias" (zero at the shown digits is no evidence, not a true reading). */
export function biasWords(q: Quantity | null, biasSi: number | null): string {
  if (biasSi === null) return 'no estimate';
  const shown = showDeltaOf(q, biasSi);
  if (/^0(\.0+)? /.test(shown)) return 'no evidence of a bias';
  return `reads ${shown} ${biasSi > 0 ? 'high' : 'low'}`;
}

/**
 * An instrument's status said with its evidence (lib/instrument-figures healthMark): strong
 * evidence against it is never shown as in service with a tick.
 */
export function HealthStatusMark({
  status,
  evidence,
  testID,
}: {
  status: string;
  evidence: InstrumentHealth['evidence'];
  testID?: string;
}) {
  const m = healthMark(status, evidence);
  if (m.level !== 'ok') {
    return (
      <ThemedText
        variant="label"
        bold={m.level === 1}
        tone={m.level === 1 ? 'danger' : m.level === 2 ? 'warning' : 'info'}
        testID={testID}
        accessibilityLabel={`Status: ${m.word}`}
      >{`${m.glyph} ${m.word}`}</ThemedText>
    );
  }
  return (
    <ThemedText variant="label" tone="ok" testID={testID} accessibilityLabel={`Status: ${m.word}`}>
      {`${m.glyph} ${m.word}`}
    </ThemedText>
  );
}

/** The instrument's status said as a word with a shape (never colour alone). */
export function InstrumentStatusMark({ status, testID }: { status: string; testID?: string }) {
  if (status === 'suspect') return <SeverityMark severity={1} testID={testID} />;
  if (status === 'out-of-service') return <SeverityMark severity={2} testID={testID} />;
  return (
    <ThemedText variant="label" tone="ok" testID={testID} accessibilityLabel={`Status: ${status}`}>
      {status === 'ok' ? '✓ In service' : status}
    </ThemedText>
  );
}
