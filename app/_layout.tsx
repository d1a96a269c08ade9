import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { useFonts } from 'expo-font';
import { Navigator, Slot, Stack } from 'expo-router';
import { useState } from 'react';
import { SafeAreaProvider } from 'react-native-safe-area-context';
import { Splash } from '@/components/splash';
import { fontFiles } from '@/constants/theme';
import { SessionProvider, useSession } from '@/hooks/session';

export default function RootLayout() {
  const [fontsLoaded, fontError] = useFonts(fontFiles);
  const [queryClient] = useState(
    () => new QueryClient({ defaultOptions: { queries: { retry: 1, staleTime: 30_000 } } }),
  );
  if (!fontsLoaded && !fontError) return <Splash />;
  return (
    <SafeAreaProvider>
      <QueryClientProvider client={queryClient}>
        <SessionProvider>
          <Guarded />
        </SessionProvider>
      </QueryClientProvider>
    </SafeAreaProvider>
  );
}

/**
 * The one guard for the whole app (Expo Router's protected routes): signed out, only the sign-in
 * screen; signed in, the password screen and the area (tech/, plan/, eng/, admin/) of the
 * current membership's role. A guarded-off
 * address sends the user to `/` (app/index.tsx), which sends them to sign-in or to their home.
 * `Navigator` + `Slot` render only the screen on top, as a plain `Slot` did.
 */
function Guarded() {
  const { status, membership } = useSession();
  if (status === 'loading') return <Splash />;
  const signedIn = status === 'signed-in' && membership !== null;
  const role = signedIn ? membership.role : null;
  return (
    <Navigator>
      <Navigator.Screen name="index" />
      <Stack.Protected guard={!signedIn}>
        <Navigator.Screen name="sign-in" />
      </Stack.Protected>
      <Stack.Protected guard={status === 'signed-in'}>
        <Navigator.Screen name="password" />
      </Stack.Protected>
      <Stack.Protected guard={role === 'technician'}>
        <Navigator.Screen name="tech" />
      </Stack.Protected>
      <Stack.Protected guard={role === 'planner'}>
        <Navigator.Screen name="plan" />
      </Stack.Protected>
      <Stack.Protected guard={role === 'engineer'}>
        <Navigator.Screen name="eng" />
      </Stack.Protected>
      <Stack.Protected guard={role === 'admin'}>
        <Navigator.Screen name="admin" />
      </Stack.Protected>
      <Slot />
    </Navigator>
  );
}
