import { Slot } from 'expo-router';
import { AppShell } from '@/components/app-shell';
import { navFor } from '@/constants/navigation';

/** The engineer's area; who may enter it is decided once, in app/_layout.tsx. */
export default function Layout() {
  return (
    <AppShell nav={navFor.engineer} title="Instruments and cycle">
      <Slot />
    </AppShell>
  );
}
