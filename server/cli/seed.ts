/**
 * Loads the demo sites and users when the database has no site yet (npx tsx server/cli/seed.ts).
 * Run migrations first (server/cli/migrate.ts).
 */
import { loadDatabaseUrl } from '../config';
import { makeDataSource } from '../db';
import { seedDemo } from '../seed/demo';

async function main(): Promise<void> {
  const ds = makeDataSource(loadDatabaseUrl(), { poolSize: 1, applicationName: 'trueround-seed' });
  await ds.initialize();
  try {
    if (await ds.showMigrations()) throw new Error('migrations are pending: run `npx tsx server/cli/migrate.ts` first');
    const r = await seedDemo(ds);
    console.log(
      r.seeded
        ? `[seed] demo loaded: ${r.sites} sites, ${r.users} users`
        : '[seed] a site exists already; demo not loaded',
    );
    const h = r.history;
    if (h) {
      console.log(
        `[seed] demo history ${h.from} … ${h.to}: ${h.rounds} rounds, ${h.readings} readings pushed in ${(h.pushMs / 1000).toFixed(1)} s, ` +
          `${h.analysed} analysed in ${(h.analysisMs / 1000).toFixed(1)} s`,
      );
    }
  } finally {
    await ds.destroy();
  }
}

main().catch((e: unknown) => {
  console.error(`[seed] ${e instanceof Error ? e.message : String(e)}`);
  process.exit(1);
});
