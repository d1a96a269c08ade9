/**
 * Records another person made on this shared device: they wait until that person signs in here
 * again and are sent as theirs, never under whoever is signed in now (offline/sync.ts).
 */
import { View } from 'react-native';
import { ThemedText } from '@/components/themed-text';
import type { SyncStatus } from '@/offline/sync';

export function OthersWaitingNote({ status }: { status: SyncStatus | null }) {
  if (!status || status.othersWaiting.length === 0) return null;
  return (
    <View testID="others-waiting">
      {status.othersWaiting.map((o) => (
        <ThemedText key={o.authorId} variant="label" tone="warning" testID={`others-waiting-${o.authorId}`}>
          {`Waiting for ${o.authorName}: ${o.records} record${o.records === 1 ? '' : 's'} made on this device. They are sent as ${o.authorName}'s when ${o.authorName} signs in here again, never as yours.`}
        </ThemedText>
      ))}
    </View>
  );
}
