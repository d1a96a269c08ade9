/**
 * `npm run bench`: runs every bench/*.bench.ts in turn. Each exports `run(): Promise<void>`
 * and prints its own table; figures are ratios against a baseline timed in the same process.
 */
import { readdirSync } from 'node:fs';
import { join } from 'node:path';

async function main() {
  const only = process.argv.slice(2);
  const files = readdirSync(__dirname)
    .filter((f) => f.endsWith('.bench.ts'))
    .filter((f) => only.length === 0 || only.some((o) => f.includes(o)))
    .sort();
  for (const f of files) {
    console.log(`\n=== ${f} ===`);
    const mod = await import(join(__dirname, f));
    await mod.run();
  }
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
