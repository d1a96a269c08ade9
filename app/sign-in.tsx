import { SignInScreen } from '@/screens/account/sign-in-screen';

/** Reachable only when signed out (app/_layout.tsx); a signed-in user is sent to `/`. */
export default function SignInRoute() {
  return <SignInScreen />;
}
