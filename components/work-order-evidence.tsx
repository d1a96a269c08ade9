/**
 * A work order's evidence: for each finding, what the analysis said in plain words
 * ("PI-302 reads 61.3 kPa low; the balances put it at 6.120 bar abs ± 0.052 bar"), the
 * readings of that round with their photos, and a way to the round's cycle.
 */
import { useQuery } from '@tanstack/react-query';
import { Link, type Href } from 'expo-router';
import { useEffect } from 'react';
import { Image, Pressable, StyleSheet, View } from 'react-native';
import { radius, space } from '@/constants/theme';
import { useSession } from '@/hooks/session';
import { useTheme } from '@/hooks/use-theme';
import type { EvidenceItem, EvidenceReading } from '@/shared/api/work-orders';
import { Card } from './card';
import { fetchAuthedBlob } from './data-table';
import { biasWords, quantityOfTag, showDeltaOf, showValueOf } from './instrument-values';
import { SeverityMark } from './severity-mark';
import { ThemedText } from './themed-text';

/** Finding severity and the mark run the same way (shared/cycle/severity.ts): 1 urgent … 3 note. */
export const markOfFinding = (severity: number): 1 | 2 | 3 => (severity <= 1 ? 1 : severity === 2 ? 2 : 3);

/** The plain-words sentence of one instrument's figures. */
export function evidenceSentence(i: EvidenceItem['instruments'][number]): string {
  const q = quantityOfTag(i.tag);
  const ref = i.estimate ?? i.reconciled;
  const refSigma = i.estimate !== null ? i.estimateSigma : i.reconciledSigma;
  if (i.reading === null) return `${i.tag} has no reading in this round.`;
  if (ref === null) return `${i.tag} read ${showValueOf(q, i.reading)}; the balances could not place it.`;
  const around = refSigma !== null ? ` ± ${showDeltaOf(q, 2 * refSigma)} (95 %)` : '';
  const z = i.z !== null ? ` — ${Math.abs(i.z).toFixed(1)} standard deviations off` : '';
  return `${i.tag} ${biasWords(q, i.reading - ref)}: it read ${showValueOf(q, i.reading)}, the balances put it at ${showValueOf(q, ref)}${around}${z}.`;
}

function PhotoThumb({ path, testID }: { path: string; testID: string }) {
  const { request } = useSession();
  const { colors } = useTheme();
  const q = useQuery({
    queryKey: ['photo-thumb', path],
    staleTime: Infinity,
    retry: false,
    queryFn: async () => URL.createObjectURL(await fetchAuthedBlob(path, () => request('/api/me'))),
  });
  useEffect(() => () => void (q.data && URL.revokeObjectURL(q.data)), [q.data]);
  return (
    <View style={[styles.thumb, { borderColor: colors.rule, backgroundColor: colors.surfaceAlt }]} testID={testID}>
      {q.data ? (
        <Image source={{ uri: q.data }} style={styles.img} accessibilityLabel="Photo of the gauge face" />
      ) : (
        <ThemedText variant="caption" muted>
          {q.error ? 'Photo not available' : 'Loading…'}
        </ThemedText>
      )}
    </View>
  );
}

function ReadingLine({ r }: { r: EvidenceReading }) {
  const ref = r.reference && r.reference !== 'absolute' ? ` ${r.reference}` : '';
  return (
    <View style={styles.reading} testID={`wo-reading-${r.instrumentTag}`}>
      <View style={styles.readingHead}>
        <ThemedText variant="label" bold>
          {r.instrumentTag}
        </ThemedText>
        <ThemedText variant="label" numeric>
          {r.valueTyped === null ? 'skipped' : `${r.valueTyped} ${r.unit}${ref}`}
        </ThemedText>
      </View>
      <ThemedText variant="caption" muted>
        {new Date(r.deviceTime).toLocaleString()}
        {r.note ? ` · “${r.note}”` : ''}
      </ThemedText>
      {r.photos.length ? (
        <View style={styles.photos}>
          {r.photos
            .filter((p) => p.stored)
            .map((p) => (
              <PhotoThumb key={p.id} path={p.thumbUrl} testID={`wo-photo-${p.id}`} />
            ))}
        </View>
      ) : null}
    </View>
  );
}

export function WorkOrderEvidence({
  items,
  cycleHref,
}: {
  items: EvidenceItem[];
  cycleHref: (roundId: string) => Href;
}) {
  if (items.length === 0)
    return (
      <ThemedText muted testID="wo-evidence-empty">
        No findings are attached.
      </ThemedText>
    );
  return (
    <View style={styles.stack} testID="wo-evidence">
      {items.map((e, n) => (
        <Card key={e.findingId} testID={`wo-evidence-${n}`}>
          <View style={styles.readingHead}>
            <SeverityMark severity={markOfFinding(e.severity)} />
            <ThemedText variant="caption" muted>
              {new Date(e.findingAt).toLocaleString()}
              {e.current ? '' : ' · superseded by a re-take'}
            </ThemedText>
          </View>
          <ThemedText testID={`wo-evidence-${n}-message`}>{e.message}</ThemedText>
          {e.instruments.map((i) => (
            <ThemedText key={i.tag} variant="label" bold={i.suspect} testID={`wo-evidence-${n}-${i.tag}`}>
              {evidenceSentence(i)}
            </ThemedText>
          ))}
          {e.reconciliation.chiSquare !== null && e.reconciliation.critical !== null ? (
            <ThemedText variant="caption" muted>
              {`Whole-round test: χ² ${e.reconciliation.chiSquare.toFixed(1)} against ${e.reconciliation.critical.toFixed(1)} allowed (${e.reconciliation.dof} degrees of freedom) — ${e.reconciliation.passed ? 'passed' : 'failed'}.`}
            </ThemedText>
          ) : null}
          {e.readings.map((r) => (
            <ReadingLine key={r.id} r={r} />
          ))}
          <Link href={cycleHref(e.roundId)} asChild>
            <Pressable accessibilityRole="link" testID={`wo-evidence-${n}-cycle`} style={styles.link}>
              <ThemedText variant="label" tone="info">
                See this round’s cycle →
              </ThemedText>
            </Pressable>
          </Link>
        </Card>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.md },
  reading: { gap: space.xxs, paddingTop: space.xs },
  readingHead: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'center', gap: space.md },
  photos: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  thumb: {
    width: 96,
    height: 96,
    borderWidth: 1,
    borderRadius: radius.sm,
    alignItems: 'center',
    justifyContent: 'center',
    overflow: 'hidden',
  },
  img: { width: 96, height: 96 },
  link: { minHeight: 48, justifyContent: 'center' },
});
