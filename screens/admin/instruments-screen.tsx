/** The site's instruments as configured: range, accuracy, calibration interval, status; a row opens its change form. */
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { DataTable, type Column } from '@/components/data-table';
import { InstrumentStatusMark, showDeltaOf, showValueOf } from '@/components/instrument-values';
import { ThemedText } from '@/components/themed-text';
import { space } from '@/constants/theme';
import { useSiteReference } from '@/hooks/queries/instruments';
import type { SyncInstrument } from '@/shared/api/sync';
import { InstrumentEditForm } from './instrument-edit-form';

/** The accuracy spec as stored (shared/uncertainty's shapes), said briefly. */
export function accuracyWords(a: unknown, q: SyncInstrument['quantity']): string {
  if (!a || typeof a !== 'object') return '—';
  const x = a as Record<string, string | number | undefined>;
  const basis =
    x.basis === 'u95' ? ' (95 %)' : x.basis === 'tolerance' ? ' (tolerance)' : x.basis ? ` (${x.basis})` : '';
  switch (x.kind) {
    case 'en837':
      return `EN 837 class ${x.class}`;
    case 'asmeB40':
      return `ASME B40.100 grade ${x.grade}`;
    case 'iec60751':
      return `IEC 60751 class ${x.class}`;
    case 'iec60584':
      return `IEC 60584 type ${x.type}, class ${x.class}`;
    case 'orifice':
      return `Orifice, β ${x.beta}${x.otherPercent !== undefined ? `, other ±${x.otherPercent} %` : ''}`;
    case 'percentReading':
      return `±${x.percent} % of reading${basis}`;
    case 'percentSpan':
      return `±${x.percent} % of span${basis}`;
    case 'absolute':
      return `±${showDeltaOf(q, Number(x.value), 2)}${basis}`;
    case 'sigma':
      return `σ ${showDeltaOf(q, Number(x.sigma), 2)}`;
    default:
      return String(x.kind ?? '—');
  }
}

const columns: Column<SyncInstrument>[] = [
  {
    key: 'tag',
    label: 'Tag',
    flex: 1,
    render: (i) => (
      <ThemedText variant="label" bold>
        {i.tag}
      </ThemedText>
    ),
  },
  { key: 'ref', label: 'Reads', flex: 1, render: (i) => `${i.gaugeUnit}${i.reference ? ` ${i.reference}` : ''}` },
  {
    key: 'range',
    label: 'Range',
    flex: 1.8,
    numeric: true,
    render: (i) =>
      i.range
        ? i.quantity === 'pressure' && i.reference !== 'absolute'
          ? `${(i.range.min / 1e5).toFixed(2)} – ${(i.range.max / 1e5).toFixed(2)} bar ${i.reference}`
          : `${showValueOf(i.quantity, i.range.min)} – ${showValueOf(i.quantity, i.range.max)}`
        : '—',
  },
  { key: 'acc', label: 'Accuracy', flex: 2, render: (i) => accuracyWords(i.accuracy, i.quantity) },
  { key: 'cal', label: 'Calibrated', flex: 1, numeric: true, render: (i) => i.calibrationDate ?? '—' },
  {
    key: 'int',
    label: 'Interval, days',
    flex: 0.9,
    numeric: true,
    render: (i) => (i.calibrationIntervalDays === null ? '—' : String(i.calibrationIntervalDays)),
  },
  { key: 'status', label: 'Status', flex: 1.1, render: (i) => <InstrumentStatusMark status={i.status} /> },
];

export function AdminInstrumentsScreen() {
  const q = useSiteReference();
  const rows = [...(q.data?.instruments ?? [])].sort((a, b) => a.tag.localeCompare(b.tag));
  const [selected, setSelected] = useState<string | null>(null);
  const editing = rows.find((i) => i.id === selected);
  return (
    <View style={styles.stack}>
      <ThemedText variant="heading">Instruments</ThemedText>
      <ThemedText variant="label" muted>
        As configured for the site. Press an instrument to change its range, accuracy class, calibration interval or
        status; phones get the change on their next sync.
      </ThemedText>
      {q.error ? (
        <ThemedText tone="danger" testID="admin-instruments-error">
          {q.error.message}
        </ThemedText>
      ) : null}
      {q.isPending ? <ThemedText muted>Loading…</ThemedText> : null}
      {editing ? <InstrumentEditForm key={editing.id} instrument={editing} onClose={() => setSelected(null)} /> : null}
      {q.data && !editing ? (
        <DataTable
          rows={rows}
          columns={columns}
          rowKey={(i) => i.id}
          onPressRow={(i) => setSelected(i.id)}
          testID="admin-instruments"
          rowTestID={(i) => `admin-instrument-${i.tag}`}
        />
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({ stack: { gap: space.lg } });
