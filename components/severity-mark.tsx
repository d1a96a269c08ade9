import { StyleSheet, View } from 'react-native';
import { space } from '@/constants/theme';
import { useTheme } from '@/hooks/use-theme';
import { ThemedText } from './themed-text';

export type Severity = 1 | 2 | 3;

/** Severity said three ways: a shape, a word and a colour (never colour alone). */
export const severityWords: Record<Severity, { glyph: string; word: string }> = {
  1: { glyph: '◆', word: 'Urgent' },
  2: { glyph: '▲', word: 'Soon' },
  3: { glyph: '●', word: 'Note' },
};

export function SeverityMark({ severity, testID }: { severity: Severity; testID?: string }) {
  const { colors } = useTheme();
  const tone = severity === 1 ? colors.danger : severity === 2 ? colors.warning : colors.info;
  const { glyph, word } = severityWords[severity];
  return (
    <View style={styles.row} testID={testID} accessibilityLabel={`Severity: ${word}`}>
      <ThemedText variant="label" style={{ color: tone }}>{glyph}</ThemedText>
      <ThemedText variant="label" bold style={{ color: tone }}>{word}</ThemedText>
    </View>
  );
}

const styles = StyleSheet.create({ row: { flexDirection: 'row', alignItems: 'center', gap: space.xs } });
