import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { ThemedText } from '@/components/themed-text';
import { space } from '@/constants/theme';
import { useOutboxStatus, useSyncNow } from '@/offline/use-offline';
import { OthersWaitingNote } from './others-waiting-note';

function when(iso: string | null): string {
  return iso ? new Date(iso).toLocaleString() : 'never';
}

/** What waits on this device, what the server refused and why, and a way to try again. */
export function OutboxScreen() {
  const status = useOutboxStatus();
  const { syncNow, retryRefused, running } = useSyncNow();
  if (!status) return <ThemedText muted>Opening the device store…</ThemedText>;
  return (
    <View style={styles.stack}>
      <Card testID="outbox-counts">
        <Row label="Waiting to send" value={status.waiting} testID="outbox-waiting" />
        <Row label="Sent" value={status.sent} testID="outbox-sent" />
        <Row label="Refused by the server" value={status.refused} testID="outbox-refused" />
        <Row label="Photos waiting" value={status.photosWaiting} testID="outbox-photos-waiting" />
        <Row label="Photos on the server" value={status.photosStored} testID="outbox-photos-stored" />
        <ThemedText variant="caption" muted testID="outbox-last-sync">
          Last sync: {when(status.lastSyncAt)}
        </ThemedText>
        {status.problem ? (
          <ThemedText tone="warning" testID="outbox-problem">
            {status.problem.message}
          </ThemedText>
        ) : null}
        <OthersWaitingNote status={status} />
        <Button testID="sync-now" label="Sync now" onPress={() => void syncNow()} busy={running || status.running} />
      </Card>
      {status.refusedItems.length ? (
        <Card testID="outbox-refusals">
          <ThemedText variant="title">Refused</ThemedText>
          <ThemedText variant="caption" muted>
            These stay on the device and do not hold up the rest. Correct the cause, then send them again.
          </ThemedText>
          {status.refusedItems.map((r) => (
            <View key={r.seq} style={styles.item} testID={`refused-${r.seq}`}>
              <ThemedText variant="label" bold>
                {r.kind} {r.recordId.slice(0, 8)}
              </ThemedText>
              <ThemedText variant="label" testID={`refused-${r.seq}-message`}>
                {r.message}
              </ThemedText>
            </View>
          ))}
          <Button
            testID="retry-refused"
            label="Send the refused again"
            kind="plain"
            onPress={() => void retryRefused()}
          />
        </Card>
      ) : null}
    </View>
  );
}

function Row({ label, value, testID }: { label: string; value: number; testID: string }) {
  return (
    <View style={styles.row}>
      <ThemedText variant="label">{label}</ThemedText>
      <ThemedText variant="label" bold numeric testID={testID}>
        {value}
      </ThemedText>
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  row: { flexDirection: 'row', justifyContent: 'space-between' },
  item: { gap: space.xxs },
});
