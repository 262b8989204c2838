// Steps shared by `npm start` and `npm test`: npm dependencies, the client build, database preparation.

import fs from 'node:fs';
import path from 'node:path';
import { ensureCliBundle } from './cli-bundle.mjs';
import { depsDecision, sha256, sourcesFingerprint } from './lib.mjs';
import { DATA, OpsError, ROOT, ensureDir, run, say, tsxArgs, which } from './sys.mjs';

const LOCK = path.join(ROOT, 'package-lock.json');
const NODE_MODULES = path.join(ROOT, 'node_modules');
const STAMP = path.join(NODE_MODULES, '.tetrawell-lock-hash');

function mtimeMs(file) {
  try {
    return fs.statSync(file).mtimeMs;
  } catch {
    return null;
  }
}

/** Runs `npm ci` when node_modules is missing or was installed from another package-lock.json. */
export async function ensureDeps() {
  if (!fs.existsSync(LOCK)) throw new OpsError('package-lock.json is missing: the install cannot be reproduced');
  const lockHash = sha256(fs.readFileSync(LOCK));
  let storedHash = null;
  try {
    storedHash = fs.readFileSync(STAMP, 'utf8').trim();
  } catch {
    /* no stamp yet */
  }
  const d = depsDecision({
    hasNodeModules: fs.existsSync(NODE_MODULES),
    storedHash,
    lockHash,
    hiddenLockMtimeMs: mtimeMs(path.join(NODE_MODULES, '.package-lock.json')),
    lockMtimeMs: mtimeMs(LOCK),
  });
  if (d.install) {
    say(`installing npm dependencies (npm ci): ${d.reason}`);
    const npm = which('npm');
    if (!npm) throw new OpsError('npm not found on PATH');
    const r = await run(npm, ['ci', '--no-audit', '--no-fund'], { env: { ...process.env, npm_config_yes: 'true' } });
    if (r.code !== 0) throw new OpsError('npm ci failed (see its output above)');
  }
  if (storedHash !== lockHash) fs.writeFileSync(STAMP, `${lockHash}\n`);
}

function walk(dir, out) {
  let entries;
  try {
    entries = fs.readdirSync(dir, { withFileTypes: true });
  } catch {
    return;
  }
  for (const e of entries) {
    const p = path.join(dir, e.name);
    if (e.isDirectory()) {
      if (e.name === 'node_modules' || e.name.startsWith('.')) continue;
      walk(p, out);
    } else if (e.isFile()) {
      const st = fs.statSync(p);
      out.push({ path: path.relative(ROOT, p), size: st.size, mtimeMs: st.mtimeMs });
    }
  }
}

/** Everything the client bundle is built from: its own code, the shared contracts and numerical core, the build config. */
const CLIENT_INPUTS = ['app', 'server/contracts', 'geometry', 'vite.config.ts', 'tsconfig.json', 'package-lock.json'];
const BUILD_STAMP = path.join(DATA, 'client-build.stamp');

/** Builds the client into dist/app with Vite, unless its inputs are unchanged since the last good build. */
export async function buildClient({ force = false } = {}) {
  const entries = [];
  for (const p of CLIENT_INPUTS) {
    const abs = path.join(ROOT, p);
    if (!fs.existsSync(abs)) continue;
    if (fs.statSync(abs).isDirectory()) walk(abs, entries);
    else {
      const st = fs.statSync(abs);
      entries.push({ path: p, size: st.size, mtimeMs: st.mtimeMs });
    }
  }
  const fp = sourcesFingerprint(entries);
  let last = null;
  try {
    last = fs.readFileSync(BUILD_STAMP, 'utf8').trim();
  } catch {
    /* never built */
  }
  if (!force && last === fp && fs.existsSync(path.join(ROOT, 'dist', 'app', 'index.html'))) {
    say('client unchanged since the last build (dist/app)');
    return { built: false };
  }
  if (!fs.existsSync(path.join(ROOT, 'vite.config.ts'))) throw new OpsError('vite.config.ts is missing: cannot build the client');
  say('building the client (vite build → dist/app)');
  const vite = path.join(ROOT, 'node_modules', 'vite', 'bin', 'vite.js');
  const r = await run(process.execPath, [vite, 'build', '--logLevel', 'warn']);
  if (r.code !== 0) {
    fs.rmSync(BUILD_STAMP, { force: true });
    throw new OpsError('vite build failed (see its output above)');
  }
  ensureDir(DATA);
  fs.writeFileSync(BUILD_STAMP, `${fp}\n`);
  return { built: true };
}

/** Builds the command line's bundle (dist/cli, see cli-bundle.mjs) unless one for the current sources exists. */
export async function buildCli() {
  try {
    const { built } = await ensureCliBundle(ROOT);
    say(built ? 'built the command line (esbuild → dist/cli)' : 'command line unchanged since the last build (dist/cli)');
  } catch (e) {
    throw new OpsError(e.message);
  }
}

/**
 * Creates (or recreates) the database, migrates it and optionally seeds the demo, through
 * server/ops/prepare-db.ts (run with tsx because the migrations and the seed are TypeScript).
 * Returns what the script reported: { created, migrations, seeded, logins }.
 */
export async function prepareDatabase({ databaseUrl, adminUrl, create = false, recreate = false, seed = false }) {
  const args = ['--database-url', databaseUrl];
  if (adminUrl) args.push('--admin-url', adminUrl);
  if (create) args.push('--create');
  if (recreate) args.push('--recreate');
  if (seed) args.push('--seed');
  const r = await run(process.execPath, tsxArgs('server/ops/prepare-db.ts', args), { capture: true });
  const lines = r.stdout.split('\n');
  const resultLine = lines.find((l) => l.startsWith('TETRAWELL_RESULT '));
  for (const l of lines) if (l && !l.startsWith('TETRAWELL_RESULT ')) process.stdout.write(`${l}\n`);
  if (r.stderr.trim()) process.stderr.write(r.stderr);
  if (r.code !== 0 || !resultLine) throw new OpsError('preparing the database failed (see above)');
  return JSON.parse(resultLine.slice('TETRAWELL_RESULT '.length));
}
