import { Slot } from 'expo-router';
import { AppShell } from '@/components/app-shell';
import { RoleGate } from '@/components/role-gate';
import { navFor } from '@/constants/navigation';

export default function Layout() {
  return (
    <RoleGate roles={['planner']}>
      <AppShell nav={navFor.planner} title="Work orders">
        <Slot />
      </AppShell>
    </RoleGate>
  );
}
