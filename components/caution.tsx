import { StyleSheet, View } from 'react-native';
import { radius, space } from '@/constants/theme';
import { useTheme } from '@/hooks/use-theme';
import { ThemedText } from './themed-text';

/**
 * A caution band for screens that send people to hot, pressurised or rotating equipment.
 * Shape (the striped left edge and the word CAUTION) says it as well as colour.
 */
export function Caution({ children, testID = 'caution' }: { children: string; testID?: string }) {
  const { colors } = useTheme();
  return (
    <View testID={testID} accessibilityRole="alert" style={[styles.band, { backgroundColor: colors.caution }]}>
      <View style={[styles.edge, { backgroundColor: colors.onCaution }]} />
      <ThemedText variant="label" style={[styles.text, { color: colors.onCaution }]}>
        <ThemedText variant="label" bold style={{ color: colors.onCaution }}>
          CAUTION{' '}
        </ThemedText>
        {children}
      </ThemedText>
    </View>
  );
}

const styles = StyleSheet.create({
  band: { flexDirection: 'row', borderRadius: radius.sm, overflow: 'hidden' },
  edge: { width: 8 },
  text: { flex: 1, padding: space.md },
});
