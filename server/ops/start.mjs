#!/usr/bin/env node
// `npm start`: from a bare checkout to a running Tetrawell, in one command.
//
//   1. npm ci when node_modules is missing or stale
//   2. PostgreSQL: found or installed (Debian), private cluster in .data/pg, 127.0.0.1:54329
//      (skipped entirely when DATABASE_URL is set: that database is used as it is)
//   3. database `tetrawell` created if missing, migrated, demo seeded when empty
//   4. client built (dist/app) and the command line bundled (dist/cli) when their sources changed
//   5. server/main.ts run with DATABASE_URL, PORT, PUBLIC_URL, TETRAWELL_FAKE_SMTP_PORT; URL and demo sign-in printed
//   Ctrl-C stops the server (and with it the fake SMTP server), then the database.
//
// Plain Node ESM with no dependencies: it must run before node_modules exists.

import { spawn } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { demoLogins, portFromEnv } from './lib.mjs';
import { startCluster } from './postgres.mjs';
import { buildCli, buildClient, ensureDeps, prepareDatabase } from './setup.mjs';
import { DATA, OpsError, ROOT, acquireLock, bold, dim, ensureDir, portInUse, say, signalChildren, childrenExited, stopOrphanServer, tsxArgs, warn } from './sys.mjs';

const HELP = `npm start: run Tetrawell locally.

Environment:
  PORT                       HTTP port of the app (default 8080)
  HOST                       address the app listens on (default 127.0.0.1)
  PUBLIC_URL                 URL used in e-mailed links (default http://127.0.0.1:PORT)
  DATABASE_URL               use this PostgreSQL database instead of the private cluster in .data/pg
                             (migrated; the demo is seeded there only with TETRAWELL_SEED_DEMO=1)
  TETRAWELL_PG_PORT          port of the private cluster on 127.0.0.1 (default 54329)
  TETRAWELL_FAKE_SMTP_PORT   port of the local fake SMTP server (default 2525)
  SESSION_SECRET             session signing secret (default: generated once, kept in .data/session.secret)
  SMTP_HOST, SMTP_PORT, SMTP_USER, SMTP_PASS, SMTP_SECURE, MAIL_FROM   a real mail server instead of the fake one
  TETRAWELL_WORKERS          job workers inside the app (default 1; 0 for none, then run \`npm run worker\`)
`;

if (process.argv.includes('--help') || process.argv.includes('-h')) {
  process.stdout.write(HELP);
  process.exit(0);
}

const cleanups = []; // run in reverse order on the way out
let exiting = false;
let interrupted = false; // a signal arrived; shutdown follows once running set-up steps have ended
let server = null; // the server child process

async function shutdown(code, why) {
  if (exiting) return;
  exiting = true;
  if (why) say(why);
  for (const fn of cleanups.reverse()) {
    try {
      await fn();
    } catch (e) {
      warn(e instanceof Error ? e.message : String(e));
    }
  }
  process.exit(code);
}

for (const sig of ['SIGINT', 'SIGTERM', 'SIGHUP']) {
  process.on(sig, () => {
    if (exiting || interrupted) return;
    interrupted = true;
    // A set-up step still running (npm ci, vite build, migrations) gets the signal too, and is given time to end
    // before the database goes down under it.
    signalChildren(sig);
    void childrenExited(15_000).then(() => shutdown(sig === 'SIGINT' ? 0 : 1, `${sig} received: shutting down`));
  });
}

/** Stops the server child: SIGINT (its graceful shutdown closes HTTP, the fake SMTP and the pool), then harder. */
function stopServer() {
  return new Promise((resolve) => {
    if (!server || server.exitCode !== null || server.signalCode !== null) return resolve();
    const child = server;
    const hard = setTimeout(() => child.kill('SIGKILL'), 15_000);
    const soft = setTimeout(() => child.kill('SIGTERM'), 8_000);
    child.once('exit', () => {
      clearTimeout(hard);
      clearTimeout(soft);
      say('server stopped');
      resolve();
    });
    child.kill('SIGINT');
  });
}

function secretFromFile(file) {
  try {
    const s = fs.readFileSync(file, 'utf8').trim();
    if (s) return s;
  } catch {
    /* first run */
  }
  const s = randomBytes(32).toString('base64url');
  fs.writeFileSync(file, `${s}\n`, { mode: 0o600 });
  return s;
}

async function waitForHealth(url, child, timeoutMs) {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    if (child.exitCode !== null || child.signalCode !== null) return false;
    try {
      const r = await fetch(`${url}/api/health`, { signal: AbortSignal.timeout(2000) });
      if (r.ok) return true;
    } catch {
      /* not up yet */
    }
    await new Promise((r) => setTimeout(r, 300));
  }
  return false;
}

async function main() {
  ensureDir(DATA);
  const lock = acquireLock(path.join(DATA, 'start.lock'), 'Tetrawell (npm start)');
  cleanups.push(() => lock.release());
  if (lock.stale?.serverPid) await stopOrphanServer(lock.stale.serverPid);

  const port = portFromEnv(process.env.PORT, 8080);
  const pgPort = portFromEnv(process.env.TETRAWELL_PG_PORT, 54329);
  const smtpPort = portFromEnv(process.env.TETRAWELL_FAKE_SMTP_PORT, 2525);
  const host = process.env.HOST || '127.0.0.1';
  const shownHost = host === '0.0.0.0' || host === '::' ? '127.0.0.1' : host;
  const localUrl = `http://${shownHost.includes(':') ? `[${shownHost}]` : shownHost}:${port}`;
  const publicUrl = process.env.PUBLIC_URL || localUrl;

  // Fail fast, before minutes of set-up, when the app's port is taken.
  if (await portInUse(port, shownHost)) {
    throw new OpsError(`port ${port} is already in use on ${shownHost}. Set PORT=<another port> and try again.`);
  }

  await ensureDeps();

  let databaseUrl = process.env.DATABASE_URL;
  let info;
  if (databaseUrl) {
    // A database of the user's own may be a real one: never plant demo accounts (with a published
    // password and a site admin among them) there unless asked, and never in production.
    const seed = process.env.TETRAWELL_SEED_DEMO === '1' && process.env.NODE_ENV !== 'production';
    say(`DATABASE_URL is set: using that database (no local cluster${seed ? '; seeding the demo because TETRAWELL_SEED_DEMO=1' : ', no demo accounts'})`);
    info = await prepareDatabase({ databaseUrl, seed });
  } else {
    const cluster = await startCluster({ name: 'pg', port: pgPort });
    cleanups.push(() => cluster.stop());
    lock.update({ pgPort });
    databaseUrl = cluster.url('tetrawell');
    info = await prepareDatabase({ databaseUrl, adminUrl: cluster.url('postgres'), create: true, seed: true });
  }

  await buildClient();
  await buildCli();
  if (exiting || interrupted) return; // interrupted during set-up: shutdown() is already under way

  const env = {
    ...process.env,
    NODE_ENV: process.env.NODE_ENV || 'development',
    DATABASE_URL: databaseUrl,
    PORT: String(port),
    HOST: host,
    PUBLIC_URL: publicUrl,
    TETRAWELL_FAKE_SMTP_PORT: String(smtpPort),
    SESSION_SECRET: process.env.SESSION_SECRET || secretFromFile(path.join(DATA, 'session.secret')),
  };
  say('starting the server (server/main.ts)');
  // Own process group: a terminal Ctrl-C reaches only this script, which then stops the server once, in order.
  server = spawn(process.execPath, tsxArgs('server/main.ts'), { cwd: ROOT, env, stdio: 'inherit', detached: true });
  cleanups.push(stopServer);
  server.on('exit', (code, signal) => {
    if (!exiting) void shutdown(code === 0 ? 0 : 1, `the server exited (${signal ?? `code ${code}`}); stopping the rest`);
  });

  if (!(await waitForHealth(localUrl, server, 120_000))) {
    if (!exiting) await shutdown(1, 'the server did not answer /api/health; stopping');
    return;
  }
  lock.update({ url: localUrl, serverPid: server.pid, pgPort: process.env.DATABASE_URL ? null : pgPort });

  const logins = demoLogins(info?.seeded);
  const lines = [
    '',
    bold(`  Tetrawell is running at ${localUrl}`),
    publicUrl !== localUrl ? `  public URL (for e-mailed links): ${publicUrl}` : null,
    env.SMTP_HOST ? `  mail goes to ${env.SMTP_HOST}` : `  e-mail is caught by the local fake SMTP server on 127.0.0.1:${smtpPort} (admins read it in the app)`,
    '',
  ];
  if (logins.length) {
    const project = typeof info?.seeded?.projectName === 'string' ? ` (demo project "${info.seeded.projectName}")` : '';
    lines.push(`  Demo sign-in${project}:`);
    for (const l of logins) lines.push(`    ${l.email}  /  ${l.password}${l.role ? dim(`   (${l.role})`) : ''}`);
  } else if (process.env.DATABASE_URL && process.env.TETRAWELL_SEED_DEMO !== '1') {
    lines.push('  Demo sign-in: none (DATABASE_URL given: no demo accounts are created there). Sign up, or set');
    lines.push('  TETRAWELL_SEED_DEMO=1 to seed the demo into an empty database of your own.');
  } else {
    lines.push('  Demo sign-in: none. This database already had accounts when the demo would have been seeded,');
    lines.push('  or the demo accounts were removed since; sign in with an account of your own or sign up.');
  }
  lines.push('', dim('  Numbers shown by Tetrawell are model estimates; confirm them with your group\'s validated methods.'));
  lines.push(dim('  Press Ctrl-C to stop the server and the database.'), '');
  process.stdout.write(lines.filter((l) => l !== null).join('\n') + '\n');
}

main().catch(async (e) => {
  if (interrupted) return; // the step failed because it was interrupted; the signal handler shuts down
  if (e instanceof OpsError) process.stderr.write(`\n[tetrawell] ${e.message}\n`);
  else process.stderr.write(`\n[tetrawell] unexpected error: ${e?.stack ?? e}\n`);
  await shutdown(1);
});
