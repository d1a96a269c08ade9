import type { ReactNode } from 'react';
import { KeyboardAvoidingView, ScrollView, StyleSheet, View } from 'react-native';
import { space } from '@/constants/theme';
import { useTheme } from '@/hooks/use-theme';

/** A page that holds one form in a centred column (sign-in, password), kept clear of the keyboard. */
export function FormPage({ children }: { children: ReactNode }) {
  const { colors } = useTheme();
  return (
    <KeyboardAvoidingView style={[styles.flex, { backgroundColor: colors.background }]} behavior="padding">
      <ScrollView contentContainerStyle={styles.center}>
        <View style={styles.column}>{children}</View>
      </ScrollView>
    </KeyboardAvoidingView>
  );
}

const styles = StyleSheet.create({
  flex: { flex: 1 },
  center: { flexGrow: 1, justifyContent: 'center', alignItems: 'center', padding: space.lg },
  column: { width: '100%', maxWidth: 420, gap: space.xl },
});
