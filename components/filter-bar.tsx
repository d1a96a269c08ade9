/**
 * Filters as rows of toggle buttons (a pressed one is chosen; several may be) and a search field.
 * Each choice is a real button with a large target and its state announced (aria-selected).
 */
import { StyleSheet, View } from 'react-native';
import { space } from '@/constants/theme';
import { Button } from './button';
import { ThemedText } from './themed-text';

export interface FilterGroup<V extends string | number> {
  key: string;
  label: string;
  options: { value: V; label: string }[];
  chosen: V[];
  onChange: (chosen: V[]) => void;
}

export function FilterChoices<V extends string | number>({ group, testID }: { group: FilterGroup<V>; testID: string }) {
  const toggle = (v: V) =>
    group.onChange(group.chosen.includes(v) ? group.chosen.filter((x) => x !== v) : [...group.chosen, v]);
  return (
    <View style={styles.group} accessibilityRole="toolbar" accessibilityLabel={group.label}>
      <ThemedText variant="caption" bold muted>
        {group.label}
      </ThemedText>
      <View style={styles.choices}>
        {group.options.map((o) => (
          <Button
            key={String(o.value)}
            label={o.label}
            kind={group.chosen.includes(o.value) ? 'primary' : 'plain'}
            selected={group.chosen.includes(o.value)}
            testID={`${testID}-${group.key}-${o.value}`}
            onPress={() => toggle(o.value)}
            style={styles.choice}
          />
        ))}
      </View>
    </View>
  );
}

export function FilterBar({
  groups,
  children,
  testID,
}: {
  groups: FilterGroup<string | number>[];
  children?: React.ReactNode;
  testID: string;
}) {
  return (
    <View style={styles.bar} testID={testID}>
      {children}
      {groups.map((g) => (
        <FilterChoices key={g.key} group={g} testID={testID} />
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  bar: { gap: space.md },
  group: { gap: space.xs },
  choices: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  choice: { paddingHorizontal: space.md },
});
