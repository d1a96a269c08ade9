/**
 * Loads the demo sites and users (server/seed/demo-users.ts) into an empty database, and the demo
 * plant (units, instruments, routes: server/seed/demo-plant.ts).
 * Idempotent: sites and users only when no site exists, so it never touches real data; the plant
 * only on a demo site that has no unit yet (which also brings it to a database seeded before it).
 * Then the demo history (./history.ts: three months of rounds, analysed) when the database has
 * no round at all; by default everywhere except under NODE_ENV=test (jest), where a test opts in
 * with `seedDemo(ds, { history: true })` or calls seedHistory itself.
 */
import type { DataSource } from 'typeorm';
import { hashPassword } from '../auth/passwords';
import { MembershipEntity, SiteEntity, UserEntity } from '../entities';
import { seedDemoPlant } from './demo-plant';
import { DEMO_PASSWORD, demoSites, demoUsers } from './demo-users';
import { seedHistory, type SeedHistoryOptions, type SeedHistoryResult } from './history';

export interface SeedResult {
  seeded: boolean;
  sites: number;
  users: number;
  /** present when the demo history was seeded */
  history?: SeedHistoryResult;
}

export interface SeedOptions {
  /** seed the demo history into a database without rounds; default: unless NODE_ENV is test */
  history?: boolean | SeedHistoryOptions;
}

export async function seedDemo(ds: DataSource, options: SeedOptions = {}): Promise<SeedResult> {
  const result = await seedSitesAndPlant(ds);
  const history = options.history ?? process.env.NODE_ENV !== 'test';
  if (history) {
    const h = await seedHistory(ds, history === true ? {} : history);
    if (h.seeded) result.history = h;
  }
  return result;
}

async function seedSitesAndPlant(ds: DataSource): Promise<SeedResult> {
  // Hash outside the transaction: argon2 is the slow part and needs no lock.
  const hashes = await Promise.all(demoUsers.map(() => hashPassword(DEMO_PASSWORD)));
  return ds.transaction(async (em): Promise<SeedResult> => {
    // Serialise concurrent seeds (two `npm start`s): the second waits, then sees the sites.
    await em.query(`select pg_advisory_xact_lock(hashtext('trueround.seed.demo'))`);
    if ((await em.getRepository(SiteEntity).count()) > 0) {
      await seedDemoPlant(em);
      return { seeded: false, sites: 0, users: 0 };
    }

    const sites = new Map<string, string>();
    for (const s of demoSites) {
      const row = await em.getRepository(SiteEntity).save({
        name: s.name,
        slug: s.slug,
        timezone: s.timezone,
        elevationM: s.elevationM,
      });
      sites.set(s.slug, row.id);
    }
    for (const [i, u] of demoUsers.entries()) {
      const user = await em.getRepository(UserEntity).save({
        email: u.email.toLowerCase(),
        name: u.name,
        passwordHash: hashes[i],
        disabled: false,
      });
      await em.getRepository(MembershipEntity).save({ userId: user.id, siteId: sites.get(u.site)!, role: u.role });
    }
    await seedDemoPlant(em);
    return { seeded: true, sites: demoSites.length, users: demoUsers.length };
  });
}
