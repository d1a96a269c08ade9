import { StyleSheet, Text, type TextProps } from 'react-native';
import { fonts, type } from '@/constants/theme';
import { useTheme } from '@/hooks/use-theme';

export type TextVariant = 'body' | 'label' | 'caption' | 'title' | 'heading' | 'display';

export interface ThemedTextProps extends TextProps {
  variant?: TextVariant;
  muted?: boolean;
  bold?: boolean;
  tone?: 'danger' | 'ok' | 'warning' | 'info' | 'accent';
  /** Right-aligned tabular figures, for numbers in tables. */
  numeric?: boolean;
}

export function ThemedText({ variant = 'body', muted, bold, tone, numeric, style, ...rest }: ThemedTextProps) {
  const { colors } = useTheme();
  const heavy = bold || variant === 'title' || variant === 'heading' || variant === 'display';
  const color = tone ? colors[tone] : muted ? colors.textMuted : colors.text;
  return (
    <Text
      {...rest}
      style={[
        styles.base,
        type[variant],
        { color, fontFamily: heavy ? fonts.bold : fonts.regular },
        numeric && styles.numeric,
        style,
      ]}
    />
  );
}

const styles = StyleSheet.create({
  base: {},
  numeric: { fontVariant: ['tabular-nums'], textAlign: 'right' },
});
