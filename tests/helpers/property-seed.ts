/**
 * One seed for every fast-check property of the suite, so `npm test` explores the same cases on
 * every machine and a failure in CI replays here. TR_FC_SEED=<n> picks another seed;
 * TR_FC_SEED=random lets fast-check draw a new one per run (it prints the seed of a failure).
 */
import fc from 'fast-check';

export const PROPERTY_SEED = 20261202;

export function fixPropertySeed(): void {
  const env = process.env.TR_FC_SEED;
  if (env === 'random') return;
  const seed = env === undefined || env === '' ? PROPERTY_SEED : Number(env);
  if (!Number.isInteger(seed)) throw new Error(`TR_FC_SEED must be an integer or "random", got ${env}`);
  fc.configureGlobal({ ...fc.readConfigureGlobal(), seed });
}
