import { ActivityIndicator, Pressable, StyleSheet, type PressableProps } from 'react-native';
import { fonts, radius, space, touchTarget, type } from '@/constants/theme';
import { useTheme } from '@/hooks/use-theme';
import { ThemedText } from './themed-text';

export interface ButtonProps extends Omit<PressableProps, 'children'> {
  label: string;
  /** `inverse`: an outlined button on the primary (dark) surface. */
  kind?: 'primary' | 'accent' | 'plain' | 'danger' | 'inverse';
  busy?: boolean;
  /** For a choice among buttons: this one is the chosen answer. */
  selected?: boolean;
  testID: string;
}

export function Button({ label, kind = 'primary', busy, disabled, selected, style, ...rest }: ButtonProps) {
  const { colors } = useTheme();
  const look = {
    primary: [colors.primary, colors.onPrimary, colors.primary],
    accent: [colors.accent, colors.onAccent, colors.accent],
    danger: [colors.danger, colors.onDanger, colors.danger],
    plain: [colors.clear, colors.primary, colors.rule],
    inverse: [colors.clear, colors.onPrimary, colors.onPrimary],
  }[kind];
  const [bg, fg, border] = look;
  return (
    <Pressable
      accessibilityRole="button"
      aria-disabled={!!disabled || !!busy}
      aria-busy={!!busy}
      aria-selected={selected}
      disabled={disabled || busy}
      {...rest}
      style={(state) => [
        styles.button,
        { backgroundColor: bg, borderColor: border },
        (disabled || busy) && styles.disabled,
        state.pressed && styles.pressed,
        typeof style === 'function' ? style(state) : style,
      ]}
    >
      {busy ? <ActivityIndicator color={fg} /> : null}
      <ThemedText variant="label" style={[styles.label, { color: fg }]}>
        {label}
      </ThemedText>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  button: {
    minHeight: touchTarget,
    paddingHorizontal: space.xl,
    borderRadius: radius.sm,
    borderWidth: 1,
    flexDirection: 'row',
    alignItems: 'center',
    justifyContent: 'center',
    gap: space.sm,
  },
  label: { fontFamily: fonts.bold, fontSize: type.label.fontSize + 1 },
  disabled: { opacity: 0.55 },
  pressed: { opacity: 0.8 },
});
