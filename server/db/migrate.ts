/**
 * Bring a database up to the latest schema.
 *
 * Migrations are TypeScript files in `migrations/`. Knex's own file loader would `import()`
 * them from inside node_modules, where no TypeScript loader applies under every runner, so
 * this module lists and imports them itself: under tsx and under vitest the import goes
 * through the same TypeScript-aware loader that loaded this file.
 *
 * Concurrent callers (parallel test files, two starts) are serialised with a PostgreSQL
 * advisory lock, so the second caller waits and then finds nothing left to do instead of
 * failing on knex's migration lock.
 *
 * Run directly: `npm run migrate` (reads DATABASE_URL).
 */
import { readdir } from 'node:fs/promises';
import path from 'node:path';
import { pathToFileURL, fileURLToPath } from 'node:url';
import type { Knex } from 'knex';
import { createKnex, MIGRATIONS_DIR } from './config';

interface MigrationModule {
  up(knex: Knex): Promise<void>;
  down(knex: Knex): Promise<void>;
}

/** Arbitrary constant that names "the Tetrawell schema migration" lock (common practice: one fixed key per job). */
const ADVISORY_LOCK_KEY = 7_307_011;

const MIGRATION_FILE = /^\d{14}_[a-z0-9_]+\.ts$/;

export function migrationSource(dir = MIGRATIONS_DIR): Knex.MigrationSource<string> {
  return {
    async getMigrations() {
      const names = (await readdir(dir)).filter((f) => MIGRATION_FILE.test(f));
      // the 14-digit timestamp prefix makes lexical order the intended order
      return names.sort();
    },
    getMigrationName(name) {
      return name;
    },
    async getMigration(name): Promise<MigrationModule> {
      return (await import(pathToFileURL(path.join(dir, name)).href)) as MigrationModule;
    },
  };
}

/** Apply every pending migration in `migrations/`. Returns the names applied by this call. */
export async function migrateLatestWith(knex: Knex): Promise<string[]> {
  const conn = await knex.client.acquireConnection();
  try {
    await knex.raw('select pg_advisory_lock(?)', [ADVISORY_LOCK_KEY]).connection(conn);
    try {
      const [, applied] = (await knex.migrate.latest({ migrationSource: migrationSource() })) as [number, string[]];
      return applied;
    } finally {
      await knex.raw('select pg_advisory_unlock(?)', [ADVISORY_LOCK_KEY]).connection(conn);
    }
  } finally {
    await knex.client.releaseConnection(conn);
  }
}

/** Open a connection to `databaseUrl`, migrate it to the latest schema and close the connection. */
export async function migrateLatest(databaseUrl: string): Promise<string[]> {
  const knex = createKnex(databaseUrl, { poolMax: 3 });
  try {
    return await migrateLatestWith(knex);
  } finally {
    await knex.destroy();
  }
}

const isMain = process.argv[1] != null && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url);
if (isMain) {
  const url = process.env.DATABASE_URL;
  if (!url) {
    console.error('DATABASE_URL is not set: point it at the PostgreSQL database to migrate.');
    process.exit(2);
  }
  migrateLatest(url).then(
    (applied) => {
      console.log(applied.length ? `Applied ${applied.length} migration(s):\n  ${applied.join('\n  ')}` : 'Schema already up to date.');
    },
    (err: unknown) => {
      console.error(`Migration failed: ${err instanceof Error ? err.message : String(err)}`);
      process.exit(1);
    },
  );
}
