import { StyleSheet, View, type ViewProps } from 'react-native';
import { radius, space } from '@/constants/theme';
import { useTheme } from '@/hooks/use-theme';

/** A hard-edged panel with a rule down its left side: Trueround's basic surface. */
export function Card({ style, children, ...rest }: ViewProps) {
  const { colors } = useTheme();
  return (
    <View
      {...rest}
      style={[
        styles.card,
        { backgroundColor: colors.surface, borderColor: colors.rule, borderLeftColor: colors.primary },
        style,
      ]}
    >
      {children}
    </View>
  );
}

const styles = StyleSheet.create({
  card: {
    borderWidth: 1,
    borderLeftWidth: 5,
    borderRadius: radius.sm,
    padding: space.lg,
    gap: space.sm,
  },
});
