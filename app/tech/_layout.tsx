import { Slot } from 'expo-router';
import { AppShell } from '@/components/app-shell';
import { navFor } from '@/constants/navigation';
import { useSession } from '@/hooks/session';
import { OfflineProvider } from '@/offline/use-offline';

/** The technician's area, on the device store; who may enter it is decided once, in app/_layout.tsx. */
export default function Layout() {
  const { request, status, membership } = useSession();
  return (
    <OfflineProvider session={{ request, signedIn: status === 'signed-in', siteId: membership?.siteId ?? null }}>
      <AppShell nav={navFor.technician} title="Rounds">
        <Slot />
      </AppShell>
    </OfflineProvider>
  );
}
