#!/usr/bin/env node
// `npm test`: every check the project has, from a bare checkout, in one command.
//
//   set-up    npm ci when needed; Debian chromium and python3-meshio when missing; a private PostgreSQL
//             cluster for tests (.data/pg-test on 127.0.0.1:54339, never the demo's) with a fresh database
//             tetrawell_test, migrated; the client built (dist/app)
//   stages    tsc --noEmit · eslint . · vitest run · playwright test
//
// Every stage runs even when an earlier one failed; the end prints a per-stage summary and the plain line
// `N passed, N failed` (test counts from the runners' JSON reports; set-up, type check and lint count as one
// check each). Exit code 1 when anything failed. The test database is stopped on the way out, Ctrl-C included.

import fs from 'node:fs';
import path from 'node:path';
import { countTscErrors, countsFromEslintJson, countsFromPlaywrightJson, countsFromVitestJson, formatSummary, portFromEnv } from './lib.mjs';
import { startCluster } from './postgres.mjs';
import { buildClient, ensureDeps, prepareDatabase } from './setup.mjs';
import {
  DATA,
  OpsError,
  ROOT,
  acquireLock,
  aptInstall,
  bold,
  childrenExited,
  ensureDir,
  freePort,
  isExecutable,
  pythonHasModule,
  run,
  say,
  signalChildren,
  warn,
} from './sys.mjs';

const STAGES = ['typecheck', 'lint', 'vitest', 'e2e'];

const HELP = `npm test: set up a private test database and run every check.

Usage: node server/ops/test.mjs [--only <stage> [runner args...]] [--skip <stage>[,<stage>...]]
  stages: ${STAGES.join(', ')}
  --only vitest tests/server/auth.test.ts   runs the set-up and then only that runner, with those arguments
  --skip e2e                                 leaves a stage out (it is listed as skipped, not passed)

Environment:
  TETRAWELL_TEST_PG_PORT       port of the test cluster on 127.0.0.1 (default 54339)
  TETRAWELL_TEST_DATABASE_URL  use this (throwaway!) database instead of the private test cluster; it is
                               migrated but not dropped. DATABASE_URL is ignored here on purpose: tests
                               never touch the demo's or your own data.
`;

function parseArgs(argv) {
  const o = { only: null, extra: [], skip: new Set() };
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === '--help' || a === '-h') {
      process.stdout.write(HELP);
      process.exit(0);
    } else if (a === '--only') {
      o.only = argv[++i];
      o.extra = argv.slice(i + 1);
      break;
    } else if (a === '--skip') {
      for (const s of (argv[++i] ?? '').split(',')) if (s) o.skip.add(s);
    } else {
      process.stderr.write(`unknown option ${a}\n\n${HELP}`);
      process.exit(2);
    }
  }
  for (const s of [o.only, ...o.skip].filter(Boolean)) {
    if (!STAGES.includes(s)) {
      process.stderr.write(`unknown stage ${s} (stages: ${STAGES.join(', ')})\n`);
      process.exit(2);
    }
  }
  return o;
}

const opts = parseArgs(process.argv.slice(2));
const REPORTS = path.join(DATA, 'reports');
const results = [];
const cleanups = [];
let exiting = false;

async function cleanup() {
  for (const fn of cleanups.splice(0).reverse()) {
    try {
      await fn();
    } catch (e) {
      warn(e instanceof Error ? e.message : String(e));
    }
  }
}

for (const sig of ['SIGINT', 'SIGTERM', 'SIGHUP']) {
  process.on(sig, () => {
    if (exiting) return;
    exiting = true;
    say(`${sig} received: stopping the running stage and the test database`);
    // A terminal's Ctrl-C reaches the runner too; `kill -INT <pid>` reaches only us, so pass it on.
    signalChildren(sig);
    void childrenExited(15_000)
      .then(cleanup)
      .then(() => process.exit(130));
  });
}

function banner(name) {
  process.stdout.write(`\n${bold(`━━ ${name} ${'━'.repeat(Math.max(3, 60 - name.length))}`)}\n`);
}

function readJson(file) {
  try {
    return JSON.parse(fs.readFileSync(file, 'utf8'));
  } catch {
    return null;
  }
}

/** Runs one set-up step; a failure is recorded and the run goes on. */
async function setupStep(name, fn) {
  if (exiting) return false;
  banner(name);
  try {
    const detail = await fn();
    results.push({ name, ok: true, detail: detail ?? '' });
    return true;
  } catch (e) {
    const msg = e instanceof Error ? e.message : String(e);
    process.stderr.write(`[tetrawell] ${name} failed: ${msg}\n`);
    results.push({ name, ok: false, detail: msg.split('\n')[0] });
    return false;
  }
}

const node = process.execPath;
const bin = (rel) => path.join(ROOT, 'node_modules', rel);

async function stageTypecheck() {
  banner('type check (tsc --noEmit, and geometry/ without Node types)');
  const r = await run(node, [bin('typescript/bin/tsc'), '--noEmit', '-p', 'tsconfig.json', ...(opts.only === 'typecheck' ? opts.extra : [])], { capture: true });
  process.stdout.write(r.stdout);
  process.stderr.write(r.stderr);
  // geometry/ once more without Node's types: the numerical core runs in the browser too
  const g = await run(node, [bin('typescript/bin/tsc'), '--noEmit', '-p', 'tsconfig.geometry.json'], { capture: true });
  process.stdout.write(g.stdout);
  process.stderr.write(g.stderr);
  const errors = countTscErrors(r.stdout + r.stderr) + countTscErrors(g.stdout + g.stderr);
  const ok = r.code === 0 && g.code === 0;
  results.push({ name: 'type check', ok, detail: ok ? 'no errors' : `${errors || 'some'} error(s)` });
}

async function stageLint() {
  banner('lint (eslint .)');
  const out = path.join(REPORTS, 'eslint.json');
  fs.rmSync(out, { force: true });
  const extra = opts.only === 'lint' && opts.extra.length ? opts.extra : ['.'];
  const r = await run(node, [bin('eslint/bin/eslint.js'), ...extra, '--format', 'json', '--output-file', out], { capture: true });
  const json = readJson(out);
  if (!json) {
    process.stdout.write(r.stdout);
    process.stderr.write(r.stderr);
    results.push({ name: 'lint', ok: false, detail: `eslint exited with ${r.code} and wrote no report` });
    return;
  }
  // Print problems the way a compiler would: file:line:col  severity  message  (rule)
  for (const f of json) {
    for (const m of f.messages ?? []) {
      const sev = m.severity === 2 ? 'error' : 'warning';
      process.stdout.write(`${path.relative(ROOT, f.filePath)}:${m.line ?? 0}:${m.column ?? 0}  ${sev}  ${m.message}${m.ruleId ? `  (${m.ruleId})` : ''}\n`);
    }
  }
  const c = countsFromEslintJson(json);
  process.stdout.write(`${c.files} file(s) linted: ${c.errors} error(s), ${c.warnings} warning(s)\n`);
  const ok = r.code === 0 && c.errors === 0;
  results.push({ name: 'lint', ok, detail: `${c.files} files, ${c.errors} errors, ${c.warnings} warnings` });
}

async function stageVitest(env) {
  banner('unit and integration tests (vitest run)');
  const out = path.join(REPORTS, 'vitest.json');
  fs.rmSync(out, { force: true });
  const extra = opts.only === 'vitest' ? opts.extra : [];
  const r = await run(node, [bin('vitest/vitest.mjs'), 'run', '--reporter=default', '--reporter=json', `--outputFile.json=${out}`, ...extra], { env });
  const json = readJson(out);
  if (!json) {
    results.push({ name: 'vitest', ok: false, passed: 0, failed: 1, detail: `vitest exited with ${r.code} and wrote no report` });
    return;
  }
  const c = countsFromVitestJson(json);
  const ok = r.code === 0 && c.failed === 0;
  results.push({ name: 'vitest', ok, ...c, detail: `${c.passed} passed, ${c.failed} failed, ${c.skipped} skipped` });
}

async function stageE2e(env) {
  banner('browser end-to-end tests (playwright test)');
  const out = path.join(REPORTS, 'playwright.json');
  fs.rmSync(out, { force: true });
  const extra = opts.only === 'e2e' ? opts.extra : [];
  const e2eEnv = {
    ...env,
    TETRAWELL_E2E_PORT: String(await freePort()),
    TETRAWELL_E2E_SMTP_PORT: String(await freePort()),
    TETRAWELL_PLAYWRIGHT_JSON: out,
  };
  const r = await run(node, [bin('@playwright/test/cli.js'), 'test', ...extra], { env: e2eEnv });
  const json = readJson(out);
  if (!json) {
    results.push({ name: 'playwright', ok: false, passed: 0, failed: 1, detail: `playwright exited with ${r.code} and wrote no report` });
    return;
  }
  const c = countsFromPlaywrightJson(json);
  const ok = r.code === 0 && c.failed === 0;
  results.push({ name: 'playwright', ok, ...c, detail: `${c.passed} passed, ${c.failed} failed, ${c.skipped} skipped` });
}

async function main() {
  ensureDir(DATA);
  ensureDir(REPORTS);
  ensureDir(path.join(ROOT, 'tests', 'artifacts'));
  const lock = acquireLock(path.join(DATA, 'test.lock'), 'npm test');
  cleanups.push(() => lock.release());

  const wants = (s) => (opts.only ? opts.only === s : !opts.skip.has(s));
  const depsOk = await setupStep('npm dependencies', async () => {
    await ensureDeps();
    return 'node_modules up to date';
  });

  await setupStep('system packages', async () => {
    // chromium drives the browser tests; Debian's meshio is the outside reader the mesh export tests check against.
    const checked = [];
    const missing = [];
    if (wants('e2e')) {
      checked.push('chromium');
      if (!isExecutable('/usr/bin/chromium')) missing.push('chromium');
    }
    if (wants('vitest')) {
      checked.push('python3-meshio');
      if (!pythonHasModule('meshio')) missing.push('python3-meshio');
    }
    if (missing.length) await aptInstall(missing);
    if (!checked.length) return 'none needed';
    return missing.length ? `installed ${missing.join(', ')}` : `${checked.join(', ')} present`;
  });

  let databaseUrl = null;
  const needDb = wants('vitest') || wants('e2e');
  if (needDb) {
    await setupStep('test database', async () => {
      if (!depsOk) throw new OpsError('needs the npm dependencies');
      if (process.env.TETRAWELL_TEST_DATABASE_URL) {
        databaseUrl = process.env.TETRAWELL_TEST_DATABASE_URL;
        await prepareDatabase({ databaseUrl });
        return 'TETRAWELL_TEST_DATABASE_URL migrated';
      }
      const port = portFromEnv(process.env.TETRAWELL_TEST_PG_PORT, 54339);
      const cluster = await startCluster({ name: 'pg-test', port, disposable: true });
      cleanups.push(() => cluster.stop());
      databaseUrl = cluster.url('tetrawell_test');
      const info = await prepareDatabase({ databaseUrl, adminUrl: cluster.url('postgres'), recreate: true });
      return `fresh tetrawell_test on 127.0.0.1:${port}, ${info.migrations ?? 0} migration(s)`;
    });
  }

  if (wants('e2e')) {
    await setupStep('client build', async () => {
      if (!depsOk) throw new OpsError('needs the npm dependencies');
      const b = await buildClient();
      return b.built ? 'dist/app built' : 'dist/app up to date';
    });
  }

  const env = { ...process.env, NODE_ENV: 'test' };
  if (databaseUrl) {
    env.DATABASE_URL = databaseUrl;
    env.TETRAWELL_TEST_DATABASE_URL = databaseUrl;
  } else {
    // Never let tests fall through to a database they were not given.
    delete env.DATABASE_URL;
  }

  // After a Ctrl-C no new stage starts; the signal handler is already stopping the database.
  if (wants('typecheck') && !exiting) await stageTypecheck();
  if (wants('lint') && !exiting) await stageLint();
  if (wants('vitest') && !exiting) await stageVitest(env);
  if (wants('e2e') && !exiting) await stageE2e(env);

  for (const s of STAGES) {
    if (!wants(s)) results.push({ name: s, ok: true, notRun: true, detail: 'not run (left out by --only/--skip)' });
  }

  await cleanup();
  const summary = formatSummary(results);
  process.stdout.write(`${summary.text}\n`);
  process.exitCode = results.every((r) => r.ok) ? 0 : 1;
}

main().catch(async (e) => {
  process.stderr.write(`\n[tetrawell] ${e instanceof OpsError ? e.message : e?.stack ?? e}\n`);
  await cleanup();
  // Still end with the line CI reads.
  results.push({ name: 'test runner', ok: false, detail: 'aborted' });
  process.stdout.write(`${formatSummary(results).text}\n`);
  process.exit(1);
});
