/** The cycle place: the site's analysed rounds, newest first, each opening its cycle page. */
import { useRouter } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { DataTable, Pager, type Column } from '@/components/data-table';
import { SeverityMark } from '@/components/severity-mark';
import { ThemedText } from '@/components/themed-text';
import { space } from '@/constants/theme';
import { useAnalysedRounds } from '@/hooks/queries/rounds';
import type { AnalysedRound } from '@/shared/api/rounds';

export const ROUNDS_PAGE = 20;

const when = (iso: string | null) => (iso ? new Date(iso).toLocaleString() : '—');

/** The findings of a round said with their marks: "◆ 1 · ▲ 2 · ● 3", or "None". */
function FindingCounts({ r }: { r: AnalysedRound }) {
  const f = r.findings;
  if (f.total === 0)
    return (
      <ThemedText variant="label" muted>
        None
      </ThemedText>
    );
  return (
    <View style={styles.counts} testID={`round-${r.roundId}-findings`}>
      {f.urgent ? <Count severity={1} n={f.urgent} /> : null}
      {f.attend ? <Count severity={2} n={f.attend} /> : null}
      {f.note ? <Count severity={3} n={f.note} /> : null}
    </View>
  );
}

function Count({ severity, n }: { severity: 1 | 2 | 3; n: number }) {
  return (
    <View style={styles.count}>
      <SeverityMark severity={severity} />
      <ThemedText variant="label" bold>
        {String(n)}
      </ThemedText>
    </View>
  );
}

const columns: Column<AnalysedRound>[] = [
  {
    key: 'started',
    label: 'Started',
    flex: 1.3,
    render: (r) => (
      <ThemedText variant="label" bold>
        {when(r.startedAt)}
      </ThemedText>
    ),
    wideOnly: true,
  },
  { key: 'route', label: 'Route', flex: 1.6, render: (r) => r.routeName, wideOnly: true },
  { key: 'unit', label: 'Unit', flex: 1.6, render: (r) => r.unitName },
  { key: 'finished', label: 'Finished', flex: 1.3, render: (r) => when(r.finishedAt) },
  { key: 'analysed', label: 'Analysed', flex: 1.3, render: (r) => when(r.analysedAt) },
  { key: 'findings', label: 'Findings', flex: 2, render: (r) => <FindingCounts r={r} /> },
  {
    key: 'model',
    label: 'Model',
    flex: 1.1,
    render: (r) =>
      r.modelVersionMismatch ? (
        <ThemedText variant="label" tone="warning" testID={`round-${r.roundId}-mismatch`}>
          ▲ Older on the phone
        </ThemedText>
      ) : (
        '✓ Same'
      ),
  },
];

export function RoundsScreen() {
  const router = useRouter();
  const [offset, setOffset] = useState(0);
  const page = Math.floor(offset / ROUNDS_PAGE) + 1;
  const q = useAnalysedRounds(page, ROUNDS_PAGE);
  return (
    <View style={styles.stack}>
      <ThemedText variant="heading">Cycle</ThemedText>
      <ThemedText variant="label" muted>
        Analysed rounds, newest first. Open one to see its state points on the T–s chart, its balances and its
        performance figures.
      </ThemedText>
      {q.error ? (
        <ThemedText tone="danger" testID="rounds-error">
          {q.error.message}
        </ThemedText>
      ) : null}
      {q.isPending ? <ThemedText muted>Loading…</ThemedText> : null}
      {q.data ? (
        <>
          <DataTable
            rows={q.data.rounds}
            columns={columns}
            rowKey={(r) => r.roundId}
            cardTitle={(r) => (
              <ThemedText variant="label" bold>{`${r.routeName} · started ${when(r.startedAt)}`}</ThemedText>
            )}
            onPressRow={(r) => router.push(`/eng/rounds/${r.roundId}`)}
            testID="rounds-table"
            rowTestID={(r) => `round-row-${r.roundId}`}
            empty="No analysed rounds yet: a round is analysed when its phone has synced it."
          />
          <Pager
            offset={offset}
            limit={ROUNDS_PAGE}
            total={q.data.total}
            onOffset={setOffset}
            testID="rounds-pager"
            noun={['analysed round', 'analysed rounds']}
          />
        </>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  counts: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  count: { flexDirection: 'row', alignItems: 'center', gap: space.xs },
});
