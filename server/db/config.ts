/**
 * Knex configuration: one place that knows how the server talks to PostgreSQL.
 */
import knexFactory, { type Knex } from 'knex';
import { fileURLToPath } from 'node:url';
import path from 'node:path';
import { setPriority } from 'node:os';
import { readFileSync, writeFileSync } from 'node:fs';

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
   * whose queries are big batch writes beside interactive ones (the design-body process's 17 MB jsonb inserts).
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
        const pid = res.rows[0].pid;
        try {
          setPriority(pid, nice);
        } catch {
          // another machine, another user without the right, or a platform without nice values: nothing to do
        }
        lowerOwnAutogroup(pid, nice);
      }
      done(err, conn);
    });
  };
}

/**
 * The same nice value for the backend's autogroup, when it leads a session of its own. With autogrouping on
 * (Linux's default on desktop and many server kernels, /proc/sys/kernel/sched_autogroup_enabled), the scheduler
 * first shares the cores fairly between autogroups, one per session, and a thread's own nice value only counts
 * inside its group (sched(7), "The autogroup feature"). Every PostgreSQL backend calls setsid() at start
 * (src/backend/postmaster/fork_process.c and InitPostmasterChild), so each is a group alone: at nice 10 a backend
 * parsing a 17 MB jsonb still weighed as much as the whole server process, request thread and all (seen with the
 * load bench: /proc/<pid>/autogroup of each backend read "nice 0", issue 8 item 7). Writing the group's nice value
 * (sched(7): "/proc/[pid]/autogroup … can be written to set the group's nice value") gives the backend the weight
 * its nice value means. Only for a session leader: a group shared with other processes (the postmaster's, say)
 * keeps its value. Silently nothing where the file is absent or not ours to write.
 */
function lowerOwnAutogroup(pid: number, nice: number): void {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
    // proc(5): field 6 is the session id; the command name (field 2) may hold spaces, so count after its ')'
    const session = Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[3]);
    if (session !== pid) return;
    writeFileSync(`/proc/${pid}/autogroup`, String(nice));
  } catch {
    // not Linux, no autogroup support, another user's process, or another machine's pid: nothing to do
  }
}

export function createKnex(databaseUrl: string, options: DbOptions = {}): Knex {
  return knexFactory(knexConfig(databaseUrl, options));
}
