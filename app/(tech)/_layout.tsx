import { Slot } from 'expo-router';
import { AppShell } from '@/components/app-shell';
import { RoleGate } from '@/components/role-gate';
import { navFor } from '@/constants/navigation';
import { OfflineProvider } from '@/offline/use-offline';

export default function Layout() {
  return (
    <RoleGate roles={['technician']}>
      <OfflineProvider>
        <AppShell nav={navFor.technician} title="Rounds">
          <Slot />
        </AppShell>
      </OfflineProvider>
    </RoleGate>
  );
}
