import { forwardRef } from 'react';
import { StyleSheet, TextInput, View, type TextInputProps } from 'react-native';
import { fonts, radius, space, touchTarget, type } from '@/constants/theme';
import { useTheme } from '@/hooks/use-theme';
import { ThemedText } from './themed-text';

export interface FieldProps extends TextInputProps {
  label: string;
  error?: string;
  hint?: string;
  testID: string;
}

/** A labelled text input with its error under it (the error is announced). */
export const Field = forwardRef<TextInput, FieldProps>(function Field(
  { label, error, hint, testID, style, ...rest },
  ref,
) {
  const { colors } = useTheme();
  return (
    <View style={styles.wrap}>
      <ThemedText variant="label" bold nativeID={`${testID}-label`}>
        {label}
      </ThemedText>
      <TextInput
        ref={ref}
        testID={testID}
        accessibilityLabel={label}
        aria-invalid={!!error}
        placeholderTextColor={colors.textMuted}
        {...rest}
        style={[
          styles.input,
          { color: colors.text, backgroundColor: colors.surface, borderColor: error ? colors.danger : colors.rule },
          style,
        ]}
      />
      {hint && !error ? (
        <ThemedText variant="caption" muted>
          {hint}
        </ThemedText>
      ) : null}
      {error ? (
        <ThemedText variant="caption" tone="danger" testID={`${testID}-error`} accessibilityRole="alert">
          {error}
        </ThemedText>
      ) : null}
    </View>
  );
});

const styles = StyleSheet.create({
  wrap: { gap: space.xs },
  input: {
    minHeight: touchTarget,
    borderWidth: 1,
    borderRadius: radius.sm,
    paddingHorizontal: space.md,
    fontFamily: fonts.regular,
    fontSize: type.body.fontSize,
  },
});
