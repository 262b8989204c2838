// A private PostgreSQL cluster for development and tests, kept in a git-ignored folder of the project.
//
//   .data/
//     pg/              cluster of `npm start`      (owned by the cluster user, mode 0700)
//     pg-run/          its Unix socket folder      (owned by the cluster user)
//     pg.log           its server log
//     pg.password      generated password of the `tetrawell` superuser (mode 0600)
//     pg-test/ pg-test-run/ pg-test.log pg-test.password   the same for `npm test`
//
// The server listens on 127.0.0.1 only, on a fixed non-default port, with password (SCRAM) auth for
// every connection. When we run as root the cluster belongs to the `postgres` system user (created by
// Debian's package), because initdb and postgres refuse to run as root.

import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { pgConfQuote, pickPgBinDir, pgUrl, shQuote } from './lib.mjs';
import {
  DATA,
  OpsError,
  ROOT,
  aptInstall,
  asUser,
  ensureDir,
  isExecutable,
  isRoot,
  portInUse,
  run,
  runOk,
  say,
  warn,
  which,
} from './sys.mjs';

const VERSIONED_ROOT = '/usr/lib/postgresql';
const SUPERUSER = 'tetrawell';

function hasTools(dir) {
  return isExecutable(path.join(dir, 'pg_ctl')) && isExecutable(path.join(dir, 'initdb'));
}

function listVersioned() {
  try {
    return fs.readdirSync(VERSIONED_ROOT);
  } catch {
    return [];
  }
}

/** Finds pg_ctl/initdb on the PATH or in Debian's versioned folders; null when absent. */
export function findPgBin() {
  return pickPgBinDir({
    pathDirs: (process.env.PATH ?? '').split(path.delimiter),
    versionedRoot: VERSIONED_ROOT,
    versionedDirs: listVersioned(),
    hasTools,
  });
}

/** Finds PostgreSQL or installs Debian's `postgresql` package, then returns its bin folder. */
export async function ensurePostgresInstalled() {
  let bin = findPgBin();
  if (bin) return bin;
  say('PostgreSQL (pg_ctl, initdb) not found; installing Debian\'s postgresql package');
  await aptInstall(['postgresql']);
  bin = findPgBin();
  if (!bin) throw new OpsError(`postgresql installed but pg_ctl/initdb are still missing (looked on PATH and in ${VERSIONED_ROOT}/*/bin)`);
  return bin;
}

/** The system user that owns the cluster: ourselves, or when root the `postgres` user (created if missing). */
async function clusterUser() {
  if (!isRoot()) return null;
  const hasUser = async (u) => (await run('id', ['-u', u], { capture: true })).code === 0;
  if (await hasUser('postgres')) return 'postgres';
  if (!(await hasUser('tetrawell-pg'))) {
    say('creating the unprivileged system user tetrawell-pg to own the database cluster');
    const useradd = which('useradd') ?? '/usr/sbin/useradd';
    await runOk(useradd, ['--system', '--no-create-home', '--shell', '/usr/sbin/nologin', 'tetrawell-pg'], { capture: true });
  }
  return 'tetrawell-pg';
}

/**
 * The cluster user must be able to walk from / down to .data. A project checked out under /root (mode
 * 0700) would block it, so we add the search bit (o+x: enter, not list) to each parent that lacks it and
 * say so.
 */
async function ensureTraversable(user, target) {
  if (!user) return;
  const probe = asUser(user, 'test', ['-x', target], shQuote);
  const canEnter = async () => (await run(probe.cmd, probe.args, { capture: true })).code === 0;
  if (await canEnter()) return;
  const chain = [];
  for (let d = target; ; d = path.dirname(d)) {
    chain.unshift(d);
    if (d === path.dirname(d)) break;
  }
  for (const d of chain) {
    const st = fs.statSync(d);
    if ((st.mode & 0o001) === 0) {
      fs.chmodSync(d, (st.mode & 0o7777) | 0o001);
      warn(`added o+x to ${d} so the database user '${user}' can reach ${path.relative(ROOT, target) || target}`);
    }
  }
  if (!(await canEnter())) throw new OpsError(`the database user '${user}' still cannot reach ${target}`);
}

async function chownTo(user, p) {
  if (user) await runOk('chown', ['-R', `${user}:`, p], { capture: true });
}

/**
 * Describes one cluster (`name` is 'pg' for npm start, 'pg-test' for npm test) without touching it.
 */
export function clusterPaths(name) {
  return {
    dataDir: path.join(DATA, name),
    runDir: path.join(DATA, `${name}-run`),
    logFile: path.join(DATA, `${name}.log`),
    passwordFile: path.join(DATA, `${name}.password`),
  };
}

/**
 * Creates the cluster on first use and starts it on 127.0.0.1:port. Returns a handle with the connection
 * URL builder and a stop() that shuts the server down (pg_ctl stop -m fast).
 */
export async function startCluster({ name, port, disposable = false }) {
  const bin0 = await ensurePostgresInstalled();
  const { dataDir, runDir, logFile, passwordFile } = clusterPaths(name);
  const user = await clusterUser();
  ensureDir(DATA, 0o755);
  await ensureTraversable(user, DATA);

  // A cluster made by another major version needs that version's binaries.
  let bin = bin0;
  const versionFile = path.join(dataDir, 'PG_VERSION');
  if (fs.existsSync(versionFile)) {
    const v = fs.readFileSync(versionFile, 'utf8').trim();
    const own = path.join(VERSIONED_ROOT, v, 'bin');
    if (hasTools(own)) bin = own;
    else if (disposable) {
      // The test cluster holds nothing worth keeping: rebuild it with the PostgreSQL we have.
      warn(`${path.relative(ROOT, dataDir)} was made by PostgreSQL ${v}, which is not installed; recreating it`);
      const stale = asUser(user, path.join(bin, 'pg_ctl'), ['-D', dataDir, '-m', 'immediate', 'stop'], shQuote);
      await run(stale.cmd, stale.args, { capture: true });
      fs.rmSync(dataDir, { recursive: true, force: true });
    }
  }
  const exec = (tool, args, opts) => {
    const c = asUser(user, path.join(bin, tool), args, shQuote);
    return run(c.cmd, c.args, { capture: true, ...opts });
  };

  if (!fs.existsSync(versionFile)) {
    say(`creating a PostgreSQL cluster in ${path.relative(ROOT, dataDir)} (first run)`);
    fs.rmSync(dataDir, { recursive: true, force: true });
    ensureDir(dataDir, 0o700);
    await chownTo(user, dataDir);
    const password = randomBytes(18).toString('base64url');
    // initdb reads the password from a file the cluster user can read; it is removed right after.
    const pwInit = path.join(dataDir, '..', `.${name}.pwinit`);
    fs.writeFileSync(pwInit, `${password}\n`, { mode: 0o600 });
    await chownTo(user, pwInit);
    try {
      const r = await exec('initdb', [
        '-D', dataDir,
        '-U', SUPERUSER,
        `--pwfile=${pwInit}`,
        '--auth-local=scram-sha-256',
        '--auth-host=scram-sha-256',
        '--encoding=UTF8',
        '--locale=C',
      ]);
      if (r.code !== 0) {
        fs.rmSync(dataDir, { recursive: true, force: true });
        throw new OpsError(`initdb failed:\n${r.stdout}${r.stderr}`);
      }
    } finally {
      fs.rmSync(pwInit, { force: true });
    }
    fs.writeFileSync(passwordFile, password, { mode: 0o600 });
    const conf = path.join(dataDir, 'postgresql.conf');
    fs.appendFileSync(conf, `\n# Tetrawell: loopback address, port and socket folder are rewritten at every start\ninclude_if_exists = 'tetrawell.conf'\n`);
  }
  if (!fs.existsSync(passwordFile)) {
    throw new OpsError(`${path.relative(ROOT, passwordFile)} is missing, so the cluster in ${path.relative(ROOT, dataDir)} cannot be reached. Remove ${path.relative(ROOT, dataDir)} to create a new one.`);
  }
  const password = fs.readFileSync(passwordFile, 'utf8').trim();

  ensureDir(runDir, 0o700);
  await chownTo(user, runDir);
  fs.writeFileSync(
    path.join(dataDir, 'tetrawell.conf'),
    [
      `listen_addresses = '127.0.0.1'`,
      `port = ${port}`,
      `unix_socket_directories = ${pgConfQuote(runDir)}`,
      `unix_socket_permissions = 0700`,
      '',
    ].join('\n'),
  );
  if (!fs.existsSync(logFile)) fs.writeFileSync(logFile, '');
  await chownTo(user, path.join(dataDir, 'tetrawell.conf'));
  await chownTo(user, logFile);

  // A server left running by a run that was killed hard: stop it so the new settings apply.
  const status = await exec('pg_ctl', ['-D', dataDir, 'status']);
  if (status.code === 0) {
    warn(`a PostgreSQL server from an earlier run is still up in ${path.relative(ROOT, dataDir)}; restarting it`);
    await exec('pg_ctl', ['-D', dataDir, '-m', 'fast', '-w', 'stop']);
  }
  if (await portInUse(port)) {
    throw new OpsError(
      `port ${port} on 127.0.0.1 is already taken by another program, so the database cannot start there.\n` +
        `Choose another port with ${name === 'pg' ? 'TETRAWELL_PG_PORT' : 'TETRAWELL_TEST_PG_PORT'}=<port>.`,
    );
  }
  say(`starting PostgreSQL on 127.0.0.1:${port} (${path.relative(ROOT, dataDir)}, log ${path.relative(ROOT, logFile)})`);
  const started = await exec('pg_ctl', ['-D', dataDir, '-l', logFile, '-w', '-t', '90', 'start']);
  if (started.code !== 0) {
    let tail = '';
    try {
      tail = fs.readFileSync(logFile, 'utf8').split('\n').slice(-15).join('\n');
    } catch {
      /* no log */
    }
    throw new OpsError(`PostgreSQL did not start:\n${started.stdout}${started.stderr}\n--- ${logFile} ---\n${tail}`);
  }

  let stopped = false;
  return {
    port,
    dataDir,
    // through the Unix-domain socket: on loopback it costs the server about a fifth less CPU per query than TCP
    // (`npm run bench -- jobs`), and the cluster listens on it already
    url: (database) => pgUrl({ user: SUPERUSER, password, port, database, socketDir: runDir }),
    async stop() {
      if (stopped) return;
      stopped = true;
      const r = await exec('pg_ctl', ['-D', dataDir, '-m', 'fast', '-w', 'stop']);
      if (r.code === 0) say('PostgreSQL stopped');
      else warn(`pg_ctl stop said: ${(r.stdout + r.stderr).trim()}`);
    },
  };
}

/** Connection URL of a cluster that another process (a running `npm start`) has already started. */
export function existingClusterUrl({ name, port, database }) {
  const { passwordFile, runDir } = clusterPaths(name);
  const password = fs.readFileSync(passwordFile, 'utf8').trim();
  return pgUrl({ user: SUPERUSER, password, port, database, socketDir: runDir });
}
