import { AuthFoundation1764633600000 } from './1764633600000-auth-foundation';

/**
 * Every migration, oldest first. Classes are listed (not globbed) so tsx, ts-jest and a
 * bundled build all find the same set. A new migration: `<unix ms>-<what>.ts` exporting a
 * class named `<What><unix ms>`, appended here.
 */
export const MIGRATIONS = [AuthFoundation1764633600000];
