import { Pressable, StyleSheet, View } from 'react-native';
import { space, touchTarget } from '@/constants/theme';
import { useTheme } from '@/hooks/use-theme';
import { ThemedText } from './themed-text';

export interface StopSummary {
  id: string;
  name: string;
  area: string;
  done: number;
  total: number;
}

/** The stops of a round in walking order, with how much of each is done. */
export function StopList({
  stops,
  current,
  onPick,
}: {
  stops: StopSummary[];
  current: number;
  onPick(i: number): void;
}) {
  const { colors } = useTheme();
  return (
    <View style={styles.list} testID="stop-list" accessibilityRole="list">
      {stops.map((s, i) => {
        const complete = s.total > 0 && s.done >= s.total;
        const active = i === current;
        return (
          <Pressable
            key={s.id}
            testID={`stop-${i}`}
            accessibilityRole="button"
            aria-selected={active}
            onPress={() => onPick(i)}
            style={StyleSheet.flatten([
              styles.item,
              {
                borderColor: active ? colors.accent : colors.rule,
                backgroundColor: active ? colors.surfaceAlt : colors.surface,
              },
            ])}
          >
            <ThemedText variant="label" bold>
              {i + 1}. {s.name}
            </ThemedText>
            <ThemedText variant="caption" muted>
              {s.area}
            </ThemedText>
            <ThemedText variant="caption" tone={complete ? 'ok' : undefined} testID={`stop-${i}-progress`}>
              {complete ? '✓ ' : ''}
              {s.done} of {s.total} done
            </ThemedText>
          </Pressable>
        );
      })}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: space.xs },
  item: { minHeight: touchTarget, padding: space.sm, borderWidth: 1, borderLeftWidth: 5 },
});
