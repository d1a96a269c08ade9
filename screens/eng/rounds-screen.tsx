/** The cycle place: recent analysed rounds, each opening its cycle page. */
import { StyleSheet, View } from 'react-native';
import { ThemedText } from '@/components/themed-text';
import { space } from '@/constants/theme';
import { useInstrumentHealth } from '@/hooks/queries/instruments';
import { RecentRounds } from './instrument-health-screen';

export function RoundsScreen() {
  const health = useInstrumentHealth();
  const all = health.data?.instruments ?? [];
  const tag = all.find((i) => i.quantity === 'pressure' && i.samples30d > 0)?.tag ?? all[0]?.tag;
  return (
    <View style={styles.stack}>
      <ThemedText variant="heading">Cycle</ThemedText>
      <ThemedText variant="label" muted>Pick a round to see its state points on the T–s chart, its balances and its performance figures.</ThemedText>
      {health.error ? <ThemedText tone="danger">{health.error.message}</ThemedText> : null}
      <RecentRounds tag={tag} roundHref={(id) => `/eng/rounds/${id}`} />
    </View>
  );
}

const styles = StyleSheet.create({ stack: { gap: space.lg } });
