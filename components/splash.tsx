import { ActivityIndicator, StyleSheet, View } from 'react-native';
import { useTheme } from '@/hooks/use-theme';

export function Splash() {
  const { colors } = useTheme();
  return (
    <View style={[styles.fill, { backgroundColor: colors.background }]} testID="splash">
      <ActivityIndicator color={colors.primary} size="large" />
    </View>
  );
}

const styles = StyleSheet.create({ fill: { flex: 1, alignItems: 'center', justifyContent: 'center' } });
