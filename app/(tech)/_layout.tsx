import { Slot } from 'expo-router';
import { AppShell } from '@/components/app-shell';
import { RoleGate } from '@/components/role-gate';
import { navFor } from '@/constants/navigation';
import { useSession } from '@/hooks/session';
import { OfflineProvider } from '@/offline/use-offline';

export default function Layout() {
  const { request, status, membership } = useSession();
  return (
    <RoleGate roles={['technician']}>
      <OfflineProvider session={{ request, signedIn: status === 'signed-in', siteId: membership?.siteId ?? null }}>
        <AppShell nav={navFor.technician} title="Rounds">
          <Slot />
        </AppShell>
      </OfflineProvider>
    </RoleGate>
  );
}
