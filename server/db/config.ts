/**
 * Knex configuration: one place that knows how the server talks to PostgreSQL.
 */
import knexFactory, { type Knex } from 'knex';
import { fileURLToPath } from 'node:url';
import path from 'node:path';
import { setPriority } from 'node:os';

/** Absolute path of the repository's `migrations/` folder. */
export const MIGRATIONS_DIR = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..', 'migrations');

export interface DbOptions {
  /** connections kept by the pool; small by default: the app is I/O bound and PostgreSQL has a connection cap */
  poolMax?: number;
  /** where knex's own warnings go (e.g. failed connection attempts); console when absent */
  logger?: { warn(...a: unknown[]): void; error(...a: unknown[]): void };
  /**
   * Lower the OS priority of this pool's PostgreSQL backend processes to this nice value, where the database runs
   * on this machine and lets us (setpriority(2): the same user, or root); silently nothing otherwise. For pools
   * whose queries are big batch writes beside interactive ones (the design-body threads' 17 MB jsonb inserts).
   */
  backendNice?: number;
}

export function knexConfig(databaseUrl: string, options: DbOptions = {}): Knex.Config {
  return {
    client: 'pg',
    connection: databaseUrl,
    pool: {
      min: 0,
      max: options.poolMax ?? 10,
      ...(options.backendNice !== undefined ? { afterCreate: lowerBackendPriority(options.backendNice) } : {}),
    },
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

type PgConn = { query(sql: string, cb: (err: Error | null, res: { rows: { pid: number }[] }) => void): void };

function lowerBackendPriority(nice: number): (conn: PgConn, done: (err: Error | null, conn: PgConn) => void) => void {
  return (conn, done) => {
    conn.query('select pg_backend_pid() as pid', (err, res) => {
      if (!err) {
        try {
          setPriority(res.rows[0].pid, nice);
        } catch {
          // another machine, another user without the right, or a platform without nice values: nothing to do
        }
      }
      done(err, conn);
    });
  };
}

export function createKnex(databaseUrl: string, options: DbOptions = {}): Knex {
  return knexFactory(knexConfig(databaseUrl, options));
}
