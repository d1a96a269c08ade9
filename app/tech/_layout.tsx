import { Slot } from 'expo-router';
import { AppShell } from '@/components/app-shell';
import { navFor } from '@/constants/navigation';
import { useSession } from '@/hooks/session';
import { OfflineProvider } from '@/offline/use-offline';

/** The technician's area, on the device store; who may enter it is decided once, in app/_layout.tsx. */
export default function Layout() {
  const { request, status, membership, user } = useSession();
  const signedIn = status === 'signed-in';
  const author = signedIn && user ? { id: user.id, name: user.name } : null;
  return (
    <OfflineProvider session={{ request, signedIn, siteId: membership?.siteId ?? null, author }}>
      <AppShell nav={navFor.technician} title="Rounds">
        <Slot />
      </AppShell>
    </OfflineProvider>
  );
}
