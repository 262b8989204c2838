/**
 * Database preparation step of `npm start` and `npm test` (run by setup.mjs as `node --import tsx`).
 *
 *   --database-url URL   the database to prepare (required)
 *   --admin-url URL      a database on the same server to connect to while creating/dropping it
 *   --create             create the database when it does not exist
 *   --recreate           drop it (closing other connections) and create it again: a clean test database
 *   --seed               seed the demo when the database is empty (server/db/seed.ts, seedDemoIfEmpty)
 *
 * Prints progress, then one machine-read line `TETRAWELL_RESULT {json}` with what happened.
 * The migration and seed modules are loaded by path at run time so that a missing export gives a clear
 * message naming the file and the function expected.
 */
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import knexFactory from 'knex';
import pg from 'pg';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');

interface Options {
  databaseUrl: string;
  adminUrl: string | null;
  create: boolean;
  recreate: boolean;
  seed: boolean;
}

function parseArgs(argv: string[]): Options {
  const o: Options = { databaseUrl: '', adminUrl: null, create: false, recreate: false, seed: false };
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === '--database-url') o.databaseUrl = argv[++i] ?? '';
    else if (a === '--admin-url') o.adminUrl = argv[++i] ?? null;
    else if (a === '--create') o.create = true;
    else if (a === '--recreate') o.recreate = true;
    else if (a === '--seed') o.seed = true;
    else throw new Error(`unknown option ${a}`);
  }
  if (!o.databaseUrl) throw new Error('--database-url is required');
  return o;
}

/** Double-quotes an SQL identifier (embedded quotes doubled). */
function ident(name: string): string {
  return `"${name.replace(/"/g, '""')}"`;
}

async function createOrRecreate(o: Options): Promise<boolean> {
  const target = new URL(o.databaseUrl);
  const dbName = decodeURIComponent(target.pathname.replace(/^\//, ''));
  if (!dbName) throw new Error('the database URL names no database');
  const adminUrl = o.adminUrl ?? Object.assign(new URL(o.databaseUrl), { pathname: '/postgres' }).toString();
  const client = new pg.Client({ connectionString: adminUrl });
  await client.connect();
  try {
    const exists = (await client.query('select 1 from pg_database where datname = $1', [dbName])).rowCount === 1;
    if (exists && o.recreate) {
      console.log(`dropping database ${dbName} (fresh test run)`);
      // WITH (FORCE) closes connections left by an interrupted run (PostgreSQL 13 and later).
      await client.query(`drop database ${ident(dbName)} with (force)`);
    }
    if (!exists || o.recreate) {
      console.log(`creating database ${dbName}`);
      await client.query(`create database ${ident(dbName)} encoding 'UTF8' template template0`);
      return true;
    }
    return false;
  } finally {
    await client.end();
  }
}

async function loadFunction<T>(rel: string, name: string): Promise<T> {
  const file = path.join(ROOT, rel);
  let mod: Record<string, unknown>;
  try {
    mod = (await import(pathToFileURL(file).href)) as Record<string, unknown>;
  } catch (err) {
    throw new Error(`cannot load ${rel}: ${err instanceof Error ? err.message : String(err)}`, { cause: err });
  }
  const fn = mod[name];
  if (typeof fn !== 'function') throw new Error(`${rel} does not export a function ${name}()`);
  return fn as T;
}

async function main(): Promise<void> {
  const o = parseArgs(process.argv.slice(2));
  const created = o.create || o.recreate ? await createOrRecreate(o) : false;

  const migrateLatest = await loadFunction<(url: string) => Promise<unknown>>('server/db/migrate.ts', 'migrateLatest');
  const applied = await migrateLatest(o.databaseUrl);
  const migrations = Array.isArray(applied) ? applied.length : null;
  console.log(migrations ? `applied ${migrations} migration(s)` : 'schema up to date');

  let seeded: unknown = null;
  if (o.seed) {
    const seedDemoIfEmpty = await loadFunction<(knex: unknown) => Promise<unknown>>('server/db/seed.ts', 'seedDemoIfEmpty');
    const knex = knexFactory({ client: 'pg', connection: o.databaseUrl, pool: { min: 0, max: 2 } });
    try {
      seeded = await seedDemoIfEmpty(knex);
    } finally {
      await knex.destroy();
    }
  }
  process.stdout.write(`TETRAWELL_RESULT ${JSON.stringify({ created, migrations, seeded })}\n`);
}

main().catch((err: unknown) => {
  console.error(`database preparation failed: ${err instanceof Error ? err.message : String(err)}`);
  process.exit(1);
});
