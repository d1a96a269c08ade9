import type { NavItem } from '@/components/app-shell';
import type { Role } from '@/hooks/session';

/** The places of each role, in the order they stand in the navigation. */
export const navFor: Record<Role, NavItem[]> = {
  technician: [
    { href: '/tech', label: 'Today', testID: 'nav-tech-home' },
    { href: '/tech/outbox', label: 'Outbox', testID: 'nav-tech-outbox' },
  ],
  planner: [
    { href: '/plan', label: 'Overview', testID: 'nav-plan-home' },
    { href: '/plan/work-orders', label: 'Work orders', testID: 'nav-plan-work-orders' },
  ],
  engineer: [
    { href: '/eng', label: 'Overview', testID: 'nav-eng-home' },
    { href: '/eng/instruments', label: 'Instrument health', testID: 'nav-eng-instruments' },
    { href: '/eng/rounds', label: 'Cycle', testID: 'nav-eng-cycle' },
  ],
  admin: [
    { href: '/admin', label: 'Overview', testID: 'nav-admin-home' },
    { href: '/admin/people', label: 'People', testID: 'nav-admin-people' },
    { href: '/admin/instruments', label: 'Instruments', testID: 'nav-admin-instruments' },
    { href: '/admin/routes', label: 'Routes', testID: 'nav-admin-routes' },
    { href: '/admin/mailbox', label: 'Mailbox', testID: 'nav-admin-mailbox' },
  ],
};
