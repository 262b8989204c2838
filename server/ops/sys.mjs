// Process, file and package helpers shared by start.mjs and test.mjs (plain Node, no dependencies).

import { spawn, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

/** Project root: two folders above server/ops/. */
export const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
export const DATA = path.join(ROOT, '.data');

const useColour = process.stdout.isTTY && !process.env.NO_COLOR;
const paint = (code, s) => (useColour ? `\x1b[${code}m${s}\x1b[0m` : s);
export const bold = (s) => paint('1', s);
export const dim = (s) => paint('2', s);

/** One line of progress, prefixed so it stands apart from the output of the tools we run. */
export function say(msg) {
  process.stdout.write(`${paint('36', '[tetrawell]')} ${msg}\n`);
}
export function warn(msg) {
  process.stderr.write(`${paint('33', '[tetrawell] warning:')} ${msg}\n`);
}

export class OpsError extends Error {}

export const isRoot = () => typeof process.getuid === 'function' && process.getuid() === 0;

export function isExecutable(file) {
  try {
    fs.accessSync(file, fs.constants.X_OK);
    return fs.statSync(file).isFile();
  } catch {
    return false;
  }
}

/** Finds a command on $PATH (like `command -v`). */
export function which(cmd) {
  for (const dir of (process.env.PATH ?? '').split(path.delimiter)) {
    if (dir && isExecutable(path.join(dir, cmd))) return path.join(dir, cmd);
  }
  return null;
}

export function ensureDir(dir, mode = 0o755) {
  fs.mkdirSync(dir, { recursive: true, mode });
}

/** Children started by run() that have not exited yet, so a signal handler can pass the signal on. */
const activeChildren = new Set();

/** Sends `signal` to every child run() started that is still running (a Ctrl-C aimed at this script alone). */
export function signalChildren(signal) {
  for (const c of activeChildren) {
    try {
      c.kill(signal);
    } catch {
      /* already gone */
    }
  }
}

/** Resolves when every child run() started has exited, or after `timeoutMs`. */
export async function childrenExited(timeoutMs) {
  const until = Date.now() + timeoutMs;
  while (activeChildren.size > 0 && Date.now() < until) await new Promise((r) => setTimeout(r, 100));
}

/**
 * Runs a command to completion with inherited output (or captured when `capture` is set).
 * Resolves with { code, stdout, stderr }; never rejects on a non-zero exit (callers decide).
 */
export function run(cmd, args, { cwd = ROOT, env = process.env, capture = false, input } = {}) {
  return new Promise((resolve, reject) => {
    const child = spawn(cmd, args, {
      cwd,
      env,
      stdio: [input != null ? 'pipe' : 'ignore', capture ? 'pipe' : 'inherit', capture ? 'pipe' : 'inherit'],
    });
    let stdout = '';
    let stderr = '';
    if (capture) {
      child.stdout.on('data', (d) => (stdout += d));
      child.stderr.on('data', (d) => (stderr += d));
    }
    if (input != null) child.stdin.end(input);
    activeChildren.add(child);
    child.on('error', (e) => {
      activeChildren.delete(child);
      reject(e);
    });
    child.on('close', (code, signal) => {
      activeChildren.delete(child);
      resolve({ code: code ?? (signal ? 128 : 1), signal, stdout, stderr });
    });
  });
}

/** Like run() but throws OpsError with the captured output on a non-zero exit. */
export async function runOk(cmd, args, opts = {}) {
  const r = await run(cmd, args, opts);
  if (r.code !== 0) {
    const out = `${r.stdout ?? ''}${r.stderr ?? ''}`.trim();
    throw new OpsError(`${path.basename(cmd)} ${args.join(' ')} exited with ${r.code}${out ? `:\n${out}` : ''}`);
  }
  return r;
}

/**
 * Wraps a command so it runs as another system user. PostgreSQL's initdb and postgres refuse to run as
 * root, so when we are root the cluster belongs to an unprivileged user. runuser (util-linux, always on
 * Debian) keeps argv intact; `su -s /bin/sh -c` is the fallback and needs shell quoting.
 */
export function asUser(user, cmd, args, shQuote) {
  if (!user) return { cmd, args };
  const runuser = which('runuser') ?? (isExecutable('/usr/sbin/runuser') ? '/usr/sbin/runuser' : null);
  if (runuser) return { cmd: runuser, args: ['-u', user, '--', cmd, ...args] };
  const line = [cmd, ...args].map(shQuote).join(' ');
  return { cmd: which('su') ?? '/bin/su', args: [user, '-s', '/bin/sh', '-c', line] };
}

let aptUpdated = false;

/**
 * Installs Debian packages non-interactively. Runs `apt-get update` only when the first install attempt
 * fails (a fresh image has empty package lists; a stale one may 404), and at most once per process.
 * Uses sudo when not root and sudo exists.
 */
export async function aptInstall(packages) {
  const prefix = isRoot() ? [] : which('sudo') ? ['sudo', 'env', 'DEBIAN_FRONTEND=noninteractive'] : null;
  if (!prefix) {
    throw new OpsError(
      `${packages.join(', ')} must be installed, but this user is not root and sudo is missing.\n` +
        `Install it yourself: apt-get install -y ${packages.join(' ')}`,
    );
  }
  if (!which('apt-get')) throw new OpsError(`apt-get not found; install ${packages.join(', ')} by hand.`);
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  const aptArgs = ['install', '-y', '--no-install-recommends', ...packages];
  const exec = (args) =>
    prefix.length ? run(prefix[0], [...prefix.slice(1), 'apt-get', ...args], { env }) : run('apt-get', args, { env });
  say(`installing Debian package(s): ${packages.join(' ')}`);
  if (!aptUpdated) {
    const first = await exec(['-q', ...aptArgs]);
    if (first.code === 0) return;
    say('first attempt failed; refreshing the package lists (apt-get update) and trying again');
    const up = await exec(['-q', 'update']);
    aptUpdated = true;
    if (up.code !== 0) throw new OpsError('apt-get update failed');
  }
  const second = await exec(['-q', ...aptArgs]);
  if (second.code !== 0) throw new OpsError(`apt-get install ${packages.join(' ')} failed`);
}

/** True when something accepts TCP connections on host:port. */
export function portInUse(port, host = '127.0.0.1') {
  return new Promise((resolve) => {
    const sock = net.connect({ port, host });
    const done = (v) => {
      sock.destroy();
      resolve(v);
    };
    sock.setTimeout(1000, () => done(false));
    sock.once('connect', () => done(true));
    sock.once('error', () => done(false));
  });
}

/** Asks the kernel for a free loopback port (bind to 0, read it back, close). */
export function freePort(host = '127.0.0.1') {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once('error', reject);
    srv.listen(0, host, () => {
      const { port } = srv.address();
      srv.close(() => resolve(port));
    });
  });
}

export function pidAlive(pid) {
  if (!Number.isInteger(pid) || pid <= 0) return false;
  try {
    process.kill(pid, 0);
  } catch (e) {
    return e.code === 'EPERM';
  }
  // A killed process whose parent has not reaped it yet still answers kill(0): a zombie is not alive.
  try {
    const stat = fs.readFileSync(`/proc/${pid}/stat`, 'utf8');
    return stat.slice(stat.lastIndexOf(')') + 2, stat.lastIndexOf(')') + 3) !== 'Z';
  } catch {
    return true;
  }
}

/**
 * A pid lock file in .data with a liveness check: `wx` creation is atomic, and a file whose pid is dead
 * (a run killed with SIGKILL, a reboot) is taken over. Returns { release, update, stale } or throws OpsError
 * naming the live holder.
 */
export function acquireLock(file, what) {
  ensureDir(path.dirname(file));
  let stale = null;
  for (let attempt = 0; attempt < 3; attempt++) {
    try {
      const fd = fs.openSync(file, 'wx', 0o644);
      const info = { pid: process.pid, startedAt: new Date().toISOString(), host: os.hostname() };
      fs.writeSync(fd, JSON.stringify(info));
      fs.closeSync(fd);
      let released = false;
      return {
        /** What the lock file said when a dead holder's lock was taken over (null otherwise). */
        stale,
        update(extra) {
          Object.assign(info, extra);
          fs.writeFileSync(file, JSON.stringify(info));
        },
        release() {
          if (released) return;
          released = true;
          try {
            const cur = JSON.parse(fs.readFileSync(file, 'utf8'));
            if (cur.pid === process.pid) fs.unlinkSync(file);
          } catch {
            /* already gone */
          }
        },
      };
    } catch (e) {
      if (e.code !== 'EEXIST') throw e;
      let holder = null;
      try {
        holder = JSON.parse(fs.readFileSync(file, 'utf8'));
      } catch {
        /* half-written or unreadable: treat as stale */
      }
      if (holder && pidAlive(holder.pid) && holder.pid !== process.pid) {
        const where = holder.url ? ` at ${holder.url}` : '';
        const err = new OpsError(
          `${what} is already running (pid ${holder.pid}, since ${holder.startedAt}${where}).\n` +
            `Stop it with Ctrl-C in its terminal (or: kill -INT ${holder.pid}) before starting another.`,
        );
        err.holder = holder;
        throw err;
      }
      warn(`removing a stale lock ${path.relative(ROOT, file)} (pid ${holder?.pid ?? '?'} is gone)`);
      stale = holder;
      fs.rmSync(file, { force: true });
    }
  }
  throw new OpsError(`could not take the lock ${file}`);
}

/** Runs `node --import tsx <script>` from the project root: TypeScript without a build step. */
export function tsxArgs(script, args = []) {
  return ['--import', 'tsx', script, ...args];
}

/** Synchronous check used before node_modules exists: is a Python module importable by Debian's python3? */
export function pythonHasModule(mod) {
  const py = isExecutable('/usr/bin/python3') ? '/usr/bin/python3' : null;
  if (!py) return false;
  // Run from a neutral folder so a same-named folder in the project cannot shadow the real module.
  const r = spawnSync(py, ['-c', `import ${mod}`], { cwd: os.tmpdir(), stdio: 'ignore' });
  return r.status === 0;
}

/**
 * Stops a server process left behind by a start script that was killed hard (its pid is in the stale lock).
 * Only a live process whose command line runs this project's server/main.ts from this folder is touched.
 */
export async function stopOrphanServer(pid) {
  if (!pidAlive(pid)) return false;
  const ours = () => {
    try {
      const cmdline = fs.readFileSync(`/proc/${pid}/cmdline`, 'utf8').split('\0').join(' ');
      return cmdline.includes('server/main.ts') && fs.realpathSync(`/proc/${pid}/cwd`) === fs.realpathSync(ROOT);
    } catch {
      return false;
    }
  };
  if (!ours()) return false;
  warn(`stopping the server left running by an earlier start (pid ${pid})`);
  process.kill(pid, 'SIGTERM');
  for (let i = 0; i < 100 && pidAlive(pid); i++) await new Promise((r) => setTimeout(r, 100));
  if (pidAlive(pid)) process.kill(pid, 'SIGKILL');
  return true;
}
