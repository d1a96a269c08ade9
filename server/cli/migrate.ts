/**
 * Runs pending migrations against DATABASE_URL.
 *   npx tsx server/cli/migrate.ts            apply every pending migration
 *   npx tsx server/cli/migrate.ts --revert   undo the last applied migration
 *   npx tsx server/cli/migrate.ts --status   list pending migrations, change nothing
 */
import { loadDatabaseUrl } from '../config';
import { makeDataSource } from '../db';

async function main(argv: string[]): Promise<void> {
  const url = loadDatabaseUrl();
  const ds = makeDataSource(url, { poolSize: 1, applicationName: 'trueround-migrate' });
  await ds.initialize();
  try {
    if (argv.includes('--revert')) {
      await ds.undoLastMigration({ transaction: 'each' });
      console.log('[migrate] reverted the last migration');
    } else if (argv.includes('--status')) {
      const pending = await ds.showMigrations();
      console.log(pending ? '[migrate] migrations are pending' : '[migrate] up to date');
      process.exitCode = pending ? 2 : 0;
    } else {
      const done = await ds.runMigrations({ transaction: 'each' });
      console.log(done.length ? `[migrate] applied ${done.map((m) => m.name).join(', ')}` : '[migrate] up to date');
    }
  } finally {
    await ds.destroy();
  }
}

main(process.argv.slice(2)).catch((e: unknown) => {
  console.error(`[migrate] ${e instanceof Error ? e.message : String(e)}`);
  process.exit(1);
});
