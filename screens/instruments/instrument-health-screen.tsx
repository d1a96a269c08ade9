/**
 * Instrument health: every instrument of the site with the flags of the last 30 days, the mean
 * normalised correction, the estimated bias in the gauge's unit with its 95 % interval, the
 * evidence since calibration (Page's CUSUM), calibration and status; ordered by evidence
 * (shared/api/analysis byEvidence, the server's order), sortable by any column; each row says from how large a bias the balances notice the instrument
 * (the detectability map), and a card lists the instruments no balance can check with the one
 * measurement that would. Below it, recent analysed rounds to open a round's cycle.
 */
import { Link, useRouter, type Href } from 'expo-router';
import { useMemo, useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { Card } from '@/components/card';
import { DataTable, ExportButton, type Column } from '@/components/data-table';
import { DetectabilitySummary } from '@/components/detectability';
import { HealthStatusMark, showDeltaOf } from '@/components/instrument-values';
import { ThemedText } from '@/components/themed-text';
import { space, touchTarget } from '@/constants/theme';
import { useSession } from '@/hooks/session';
import { useDetectability } from '@/hooks/queries/detectability';
import { useInstrumentHealth, useInstrumentHistory } from '@/hooks/queries/instruments';
import { biasInWords, calibrationsInWords } from '@/lib/instrument-figures';
import { byEvidence, type InstrumentHealth } from '@/shared/api/analysis';
import type { DetectabilityResponse, InstrumentDetectability } from '@/shared/api/detectability';

const sorters: Record<string, (a: InstrumentHealth, b: InstrumentHealth) => number> = {
  worst: byEvidence,
  evidence: (a, b) => -byEvidence(a, b),
  tag: (a, b) => a.tag.localeCompare(b.tag),
  flags: (a, b) => a.flags30d - b.flags30d,
  z: (a, b) => (a.meanAbsZ30d ?? -1) - (b.meanAbsZ30d ?? -1),
  bias: (a, b) => Math.abs(a.biasSi30d ?? 0) - Math.abs(b.biasSi30d ?? 0),
  due: (a, b) => (a.calibrationDue ?? '9999').localeCompare(b.calibrationDue ?? '9999'),
};

/** "0.96 K", "not checked", "—": the smallest bias the balances notice, in the instrument's unit. */
export function noticeFromWords(d: InstrumentDetectability | undefined): string {
  if (!d || d.status === 'not-read') return '—';
  if (d.status === 'unchecked') return 'no balance checks it';
  return `${showDeltaOf(d.quantity, d.mdb!)}${d.status === 'weak' ? ' (weak)' : ''}`;
}

const detectabilityOf = (map: DetectabilityResponse | undefined) => {
  const out = new Map<string, InstrumentDetectability>();
  for (const u of map?.units ?? []) for (const i of u.instruments) out.set(`${u.unitId}|${i.tag}`, i);
  return out;
};

const columnsWith = (det: Map<string, InstrumentDetectability>): Column<InstrumentHealth>[] => [
  ...columns,
  {
    key: 'mdb',
    label: 'Balances notice from',
    flex: 1.3,
    numeric: true,
    render: (i) => {
      const d = det.get(`${i.unitId}|${i.tag}`);
      return (
        <ThemedText
          variant="label"
          numeric
          tone={d?.status === 'unchecked' ? 'danger' : undefined}
          testID={`health-${i.tag}-mdb`}
        >
          {noticeFromWords(d)}
        </ThemedText>
      );
    },
  },
];

const columns: Column<InstrumentHealth>[] = [
  {
    key: 'tag',
    label: 'Tag',
    flex: 1,
    sortKey: 'tag',
    render: (i) => (
      <ThemedText variant="label" bold>
        {i.tag}
      </ThemedText>
    ),
  },
  {
    key: 'status',
    label: 'Status',
    flex: 1.2,
    render: (i) => <HealthStatusMark status={i.status} evidence={i.evidence} testID={`health-${i.tag}-status`} />,
  },
  {
    key: 'evidence',
    label: 'Evidence since calibration',
    flex: 1.4,
    numeric: true,
    sortKey: 'evidence',
    render: (i) => (
      <ThemedText
        variant="label"
        numeric
        bold={i.evidence.level === 'strong'}
        tone={i.evidence.level === 'strong' ? 'danger' : undefined}
        testID={`health-${i.tag}-evidence`}
      >
        {i.evidence.level === 'untested'
          ? 'not tested'
          : `${i.evidence.level === 'strong' ? '◆ ' : ''}${i.evidence.cusum.toFixed(1)} of ${i.evidence.threshold}${i.evidence.direction ? `, ${i.evidence.direction}` : ''} · ${i.evidence.rounds} rounds`}
      </ThemedText>
    ),
  },
  { key: 'flags', label: 'Flags, 30 d', flex: 0.9, numeric: true, sortKey: 'flags', render: (i) => String(i.flags30d) },
  {
    key: 'z',
    label: 'Mean |z|',
    flex: 0.9,
    numeric: true,
    sortKey: 'z',
    render: (i) => (i.meanAbsZ30d === null ? '—' : i.meanAbsZ30d.toFixed(2)),
  },
  {
    key: 'bias',
    label: 'Estimated bias',
    flex: 1.6,
    sortKey: 'bias',
    numeric: true,
    render: (i) => (
      <ThemedText variant="label" numeric testID={`health-${i.tag}-bias`}>
        {biasInWords(i.quantity, i.gaugeUnit, i.biasSi30d, i.biasUncertaintySi30d)}
      </ThemedText>
    ),
  },
  { key: 'cal', label: 'Calibrated', flex: 1, numeric: true, render: (i) => i.lastCalibration ?? '—' },
  {
    key: 'due',
    label: 'Due',
    flex: 1.1,
    numeric: true,
    sortKey: 'due',
    render: (i) =>
      i.calibrationDue ? (
        <ThemedText
          variant="label"
          numeric
          bold={i.calibrationOverdue}
          tone={i.calibrationOverdue ? 'danger' : undefined}
        >{`${i.calibrationOverdue ? '▲ overdue ' : ''}${i.calibrationDue}`}</ThemedText>
      ) : (
        '—'
      ),
  },
  {
    key: 'wo',
    label: 'Open work',
    flex: 1,
    render: (i) => (i.openWorkOrders.length ? i.openWorkOrders.map((w) => w.number).join(', ') : '—'),
  },
];

/** What the recorded calibrations said of the evidence, over the whole list. */
export function calibrationSummary(all: InstrumentHealth[]): string {
  const sum = all.reduce(
    (s, i) => ({
      closed: s.closed + i.calibrations.closed,
      confirmed: s.confirmed + i.calibrations.confirmed,
      refuted: s.refuted + i.calibrations.refuted,
    }),
    { closed: 0, confirmed: 0, refuted: 0 },
  );
  return `Calibrations: ${calibrationsInWords(sum)}.`;
}

function daysAgo(n: number): string {
  return new Date(Date.now() - n * 86_400_000).toISOString().slice(0, 10);
}

/** Recent analysed rounds, from the history of one instrument that every round reads. */
export function RecentRounds({ tag, roundHref }: { tag: string | undefined; roundHref: (roundId: string) => Href }) {
  const h = useInstrumentHistory(tag, daysAgo(7));
  const rounds = useMemo(() => {
    const seen = new Map<string, string>();
    for (const p of [...(h.data?.points ?? [])].reverse()) if (!seen.has(p.roundId)) seen.set(p.roundId, p.measuredAt);
    return [...seen.entries()].slice(0, 8);
  }, [h.data]);
  return (
    <Card testID="recent-rounds">
      <ThemedText variant="label" bold>
        Recent analysed rounds
      </ThemedText>
      {rounds.length === 0 ? (
        <ThemedText variant="caption" muted>
          {h.isPending ? 'Loading…' : 'No analysed rounds in the last 7 days.'}
        </ThemedText>
      ) : null}
      {rounds.map(([roundId, at], n) => (
        <Link key={roundId} href={roundHref(roundId)} asChild>
          <Pressable accessibilityRole="link" testID={`recent-round-${n}`} style={styles.link}>
            <ThemedText
              variant="label"
              tone="info"
            >{`Cycle of the round read ${new Date(at).toLocaleString()} →`}</ThemedText>
          </Pressable>
        </Link>
      ))}
    </Card>
  );
}

export function InstrumentHealthScreen() {
  const router = useRouter();
  const { membership } = useSession();
  const q = useInstrumentHealth();
  const det = useDetectability();
  const detByTag = useMemo(() => detectabilityOf(det.data), [det.data]);
  const [sort, setSort] = useState('worst');
  const rows = useMemo(() => {
    const all = [...(q.data?.instruments ?? [])];
    const desc = sort.startsWith('-');
    const f = sorters[desc ? sort.slice(1) : sort] ?? byEvidence;
    return all.sort((a, b) => (desc ? -f(a, b) : f(a, b)));
  }, [q.data, sort]);
  const common = rows.find((i) => i.quantity === 'pressure' && i.samples30d > 0)?.tag ?? rows[0]?.tag;
  return (
    <View style={styles.stack}>
      <View style={styles.head}>
        <ThemedText variant="heading">Instrument health</ThemedText>
        {membership ? (
          <ExportButton
            path={`/api/sites/${membership.siteId}/exports/readings.csv?from=${daysAgo(30)}`}
            filename="readings-30-days.csv"
            label="Export readings (30 days)"
            testID="health-export"
          />
        ) : null}
      </View>
      <ThemedText muted variant="label">
        {
          'Strongest evidence first: Page’s CUSUM of each instrument’s normalised corrections since its last calibration, alarm at 6. |z| is how far the balances had to move a reading, in its own standard uncertainties; a bias is the mean of reading − estimate over the last 30 days, in the gauge’s unit, with its 95 % interval.'
        }
      </ThemedText>
      {sort !== 'worst' ? (
        <Pressable
          accessibilityRole="button"
          testID="health-sort-worst"
          onPress={() => setSort('worst')}
          style={styles.link}
        >
          <ThemedText variant="label" tone="info">
            Back to strongest evidence first
          </ThemedText>
        </Pressable>
      ) : null}
      {q.error ? (
        <ThemedText tone="danger" testID="health-error">
          {q.error.message}
        </ThemedText>
      ) : null}
      {q.isPending ? <ThemedText muted>Loading…</ThemedText> : null}
      {q.data ? (
        <DataTable
          rows={rows}
          columns={columnsWith(detByTag)}
          rowKey={(i) => i.id}
          testID="health-table"
          rowTestID={(i) => `health-row-${i.tag}`}
          sort={sort}
          onSort={(s) => setSort(s)}
          onPressRow={(i) => router.push(`/eng/instruments/${encodeURIComponent(i.tag)}`)}
        />
      ) : null}
      {q.data ? (
        <ThemedText variant="caption" muted testID="health-calibrations">
          {calibrationSummary(q.data.instruments)}
        </ThemedText>
      ) : null}
      {det.error ? (
        <ThemedText tone="danger" testID="detectability-error">
          {det.error.message}
        </ThemedText>
      ) : null}
      {(det.data?.units ?? []).map((u) => (
        <Card key={u.unitId}>
          <DetectabilitySummary unit={u} testID={`detectability-${u.unitId}`} />
        </Card>
      ))}
      <RecentRounds tag={common} roundHref={(id) => `/eng/rounds/${id}`} />
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  head: {
    flexDirection: 'row',
    justifyContent: 'space-between',
    alignItems: 'center',
    flexWrap: 'wrap',
    gap: space.md,
  },
  link: { minHeight: touchTarget, justifyContent: 'center' },
});
