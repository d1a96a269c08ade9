/** The site's people and their roles, and inviting someone (an e-mail with a one-time password). */
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { DataTable, type Column } from '@/components/data-table';
import { Field } from '@/components/field';
import { ThemedText } from '@/components/themed-text';
import { space } from '@/constants/theme';
import { useInvite, useMembers } from '@/hooks/queries/admin';
import type { Role } from '@/shared/api/auth';
import type { SiteMember } from '@/shared/api/sites';
import { roleNames } from '@/screens/role-home-screen';

const columns: Column<SiteMember>[] = [
  {
    key: 'name',
    label: 'Name',
    flex: 1.5,
    render: (m) => (
      <ThemedText variant="label" bold>
        {m.name}
      </ThemedText>
    ),
  },
  { key: 'email', label: 'E-mail', flex: 2, render: (m) => m.email },
  { key: 'role', label: 'Role', flex: 1.5, render: (m) => roleNames[m.role] },
  {
    key: 'state',
    label: 'Account',
    flex: 1,
    render: (m) => (m.userId.startsWith('pending-') ? '… Inviting' : m.disabled ? '✕ Disabled' : '✓ Active'),
  },
];

const ROLES: Role[] = ['technician', 'planner', 'engineer', 'admin'];

function InviteForm() {
  const invite = useInvite();
  const [email, setEmail] = useState('');
  const [name, setName] = useState('');
  const [role, setRole] = useState<Role>('technician');
  const [sent, setSent] = useState<string | null>(null);
  const ok = /^\S+@\S+\.\S+$/.test(email.trim()) && name.trim().length > 0;
  return (
    <Card testID="invite-form">
      <ThemedText variant="label" bold>
        Invite someone
      </ThemedText>
      <View style={styles.row}>
        <View style={styles.grow}>
          <Field
            label="E-mail"
            value={email}
            onChangeText={setEmail}
            autoCapitalize="none"
            keyboardType="email-address"
            testID="invite-email"
          />
        </View>
        <View style={styles.grow}>
          <Field label="Name" value={name} onChangeText={setName} testID="invite-name" />
        </View>
      </View>
      <View style={styles.row}>
        {ROLES.map((r) => (
          <Button
            key={r}
            label={roleNames[r]}
            kind={role === r ? 'primary' : 'plain'}
            selected={role === r}
            testID={`invite-role-${r}`}
            onPress={() => setRole(r)}
          />
        ))}
      </View>
      <Button
        label="Send the invitation"
        testID="invite-submit"
        busy={invite.isPending}
        disabled={!ok}
        onPress={() =>
          invite.mutate(
            { email: email.trim(), name: name.trim(), role },
            {
              onSuccess: () => {
                setSent(email.trim());
                setEmail('');
                setName('');
              },
            },
          )
        }
      />
      {invite.error ? (
        <ThemedText
          tone="danger"
          testID="invite-error"
          accessibilityRole="alert"
        >{`Not invited: ${invite.error.message}`}</ThemedText>
      ) : null}
      {sent && !invite.error ? (
        <ThemedText
          tone="ok"
          testID="invite-sent"
        >{`✓ ${sent} is invited; the e-mail with a one-time password is on its way.`}</ThemedText>
      ) : null}
    </Card>
  );
}

export function PeopleScreen() {
  const q = useMembers();
  return (
    <View style={styles.stack}>
      <ThemedText variant="heading">People</ThemedText>
      {q.error ? (
        <ThemedText tone="danger" testID="people-error">
          {q.error.message}
        </ThemedText>
      ) : null}
      {q.isPending ? <ThemedText muted>Loading…</ThemedText> : null}
      {q.data ? (
        <DataTable
          rows={q.data.members}
          columns={columns}
          rowKey={(m) => m.userId}
          testID="people-table"
          rowTestID={(m) => `person-${m.email}`}
        />
      ) : null}
      <InviteForm />
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  grow: { flexGrow: 1, flexBasis: 220 },
});
