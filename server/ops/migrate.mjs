#!/usr/bin/env node
// `npm run migrate`: bring a database to the latest schema.
//
//   DATABASE_URL set         → that database
//   `npm start` is running   → its database, through the cluster it already started
//   otherwise                → the private cluster in .data/pg, started for the job and stopped after
//
// (server/db/migrate.ts does the work; this wrapper only finds or starts the database.)

import path from 'node:path';
import { portFromEnv } from './lib.mjs';
import { existingClusterUrl, startCluster } from './postgres.mjs';
import { ensureDeps, prepareDatabase } from './setup.mjs';
import { DATA, OpsError, acquireLock, say } from './sys.mjs';

async function main() {
  await ensureDeps();
  if (process.env.DATABASE_URL) {
    say('migrating the database in DATABASE_URL');
    await prepareDatabase({ databaseUrl: process.env.DATABASE_URL });
    return;
  }
  let lock;
  try {
    lock = acquireLock(path.join(DATA, 'start.lock'), 'Tetrawell (npm start)');
  } catch (e) {
    if (!(e instanceof OpsError) || !e.holder?.pgPort) throw e;
    // npm start holds the lock and its cluster is up: migrate through it.
    say(`npm start is running (pid ${e.holder.pid}): migrating its database on port ${e.holder.pgPort}`);
    const url = (database) => existingClusterUrl({ name: 'pg', port: e.holder.pgPort, database });
    await prepareDatabase({ databaseUrl: url('tetrawell'), adminUrl: url('postgres'), create: true });
    return;
  }
  lock.update({ purpose: 'npm run migrate' });
  let cluster = null;
  const stop = async () => {
    await cluster?.stop();
    lock.release();
  };
  process.on('SIGINT', () => void stop().then(() => process.exit(130)));
  try {
    cluster = await startCluster({ name: 'pg', port: portFromEnv(process.env.TETRAWELL_PG_PORT, 54329) });
    await prepareDatabase({ databaseUrl: cluster.url('tetrawell'), adminUrl: cluster.url('postgres'), create: true });
  } finally {
    await stop();
  }
}

main().catch((e) => {
  process.stderr.write(`[tetrawell] ${e instanceof OpsError ? e.message : e?.stack ?? e}\n`);
  process.exit(1);
});
