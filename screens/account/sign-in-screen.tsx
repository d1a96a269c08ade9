import { zodResolver } from '@hookform/resolvers/zod';
import { useRouter } from 'expo-router';
import { useState } from 'react';
import { Controller, useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { z } from 'zod';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { FormPage } from '@/components/form-page';
import { Field } from '@/components/field';
import { ThemedText } from '@/components/themed-text';
import { space } from '@/constants/theme';
import { ApiError } from '@/lib/api-client';
import { homeFor, useSession } from '@/hooks/session';
import { useTheme } from '@/hooks/use-theme';

export const signInFormSchema = z.object({
  email: z.string().trim().min(1, 'Enter your e-mail address.').email('That is not an e-mail address.'),
  password: z.string().min(1, 'Enter your password.'),
});
type SignInForm = z.infer<typeof signInFormSchema>;

export function SignInScreen() {
  const { colors } = useTheme();
  const { signIn } = useSession();
  const router = useRouter();
  const [failure, setFailure] = useState<string | null>(null);
  const { control, handleSubmit, formState } = useForm<SignInForm>({
    resolver: zodResolver(signInFormSchema),
    defaultValues: { email: '', password: '' },
  });

  const onSubmit = handleSubmit(async ({ email, password }) => {
    setFailure(null);
    try {
      const user = await signIn(email, password);
      const role = user.memberships[0]?.role;
      router.replace(role ? homeFor[role] : '/');
    } catch (e) {
      if (e instanceof ApiError && e.status === 401)
        setFailure('E-mail or password is wrong. Check both and try again.');
      else if (e instanceof ApiError && e.status === 429)
        setFailure('Too many attempts. Wait a few minutes, then try again.');
      else if (e instanceof ApiError) setFailure(e.message);
      else setFailure('Sign-in failed. Try again.');
    }
  });

  return (
    <FormPage>
      <View style={styles.brand}>
        <ThemedText variant="display" style={{ color: colors.primary }}>
          Trueround
        </ThemedText>
        <ThemedText muted>Rounds readings, held against the steam tables.</ThemedText>
      </View>
      <Card>
        <ThemedText variant="title" accessibilityRole="header">
          Sign in
        </ThemedText>
        <Controller
          control={control}
          name="email"
          render={({ field, fieldState }) => (
            <Field
              testID="sign-in-email"
              label="E-mail"
              autoCapitalize="none"
              autoComplete="email"
              keyboardType="email-address"
              inputMode="email"
              value={field.value}
              onChangeText={field.onChange}
              onBlur={field.onBlur}
              error={fieldState.error?.message}
            />
          )}
        />
        <Controller
          control={control}
          name="password"
          render={({ field, fieldState }) => (
            <Field
              testID="sign-in-password"
              label="Password"
              secureTextEntry
              autoComplete="current-password"
              value={field.value}
              onChangeText={field.onChange}
              onBlur={field.onBlur}
              onSubmitEditing={onSubmit}
              error={fieldState.error?.message}
            />
          )}
        />
        {failure ? (
          <ThemedText testID="sign-in-failure" tone="danger" accessibilityRole="alert">
            {failure}
          </ThemedText>
        ) : null}
        <Button testID="sign-in-submit" label="Sign in" onPress={onSubmit} busy={formState.isSubmitting} />
      </Card>
    </FormPage>
  );
}

const styles = StyleSheet.create({
  brand: { gap: space.xs },
});
