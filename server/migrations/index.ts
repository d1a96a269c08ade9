import { AuthFoundation1764633600000 } from './1764633600000-auth-foundation';
import { SyncAndRoutes1764720000000 } from './1764720000000-sync-and-routes';
import { AnalysisAndWorkOrders1764806400000 } from './1764806400000-analysis-and-work-orders';
import { Mail1764806500000 } from './1764806500000-mail';
import { SignInLockout1764892800000 } from './1764892800000-sign-in-lockout';
import { FindingsPolicy1764979200000 } from './1764979200000-findings-policy';
import { AuthorsAndMailSites1765000000000 } from './1765000000000-authors-and-mail-sites';

/**
 * Every migration, oldest first. Classes are listed (not globbed) so tsx, ts-jest and a
 * bundled build all find the same set. A new migration: `<unix ms>-<what>.ts` exporting a
 * class named `<What><unix ms>`, appended here.
 */
export const MIGRATIONS = [
  AuthFoundation1764633600000,
  SyncAndRoutes1764720000000,
  AnalysisAndWorkOrders1764806400000,
  Mail1764806500000,
  SignInLockout1764892800000,
  FindingsPolicy1764979200000,
  AuthorsAndMailSites1765000000000,
];
