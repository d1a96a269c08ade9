import { PasswordScreen } from '@/screens/account/password-screen';

/** Reachable only when signed in (app/_layout.tsx). */
export default function PasswordRoute() {
  return <PasswordScreen />;
}
