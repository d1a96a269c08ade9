import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { space } from '@/constants/theme';
import type { RetakeItem, SuspectView } from '@/shared/round-check';
import { Button } from './button';
import { Card } from './card';
import { Field } from './field';
import { ThemedText } from './themed-text';

export const DISMISS_REASONS = [
  'Re-read: the gauge really shows this',
  'Instrument known to be faulty, work order open',
  'Plant not steady (load change during the round)',
] as const;

export interface RoundCheckSuspectProps {
  item: RetakeItem;
  suspect?: SuspectView;
  /** null when the round can no longer take a dismissal (finished) */
  onDismiss: ((reason: string) => Promise<string | null>) | null;
}

/**
 * The detail of one flagged instrument: what the check says about it, what it reads against what
 * the rest of the plant says it should, and a way to dismiss the flag with a reason.
 */
export function RoundCheckSuspect({ item, suspect, onDismiss }: RoundCheckSuspectProps) {
  const [reason, setReason] = useState('');
  const [problem, setProblem] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const id = `suspect-${item.tag}`;
  const dismiss = async (text: string) => {
    if (!onDismiss) return;
    if (!text.trim()) {
      setProblem('Say why the flag is dismissed.');
      return;
    }
    setBusy(true);
    try {
      setProblem(await onDismiss(text.trim()));
    } finally {
      setBusy(false);
    }
  };
  return (
    <Card testID={id}>
      <ThemedText variant="title">
        {item.tag}
        {suspect ? ` · ${suspect.label}` : ''}
      </ThemedText>
      <ThemedText variant="caption" muted>
        {item.stop !== null
          ? `Stop ${item.stop + 1}, ${item.stopName}`
          : `Read on the ${item.routeName ?? 'other'} round`}
      </ThemedText>
      {suspect ? (
        <View style={styles.figures} testID={`${id}-figures`}>
          <ThemedText variant="label">
            Reads{' '}
            <ThemedText variant="label" bold testID={`${id}-reading`}>
              {suspect.readingText}
            </ThemedText>
          </ThemedText>
          {suspect.estimateText ? (
            <ThemedText variant="label">
              The rest of the plant says{' '}
              <ThemedText variant="label" bold testID={`${id}-estimate`}>
                {suspect.estimateText}
              </ThemedText>
            </ThemedText>
          ) : null}
        </View>
      ) : null}
      {item.messages.map((m, i) => (
        <ThemedText key={i} variant="label" testID={`${id}-message-${i}`}>
          {m}
        </ThemedText>
      ))}
      {item.dismissed !== null ? (
        <ThemedText variant="label" tone="info" testID={`${id}-dismissed`}>
          Dismissed: {item.dismissed}
        </ThemedText>
      ) : onDismiss ? (
        <View style={styles.dismiss}>
          <ThemedText variant="label" bold>
            Not a wrong reading? Dismiss the flag with a reason
          </ThemedText>
          <View style={styles.reasons}>
            {DISMISS_REASONS.map((r, i) => (
              <Button
                key={r}
                testID={`${id}-reason-${i}`}
                label={r}
                kind="plain"
                disabled={busy}
                onPress={() => void dismiss(r)}
              />
            ))}
          </View>
          <Field
            testID={`${id}-reason`}
            label="Another reason"
            value={reason}
            onChangeText={setReason}
            error={problem ?? undefined}
          />
          <Button
            testID={`${id}-dismiss`}
            label="Dismiss with this reason"
            kind="plain"
            busy={busy}
            onPress={() => void dismiss(reason)}
          />
        </View>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  figures: { gap: space.xxs },
  dismiss: { gap: space.sm },
  reasons: { gap: space.xs },
});
