import type { NavItem } from '@/components/app-shell';
import type { Role } from '@/hooks/session';

/** The places of each role, in the order they stand in the navigation. */
export const navFor: Record<Role, NavItem[]> = {
  technician: [
    { href: '/tech', label: 'Today', testID: 'nav-tech-home' },
    { href: '/tech/outbox', label: 'Outbox', testID: 'nav-tech-outbox' },
  ],
  planner: [{ href: '/plan', label: 'Overview', testID: 'nav-plan-home' }],
  engineer: [{ href: '/eng', label: 'Overview', testID: 'nav-eng-home' }],
  admin: [{ href: '/admin', label: 'Overview', testID: 'nav-admin-home' }],
};
