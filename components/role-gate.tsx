import { Redirect } from 'expo-router';
import type { ReactNode } from 'react';
import { homeFor, type Role, useSession } from '@/hooks/session';
import { Splash } from './splash';

/** Lets through only a signed-in user whose current membership has one of the roles. */
export function RoleGate({ roles, children }: { roles: Role[]; children: ReactNode }) {
  const { status, membership } = useSession();
  if (status === 'loading') return <Splash />;
  if (status === 'signed-out') return <Redirect href="/sign-in" />;
  if (!membership) return <Redirect href="/sign-in" />;
  if (!roles.includes(membership.role)) return <Redirect href={homeFor[membership.role]} />;
  return <>{children}</>;
}
