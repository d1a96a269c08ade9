import { Redirect } from 'expo-router';
import { Splash } from '@/components/splash';
import { useSession } from '@/hooks/session';
import { PasswordScreen } from '@/screens/password-screen';

export default function PasswordRoute() {
  const { status } = useSession();
  if (status === 'loading') return <Splash />;
  if (status !== 'signed-in') return <Redirect href="/sign-in" />;
  return <PasswordScreen />;
}
