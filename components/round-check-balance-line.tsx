import { StyleSheet, View } from 'react-native';
import { space } from '@/constants/theme';
import { useTheme } from '@/hooks/use-theme';
import type { BalanceLine } from '@/shared/round-check';
import { ThemedText } from './themed-text';

/** Each status said three ways: a shape, a word and a colour (never colour alone). */
export const balanceWords: Record<
  BalanceLine['status'],
  { glyph: string; word: string; tone: 'ok' | 'danger' | 'warning' }
> = {
  closes: { glyph: '✓', word: 'Closes', tone: 'ok' },
  open: { glyph: '✗', word: 'Does not close', tone: 'danger' },
  incomplete: { glyph: '…', word: 'Cannot check yet', tone: 'warning' },
};

/** One piece of equipment: whether its balances close, in plain words. */
export function RoundCheckBalanceLine({ line }: { line: BalanceLine }) {
  const { colors } = useTheme();
  const w = balanceWords[line.status];
  return (
    <View
      style={[styles.row, { borderLeftColor: colors[w.tone] }]}
      testID={`balance-${line.equipmentId}`}
      accessibilityLabel={`${line.label}: ${w.word}`}
    >
      <ThemedText variant="label" bold tone={w.tone} testID={`balance-${line.equipmentId}-status`}>
        {w.glyph} {w.word}
      </ThemedText>
      <ThemedText variant="label">{line.text}</ThemedText>
    </View>
  );
}

const styles = StyleSheet.create({
  row: { borderLeftWidth: 4, paddingLeft: space.sm, gap: space.xxs },
});
