import { Slot } from 'expo-router';
import { AppShell } from '@/components/app-shell';
import { navFor } from '@/constants/navigation';

/** The planner's area; who may enter it is decided once, in app/_layout.tsx. */
export default function Layout() {
  return (
    <AppShell nav={navFor.planner} title="Work orders">
      <Slot />
    </AppShell>
  );
}
