import { Pressable, StyleSheet, View } from 'react-native';
import { space, touchTarget } from '@/constants/theme';
import { useTheme } from '@/hooks/use-theme';
import type { RetakeItem } from '@/shared/round-check';
import { Button } from './button';
import { SeverityMark, type Severity } from './severity-mark';
import { ThemedText } from './themed-text';

/** The engine's 3 (urgent) … 1 (note) in the app's severity marks (1 urgent … 3 note). */
export const markOf = (s: 1 | 2 | 3): Severity => (4 - s) as Severity;

export interface RoundCheckRetakeItemProps {
  item: RetakeItem;
  /** on a wide screen: this item's detail stands beside the list */
  selected?: boolean;
  onSelect?(): void;
  /** go to the item's stop and reading; absent for an instrument of another round */
  onRetake?(): void;
}

/** One line of the re-take list: where to go, what to read again and why. */
export function RoundCheckRetakeItem({ item, selected, onSelect, onRetake }: RoundCheckRetakeItemProps) {
  const { colors } = useTheme();
  const id = `retake-${item.tag}`;
  return (
    <Pressable
      testID={id}
      accessibilityRole="button"
      aria-selected={!!selected}
      onPress={onSelect ?? onRetake}
      style={StyleSheet.flatten([
        styles.item,
        {
          borderColor: selected ? colors.accent : colors.rule,
          backgroundColor: selected ? colors.surfaceAlt : colors.surface,
        },
      ])}
    >
      <View style={styles.head}>
        <SeverityMark severity={markOf(item.severity)} />
        {item.dismissed !== null ? (
          <ThemedText variant="caption" muted testID={`${id}-dismissed`}>
            Dismissed: {item.dismissed}
          </ThemedText>
        ) : null}
      </View>
      <ThemedText variant="label" testID={`${id}-line`}>
        {item.line}
      </ThemedText>
      {onRetake ? (
        <Button
          testID={`${id}-go`}
          label={`Re-take ${item.tag} at stop ${(item.stop ?? 0) + 1}`}
          kind="accent"
          onPress={onRetake}
        />
      ) : null}
    </Pressable>
  );
}

const styles = StyleSheet.create({
  item: { minHeight: touchTarget, padding: space.md, gap: space.sm, borderWidth: 1, borderLeftWidth: 5 },
  head: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, alignItems: 'center' },
});
