import { StyleSheet, View } from 'react-native';
import { space } from '@/constants/theme';
import { useTheme } from '@/hooks/use-theme';
import { ThemedText } from './themed-text';

import { LEVEL_LABELS, type Level } from '@/shared/cycle/severity';

/** A finding's severity or a work order's priority: 1 urgent … 3 note, one label table for both. */
export type Severity = Level;

/** Severity said three ways: a shape, a word and a colour (never colour alone). */
export const severityWords: Record<Severity, { glyph: string; word: string }> = LEVEL_LABELS;

export function SeverityMark({ severity, testID }: { severity: Severity; testID?: string }) {
  const { colors } = useTheme();
  const tone = severity === 1 ? colors.danger : severity === 2 ? colors.warning : colors.info;
  const { glyph, word } = severityWords[severity];
  return (
    <View style={styles.row} testID={testID} accessibilityLabel={`Severity: ${word}`}>
      <ThemedText variant="label" style={{ color: tone }}>
        {glyph}
      </ThemedText>
      <ThemedText variant="label" bold style={{ color: tone }}>
        {word}
      </ThemedText>
    </View>
  );
}

const styles = StyleSheet.create({ row: { flexDirection: 'row', alignItems: 'center', gap: space.xs } });
