import { StyleSheet, View } from 'react-native';
import { Card } from '@/components/card';
import { ThemedText } from '@/components/themed-text';
import { space } from '@/constants/theme';
import { type Role, useSession } from '@/hooks/session';
import { useMe } from '@/hooks/queries/me';
import { useSite } from '@/hooks/queries/sites';

export const roleNames: Record<Role, string> = {
  technician: 'Field technician',
  planner: 'Maintenance planner',
  engineer: 'Reliability engineer',
  admin: 'Site administrator',
};

const roleJob: Record<Role, string> = {
  technician: 'Walk your routes, read each gauge, and re-read at once when Trueround flags a value.',
  planner: 'Sort the work orders the analysis opens, assign them and see them closed.',
  engineer: 'Follow instrument health and the cycle’s performance from the rounds.',
  admin: 'Keep the site’s people, instruments and routes up to date.',
};

/** The first screen of each role: who you are, where, and as what — from the server. */
export function RoleHomeScreen({ role }: { role: Role }) {
  const { membership } = useSession();
  const me = useMe();
  const site = useSite(membership?.siteId);

  const m = me.data?.memberships.find((x) => x.siteId === membership?.siteId);
  return (
    <View style={styles.stack}>
      <Card testID="home-identity">
        {me.isPending ? <ThemedText muted>Loading…</ThemedText> : null}
        {me.error ? (
          <ThemedText tone="danger" testID="home-error">
            {me.error.message}
          </ThemedText>
        ) : null}
        {me.data ? (
          <>
            <ThemedText variant="title" testID="home-name">
              {me.data.name}
            </ThemedText>
            <ThemedText muted testID="home-email">
              {me.data.email}
            </ThemedText>
            <View style={styles.row}>
              <ThemedText variant="label" muted>
                Site
              </ThemedText>
              <ThemedText variant="label" bold testID="home-site">
                {site.data?.name ?? m?.siteName ?? '—'}
              </ThemedText>
            </View>
            <View style={styles.row}>
              <ThemedText variant="label" muted>
                Role
              </ThemedText>
              <ThemedText variant="label" bold testID="home-role">
                {m ? roleNames[m.role] : roleNames[role]}
              </ThemedText>
            </View>
            {site.data?.timezone ? (
              <View style={styles.row}>
                <ThemedText variant="label" muted>
                  Site time zone
                </ThemedText>
                <ThemedText variant="label" testID="home-timezone">
                  {site.data.timezone}
                </ThemedText>
              </View>
            ) : null}
          </>
        ) : null}
      </Card>
      <ThemedText muted>{roleJob[role]}</ThemedText>
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  row: { flexDirection: 'row', justifyContent: 'space-between', gap: space.md },
});
