/**
 * What an order's evidence comes to, before any of it: first and last seen, how many rounds and
 * findings, the order's instrument's correction per round (reconciled − reading) as a small chart
 * with its ±2σ band around zero (a correction outside it is what the balances object to), and the
 * newest findings in plain words.
 */
import { StyleSheet, useWindowDimensions, View } from 'react-native';
import { space } from '@/constants/theme';
import type { EvidenceSummary } from '@/shared/api/work-orders';
import { Card } from './card';
import { biasWords, displayScale, quantityOfTag, showDeltaOf } from './instrument-values';
import { SeverityMark } from './severity-mark';
import { ThemedText } from './themed-text';
import { TrendChart } from './trend-chart';
import { markOfFinding } from './work-order-evidence';

/** The unit a difference is shown in, by quantity (a temperature difference in K, not °C). */
const DELTA_UNIT = { pressure: 'bar', temperature: 'K', massFlow: 't/h', power: 'MW', level: '%' } as const;

const day = (iso: string | null) =>
  iso ? new Date(iso).toLocaleDateString(undefined, { day: 'numeric', month: 'short', year: 'numeric' }) : '—';

export function WorkOrderSummary({ summary, tag }: { summary: EvidenceSummary; tag: string | null }) {
  const { width } = useWindowDimensions();
  const q = tag ? quantityOfTag(tag) : null;
  const k = displayScale(q);
  const chartWidth = Math.max(240, Math.min(width - 64, 560));
  const last = summary.trend.at(-1);
  return (
    <Card testID="wo-summary">
      <ThemedText variant="label" bold>
        Evidence in short
      </ThemedText>
      <ThemedText testID="wo-summary-counts">
        {summary.findingCount === 0
          ? 'No findings are attached.'
          : `${summary.findingCount} finding${summary.findingCount === 1 ? '' : 's'} on ${summary.roundCount} round${summary.roundCount === 1 ? '' : 's'}, first seen ${day(summary.firstSeenAt)}, last seen ${day(summary.lastSeenAt)}.`}
      </ThemedText>
      {tag && summary.trend.length > 0 ? (
        <View style={styles.chart}>
          <ThemedText variant="caption" muted testID="wo-summary-trend-caption">
            {`${tag}: the balances’ correction on each of those rounds (reconciled − reading; band ±2σ of the correction)` +
              (last
                ? ` — on the last it ${biasWords(q, -last.correction)}${last.sigma !== null ? ` ± ${showDeltaOf(q, 2 * last.sigma)} (95 %)` : ''}.`
                : '.')}
          </ThemedText>
          <TrendChart
            testID="wo-summary-trend"
            width={chartWidth}
            height={140}
            unit={q ? DELTA_UNIT[q] : ''}
            samples={summary.trend.map((t) => ({
              t: Date.parse(t.at),
              measured: t.correction * k,
              reconciled: 0,
              sigma: t.sigma !== null ? t.sigma * k : null,
            }))}
          />
        </View>
      ) : null}
      {summary.latest.map((f, n) => (
        <View key={f.findingId} style={styles.latest}>
          <SeverityMark severity={markOfFinding(f.severity)} />
          <View style={styles.latestText}>
            <ThemedText variant="caption" muted>
              {new Date(f.at).toLocaleString()}
            </ThemedText>
            <ThemedText variant="label" testID={`wo-summary-latest-${n}`}>
              {f.message}
            </ThemedText>
          </View>
        </View>
      ))}
    </Card>
  );
}

const styles = StyleSheet.create({
  chart: { gap: space.xs },
  latest: { flexDirection: 'row', gap: space.sm, alignItems: 'flex-start' },
  latestText: { flex: 1, gap: space.xxs },
});
