/**
 * A work order's evidence folded by round, newest first: one line per round (when, how many
 * findings), opened on a press; the detail's first page is shown at once, older rounds a page
 * at a time on "Show older rounds" (GET …/work-orders/:id/evidence?offset=).
 */
import type { Href } from 'expo-router';
import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { space } from '@/constants/theme';
import { useWorkOrderEvidence } from '@/hooks/queries/work-orders';
import type { EvidenceItem } from '@/shared/api/work-orders';
import { Button } from './button';
import { ThemedText } from './themed-text';
import { WorkOrderEvidence } from './work-order-evidence';

function byRound(items: EvidenceItem[]): { roundId: string; items: EvidenceItem[] }[] {
  const out: { roundId: string; items: EvidenceItem[] }[] = [];
  for (const e of items) {
    const last = out.at(-1);
    if (last && last.roundId === e.roundId) last.items.push(e);
    else out.push({ roundId: e.roundId, items: [e] });
  }
  return out;
}

function RoundFold({
  n,
  items,
  open: initiallyOpen,
  cycleHref,
}: {
  n: number;
  items: EvidenceItem[];
  open: boolean;
  cycleHref: (roundId: string) => Href;
}) {
  const [open, setOpen] = useState(initiallyOpen);
  const at = items.at(-1)!.findingAt;
  return (
    <View style={styles.round}>
      <Pressable
        accessibilityRole="button"
        accessibilityState={{ expanded: open }}
        onPress={() => setOpen((o) => !o)}
        testID={`wo-round-${n}`}
        style={styles.head}
      >
        <ThemedText variant="label" bold>
          {`${open ? '▾' : '▸'} Round of ${new Date(at).toLocaleString()} · ${items.length} finding${items.length === 1 ? '' : 's'}`}
        </ThemedText>
      </Pressable>
      {open ? <WorkOrderEvidence items={items} cycleHref={cycleHref} /> : null}
    </View>
  );
}

function OlderPage({
  id,
  offset,
  limit,
  cycleHref,
}: {
  id: string;
  offset: number;
  limit: number;
  cycleHref: (roundId: string) => Href;
}) {
  const q = useWorkOrderEvidence(id, offset, limit);
  if (q.error)
    return (
      <ThemedText tone="danger" testID={`wo-rounds-error-${offset}`}>
        {q.error.message}
      </ThemedText>
    );
  if (!q.data) return <ThemedText muted>Loading older rounds…</ThemedText>;
  return (
    <>
      {byRound(q.data.items).map((r, k) => (
        <RoundFold key={r.roundId} n={offset + k} items={r.items} open={false} cycleHref={cycleHref} />
      ))}
    </>
  );
}

export function WorkOrderRounds({
  id,
  first,
  rounds,
  limit,
  cycleHref,
}: {
  id: string;
  first: EvidenceItem[];
  rounds: number;
  limit: number;
  cycleHref: (roundId: string) => Href;
}) {
  const [pages, setPages] = useState(1);
  if (first.length === 0) return <WorkOrderEvidence items={[]} cycleHref={cycleHref} />;
  const shown = Math.min(rounds, pages * limit);
  return (
    <View style={styles.stack} testID="wo-rounds">
      {byRound(first).map((r, k) => (
        <RoundFold key={r.roundId} n={k} items={r.items} open={k === 0} cycleHref={cycleHref} />
      ))}
      {Array.from({ length: pages - 1 }, (_, p) => (
        <OlderPage key={p} id={id} offset={(p + 1) * limit} limit={limit} cycleHref={cycleHref} />
      ))}
      <ThemedText variant="caption" muted testID="wo-rounds-count">
        {`${shown} of ${rounds} round${rounds === 1 ? '' : 's'} shown`}
      </ThemedText>
      {shown < rounds ? (
        <Button
          label={`Show ${Math.min(limit, rounds - shown)} older rounds`}
          kind="plain"
          onPress={() => setPages((p) => p + 1)}
          testID="wo-rounds-more"
        />
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.md },
  round: { gap: space.sm },
  head: { minHeight: 48, justifyContent: 'center' },
});
