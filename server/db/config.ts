/**
 * Knex configuration: one place that knows how the server talks to PostgreSQL.
 */
import knexFactory, { type Knex } from 'knex';
import { fileURLToPath } from 'node:url';
import path from 'node:path';

/** Absolute path of the repository's `migrations/` folder. */
export const MIGRATIONS_DIR = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..', 'migrations');

export interface DbOptions {
  /** connections kept by the pool; small by default: the app is I/O bound and PostgreSQL has a connection cap */
  poolMax?: number;
  /** where knex's own warnings go (e.g. failed connection attempts); console when absent */
  logger?: { warn(...a: unknown[]): void; error(...a: unknown[]): void };
}

export function knexConfig(databaseUrl: string, options: DbOptions = {}): Knex.Config {
  return {
    client: 'pg',
    connection: databaseUrl,
    pool: { min: 0, max: options.poolMax ?? 10 },
    // while the database is away a request waits at most this long for a connection, then answers 503
    acquireConnectionTimeout: 10_000,
    migrations: { tableName: 'knex_migrations' },
    ...(options.logger
      ? {
          log: {
            warn: (m: unknown) => options.logger!.warn('database:', m),
            error: (m: unknown) => options.logger!.error('database:', m),
            deprecate: (m: unknown) => options.logger!.warn('database:', m),
            debug: () => {},
          },
        }
      : {}),
  };
}

export function createKnex(databaseUrl: string, options: DbOptions = {}): Knex {
  return knexFactory(knexConfig(databaseUrl, options));
}
