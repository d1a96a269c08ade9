/**
 * Choose a new password (an invitee replaces the one-time password from the invitation here).
 * The form checks what it can before sending — length, the two entries equal — and the server's
 * policy (common passwords, the e-mail itself) answers under the field it names. On success the
 * server ends every other session of the account; this one carries on with new tokens.
 */
import { zodResolver } from '@hookform/resolvers/zod';
import { useRouter } from 'expo-router';
import { useState } from 'react';
import { Controller, useForm } from 'react-hook-form';
import { z } from 'zod';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { FormPage } from '@/components/form-page';
import { Field } from '@/components/field';
import { ThemedText } from '@/components/themed-text';
import { ApiError } from '@/lib/api-client';
import { homeFor, useSession } from '@/hooks/session';

/** The server's minimum (server/auth/password-policy.ts PASSWORD_MIN), checked here first. */
export const NEW_PASSWORD_MIN = 12;

export const passwordFormSchema = z
  .object({
    currentPassword: z.string().min(1, 'Enter your current password (or the one-time password from the invitation).'),
    newPassword: z.string().min(NEW_PASSWORD_MIN, `At least ${NEW_PASSWORD_MIN} characters.`),
    repeat: z.string(),
  })
  .refine((f) => f.repeat === f.newPassword, { path: ['repeat'], message: 'The two new passwords differ.' });
type PasswordForm = z.infer<typeof passwordFormSchema>;
const FIELDS = ['currentPassword', 'newPassword', 'repeat'] as const;

export function PasswordScreen() {
  const { changePassword, membership } = useSession();
  const router = useRouter();
  const [failure, setFailure] = useState<string | null>(null);
  const [done, setDone] = useState(false);
  const { control, handleSubmit, formState, setError, reset } = useForm<PasswordForm>({
    resolver: zodResolver(passwordFormSchema),
    defaultValues: { currentPassword: '', newPassword: '', repeat: '' },
  });
  const home = membership ? homeFor[membership.role] : '/';

  const onSubmit = handleSubmit(async ({ currentPassword, newPassword }) => {
    setFailure(null);
    try {
      await changePassword(currentPassword, newPassword);
      reset();
      setDone(true);
    } catch (e) {
      if (e instanceof ApiError) {
        const named = Array.isArray(e.details) ? (e.details as { path?: string; message?: string }[]) : [];
        let placed = false;
        for (const d of named) {
          const field = FIELDS.find((f) => f === d.path);
          if (field && d.message) {
            setError(field, { message: d.message });
            placed = true;
          }
        }
        if (!placed)
          setFailure(e.status === 429 ? 'Too many attempts. Wait a few minutes, then try again.' : e.message);
      } else setFailure('The password was not changed. Try again.');
    }
  });

  const field = (name: (typeof FIELDS)[number], label: string, autoComplete: 'current-password' | 'new-password') => (
    <Controller
      control={control}
      name={name}
      render={({ field: f, fieldState }) => (
        <Field
          testID={`password-${name}`}
          label={label}
          secureTextEntry
          autoCapitalize="none"
          autoComplete={autoComplete}
          value={f.value}
          onChangeText={f.onChange}
          onBlur={f.onBlur}
          error={fieldState.error?.message}
        />
      )}
    />
  );

  return (
    <FormPage>
      <Card>
        <ThemedText variant="title" accessibilityRole="header">
          Your password
        </ThemedText>
        <ThemedText muted>
          At least {NEW_PASSWORD_MIN} characters; a few unrelated words make a good one. Not your e-mail address, not a
          common password.
        </ThemedText>
        {field('currentPassword', 'Current password', 'current-password')}
        {field('newPassword', 'New password', 'new-password')}
        {field('repeat', 'New password again', 'new-password')}
        {failure ? (
          <ThemedText testID="password-failure" tone="danger" accessibilityRole="alert">
            {failure}
          </ThemedText>
        ) : null}
        {done ? (
          <ThemedText testID="password-done" accessibilityRole="alert">
            Password changed. Any other device signed in to this account has been signed out.
          </ThemedText>
        ) : null}
        <Button testID="password-submit" label="Change password" onPress={onSubmit} busy={formState.isSubmitting} />
        <Button testID="password-back" label="Back" kind="plain" onPress={() => router.replace(home)} />
      </Card>
    </FormPage>
  );
}
