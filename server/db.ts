/**
 * The TypeORM DataSource over PostgreSQL. Schema changes go through hand-written migrations
 * only: `synchronize` is never on and migrations never run implicitly (`npx tsx server/cli/migrate.ts`).
 */
import { DataSource } from 'typeorm';
import { ENTITIES } from './entities';
import { MIGRATIONS } from './migrations';

export interface DataSourceOptions {
  /** Max pooled connections (pg Pool `max`). */
  poolSize?: number;
  applicationName?: string;
}

export function makeDataSource(url: string, options: DataSourceOptions = {}): DataSource {
  return new DataSource({
    type: 'postgres',
    url,
    entities: ENTITIES,
    migrations: MIGRATIONS,
    migrationsTableName: 'typeorm_migrations',
    migrationsTransactionMode: 'each',
    migrationsRun: false,
    synchronize: false,
    logging: false,
    applicationName: options.applicationName ?? 'trueround-server',
    poolSize: options.poolSize ?? 10,
    // gen_random_uuid() is built into PostgreSQL 13+: no extension to install at connect.
    uuidExtension: 'pgcrypto',
    installExtensions: false,
    // Fail fast when the database is unreachable instead of hanging a request.
    connectTimeoutMS: 5000,
    extra: { statement_timeout: 30000 },
  });
}
