import { Slot } from 'expo-router';
import { AppShell } from '@/components/app-shell';
import { RoleGate } from '@/components/role-gate';
import { navFor } from '@/constants/navigation';

export default function Layout() {
  return (
    <RoleGate roles={['engineer']}>
      <AppShell nav={navFor.engineer} title="Instruments and cycle">
        <Slot />
      </AppShell>
    </RoleGate>
  );
}
