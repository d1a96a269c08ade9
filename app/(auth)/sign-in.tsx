import { Redirect } from 'expo-router';
import { Splash } from '@/components/splash';
import { homeFor, useSession } from '@/hooks/session';
import { SignInScreen } from '@/screens/sign-in-screen';

export default function SignInRoute() {
  const { status, membership } = useSession();
  if (status === 'loading') return <Splash />;
  if (status === 'signed-in' && membership) return <Redirect href={homeFor[membership.role]} />;
  return <SignInScreen />;
}
