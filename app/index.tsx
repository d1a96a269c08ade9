import { Redirect } from 'expo-router';
import { Splash } from '@/components/splash';
import { homeFor, useSession } from '@/hooks/session';

export default function Index() {
  const { status, membership } = useSession();
  if (status === 'loading') return <Splash />;
  if (status === 'signed-out' || !membership) return <Redirect href="/sign-in" />;
  return <Redirect href={homeFor[membership.role]} />;
}
