/**
 * One instrument: its readings against what the balances say, with the ±2σ band, the rounds behind
 * each point, and from how large a bias the balances notice it (or that none can, and what would).
 */
import { Link } from 'expo-router';
import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { InstrumentTrend } from '@/components/instrument-trend';
import { detectabilityWords, powerWords, remedyWords } from '@/components/detectability';
import { HealthStatusMark, InstrumentStatusMark } from '@/components/instrument-values';
import { biasInWords, calibrationsInWords, evidenceInWords, pointInWords } from '@/lib/instrument-figures';
import { ThemedText } from '@/components/themed-text';
import { space, touchTarget } from '@/constants/theme';
import { useDetectability } from '@/hooks/queries/detectability';
import { useInstrumentHealth, useInstrumentHistory } from '@/hooks/queries/instruments';

const RANGES = [7, 30, 90, 365] as const;

export function InstrumentScreen({ tag }: { tag: string }) {
  const [days, setDays] = useState<(typeof RANGES)[number]>(30);
  const from = new Date(Date.now() - days * 86_400_000).toISOString().slice(0, 10);
  const h = useInstrumentHistory(tag, from);
  const health = useInstrumentHealth().data?.instruments.find((i) => i.tag === tag);
  const unitId = h.data?.instrument.unitId ?? health?.unitId;
  const detUnit = useDetectability().data?.units.find((u) => u.unitId === unitId);
  const det = detUnit?.instruments.find((i) => i.tag === tag);
  const last = [...(h.data?.points ?? [])].reverse().slice(0, 12);
  return (
    <View style={styles.stack} testID="instrument-page">
      <View style={styles.head}>
        <ThemedText variant="heading" testID="instrument-tag">
          {tag}
        </ThemedText>
        {health ? (
          <HealthStatusMark status={health.status} evidence={health.evidence} testID="instrument-status" />
        ) : h.data ? (
          <InstrumentStatusMark status={h.data.instrument.status} testID="instrument-status" />
        ) : null}
      </View>
      {health ? (
        <Card>
          <ThemedText variant="label" testID="instrument-evidence">
            {`Evidence: ${evidenceInWords(health.evidence)}.`}
          </ThemedText>
          <ThemedText
            variant="label"
            testID="instrument-summary"
          >{`Over 30 days: ${health.flags30d} flags in ${health.samples30d} analysed rounds; ${biasInWords(health.quantity, health.gaugeUnit, health.biasSi30d, health.biasUncertaintySi30d)}${health.meanAbsZ30d !== null ? `; mean |z| ${health.meanAbsZ30d.toFixed(2)}` : ''}.`}</ThemedText>
          <ThemedText variant="label" testID="instrument-calibrations">
            {`Calibrations: ${calibrationsInWords(health.calibrations)}.`}
          </ThemedText>
          <ThemedText
            variant="label"
            muted
          >{`Last calibrated ${health.lastCalibration ?? 'never'}${health.calibrationDue ? `, due ${health.calibrationDue}${health.calibrationOverdue ? ' (overdue)' : ''}` : ''}.`}</ThemedText>
        </Card>
      ) : null}
      {det && detUnit ? (
        <Card testID="instrument-detectability">
          <ThemedText variant="label" tone={det.status === 'unchecked' ? 'danger' : undefined}>
            {detectabilityWords(det)}
          </ThemedText>
          {det.remedy ? (
            <ThemedText variant="label">{`What would check it: ${remedyWords(det.remedy)}`}</ThemedText>
          ) : null}
          <ThemedText
            variant="caption"
            muted
          >{`At the unit's latest analysed round (analysed ${new Date(detUnit.analysedAt).toLocaleString()}); ${powerWords(detUnit)}.`}</ThemedText>
        </Card>
      ) : null}
      <View style={styles.row}>
        {RANGES.map((d) => (
          <Button
            key={d}
            label={`${d} days`}
            kind={d === days ? 'primary' : 'plain'}
            selected={d === days}
            testID={`instrument-range-${d}`}
            onPress={() => setDays(d)}
          />
        ))}
      </View>
      {h.error ? (
        <ThemedText tone="danger" testID="instrument-error">
          {h.error.message}
        </ThemedText>
      ) : null}
      {h.isPending ? <ThemedText muted>Loading…</ThemedText> : null}
      {h.data ? (
        <Card>
          <ThemedText variant="label" bold>
            Readings against the balances
          </ThemedText>
          <ThemedText variant="caption" muted>
            Rings: what was read. Line: what the rest of the plant says. Shaded: its ±2σ band (95 %).
          </ThemedText>
          <InstrumentTrend history={h.data} />
          {h.data.truncated ? (
            <ThemedText variant="caption" muted>
              More points than fit: narrow the range.
            </ThemedText>
          ) : null}
        </Card>
      ) : null}
      {last.length ? (
        <Card testID="instrument-points">
          <ThemedText variant="label" bold>
            Latest rounds
          </ThemedText>
          {last.map((p, n) => {
            const ref = p.estimate ?? p.reconciled;
            const sigma = p.estimate !== null ? p.estimateSigma : p.reconciledSigma;
            return (
              <Link key={p.analysisId} href={`/eng/rounds/${p.roundId}`} asChild>
                <Pressable accessibilityRole="link" testID={`instrument-point-${n}`} style={styles.point}>
                  <ThemedText variant="caption" muted>
                    {new Date(p.measuredAt).toLocaleString()}
                  </ThemedText>
                  <ThemedText variant="label" numeric>
                    {`${h.data ? pointInWords(h.data.instrument.quantity, h.data.instrument.gaugeUnit, h.data.instrument.reference, p.barometricPa, p.reading, ref, sigma) : ''}${p.z !== null ? ` · z ${p.z.toFixed(1)}` : ''}${p.suspect ? ' · ◆ suspect' : ''}`}
                  </ThemedText>
                </Pressable>
              </Link>
            );
          })}
        </Card>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  head: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'center', gap: space.md },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  point: { minHeight: touchTarget, justifyContent: 'center', gap: space.xxs },
});
