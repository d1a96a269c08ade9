/**
 * The demo sites and logins, as data: the seed, the README and the tests read this one list.
 * Every name here is invented: "Fernhallow Heat & Power" is a made-up cogeneration plant and
 * its people are made up too. Brackenmoor (of the made-up Brackenmoor Mills) is a second site
 * that proves site isolation.
 */
import type { Role } from '../../shared/api/auth';

export const DEMO_PASSWORD = 'trueround-demo';

export type DemoSiteSlug = 'fernhallow' | 'brackenmoor';

export interface DemoSite {
  slug: DemoSiteSlug;
  name: string;
  company: string;
  timezone: string;
  /** m above sea level */
  elevationM: number;
}

export const demoSites: readonly DemoSite[] = [
  {
    slug: 'fernhallow',
    name: 'Fernhallow Works',
    company: 'Fernhallow Heat & Power',
    timezone: 'Europe/London',
    elevationM: 112,
  },
  {
    slug: 'brackenmoor',
    name: 'Brackenmoor Boiler House',
    company: 'Brackenmoor Mills',
    timezone: 'Europe/London',
    elevationM: 236,
  },
];

export interface DemoUser {
  email: string;
  name: string;
  role: Role;
  /** slug of the one site the user belongs to */
  site: DemoSiteSlug;
}

export const demoUsers: readonly DemoUser[] = [
  { email: 'tech@fernhallow.example', name: 'Robin Aske', role: 'technician', site: 'fernhallow' },
  { email: 'planner@fernhallow.example', name: 'Morgan Tilly', role: 'planner', site: 'fernhallow' },
  { email: 'engineer@fernhallow.example', name: 'Dr. Sam Okafor', role: 'engineer', site: 'fernhallow' },
  { email: 'admin@fernhallow.example', name: 'Jordan Vale', role: 'admin', site: 'fernhallow' },
  { email: 'planner@brackenmoor.example', name: 'Alex Pryce', role: 'planner', site: 'brackenmoor' },
];

/** The demo user of a role on a site (throws when the list has none, so tests fail loudly). */
export function demoUser(role: Role, site: DemoSiteSlug = 'fernhallow'): DemoUser {
  const u = demoUsers.find((d) => d.role === role && d.site === site);
  if (!u) throw new Error(`no demo user with role ${role} on site ${site}`);
  return u;
}
