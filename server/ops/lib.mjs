// Pure helpers behind `npm start` and `npm test`.
//
// Everything here is plain Node ESM with no dependencies and no side effects, so the scripts can load it
// before node_modules exists and tests/ops/ can check it without a database, a network or apt.
// Types for TypeScript callers live beside it in lib.d.mts.

import { createHash } from 'node:crypto';

/**
 * Orders PostgreSQL version strings numerically ("9.6" < "15" < "16.2").
 * Debian keeps one folder per major version under /usr/lib/postgresql, and a plain string sort would
 * put "9.6" above "15".
 */
export function compareVersions(a, b) {
  const pa = String(a).split('.').map((x) => Number.parseInt(x, 10) || 0);
  const pb = String(b).split('.').map((x) => Number.parseInt(x, 10) || 0);
  const n = Math.max(pa.length, pb.length);
  for (let i = 0; i < n; i++) {
    const d = (pa[i] ?? 0) - (pb[i] ?? 0);
    if (d !== 0) return d < 0 ? -1 : 1;
  }
  return 0;
}

/**
 * Picks the PostgreSQL bin folder to use.
 *
 * `pathDirs` are the folders of $PATH (searched first, in order, as a shell would: a user who put a
 * PostgreSQL on the PATH meant it); `versionedDirs` are the names found under /usr/lib/postgresql
 * (e.g. ["13", "15"]); `hasTools(dir)` says whether a folder holds both pg_ctl and initdb.
 * Returns the folder or null when nothing usable exists (the caller then installs Debian's package).
 */
export function pickPgBinDir({ pathDirs, versionedRoot, versionedDirs, hasTools }) {
  for (const dir of pathDirs) {
    if (dir && hasTools(dir)) return dir;
  }
  const versions = versionedDirs.filter((v) => /^\d+(\.\d+)*$/.test(v)).sort((a, b) => compareVersions(b, a));
  for (const v of versions) {
    const dir = `${versionedRoot}/${v}/bin`;
    if (hasTools(dir)) return dir;
  }
  return null;
}

/** SHA-256 (hex) of a buffer or string: used for the package-lock.json stamp kept in node_modules. */
export function sha256(data) {
  return createHash('sha256').update(data).digest('hex');
}

/**
 * Decides whether `npm ci` must run.
 *
 * Inputs are facts gathered by the caller: does node_modules exist, the stored stamp (hash of the
 * package-lock.json that was installed, or null), the current lock hash, and as a fallback for trees
 * installed by hand (no stamp yet) the mtimes of npm's own node_modules/.package-lock.json and of
 * package-lock.json. npm writes its hidden lockfile at the end of every install, so a hidden lockfile
 * at least as new as package-lock.json means the install saw this lock.
 */
export function depsDecision({ hasNodeModules, storedHash, lockHash, hiddenLockMtimeMs, lockMtimeMs }) {
  if (!hasNodeModules) return { install: true, reason: 'node_modules is missing' };
  if (storedHash) {
    return storedHash === lockHash
      ? { install: false, reason: 'node_modules matches package-lock.json' }
      : { install: true, reason: 'package-lock.json changed since the last install' };
  }
  if (hiddenLockMtimeMs != null && lockMtimeMs != null && hiddenLockMtimeMs >= lockMtimeMs) {
    return { install: false, reason: 'node_modules is newer than package-lock.json' };
  }
  return { install: true, reason: 'node_modules looks older than package-lock.json' };
}

/**
 * Fingerprint of the client sources (path, size, mtime of every file), to skip `vite build` when nothing
 * changed. Entries are sorted so the walk order of the file system does not matter.
 */
export function sourcesFingerprint(entries) {
  const lines = entries
    .map((e) => `${e.path}\t${e.size}\t${Math.trunc(e.mtimeMs)}`)
    .sort();
  return sha256(lines.join('\n'));
}

/** Builds a postgres:// URL; user, password and database are percent-encoded. */
export function pgUrl({ user, password, host = '127.0.0.1', port, database, socketDir }) {
  const auth = password != null && password !== ''
    ? `${encodeURIComponent(user)}:${encodeURIComponent(password)}`
    : encodeURIComponent(user);
  // socketDir: connect through the cluster's Unix-domain socket in that folder (libpq and node-postgres read `host`
  // from the query string); the address before it stays for tools that want TCP and for the logs
  const query = socketDir ? `?host=${encodeURIComponent(socketDir)}` : '';
  return `postgres://${auth}@${host}:${port}/${encodeURIComponent(database)}${query}`;
}

/** Parses a port from the environment; falls back on `fallback` and rejects anything outside 1..65535. */
export function portFromEnv(value, fallback) {
  if (value == null || value === '') return fallback;
  const n = Number(value);
  if (!Number.isInteger(n) || n < 1 || n > 65535) {
    throw new Error(`not a TCP port: ${JSON.stringify(value)} (expected an integer 1..65535)`);
  }
  return n;
}

/**
 * Quotes one argument for /bin/sh (used only for `su -c` when runuser is missing).
 * Single quotes protect everything except a single quote, which is closed, escaped and reopened.
 */
export function shQuote(arg) {
  const s = String(arg);
  if (/^[A-Za-z0-9_/.,:=@%+-]+$/.test(s)) return s;
  return `'${s.replace(/'/g, `'\\''`)}'`;
}

/** Quotes a value for postgresql.conf (single quotes, with embedded quotes doubled). */
export function pgConfQuote(value) {
  return `'${String(value).replace(/'/g, "''")}'`;
}

/**
 * Reads the JSON written by `vitest run --reporter=json`.
 * A test file that fails to load has no test results but a failed suite; it is counted as one failure so
 * a broken import can never look like a pass.
 */
export function countsFromVitestJson(json) {
  const passed = json.numPassedTests ?? 0;
  let failed = json.numFailedTests ?? 0;
  const skipped = (json.numPendingTests ?? 0) + (json.numTodoTests ?? 0);
  const files = Array.isArray(json.testResults) ? json.testResults : [];
  for (const f of files) {
    const results = Array.isArray(f.assertionResults) ? f.assertionResults : [];
    const failedInFile = results.filter((r) => r.status === 'failed').length;
    if (f.status === 'failed' && failedInFile === 0) failed += 1;
  }
  return { passed, failed, skipped };
}

/**
 * Reads the JSON written by Playwright's json reporter. Its `stats` block counts tests by outcome:
 * expected (passed), unexpected (failed), flaky (passed on retry: counted as passed), skipped.
 * Errors outside any test (a broken config, a web server that never came up) add one failure.
 */
export function countsFromPlaywrightJson(json) {
  const s = json.stats ?? {};
  const passed = (s.expected ?? 0) + (s.flaky ?? 0);
  let failed = s.unexpected ?? 0;
  const skipped = s.skipped ?? 0;
  if (Array.isArray(json.errors) && json.errors.length > 0) failed += 1;
  return { passed, failed, skipped };
}

/** Counts ESLint problems from `eslint --format json` (an array of files with errorCount/warningCount). */
export function countsFromEslintJson(json) {
  let errors = 0;
  let warnings = 0;
  let files = 0;
  for (const f of json) {
    files += 1;
    errors += (f.errorCount ?? 0) + (f.fatalErrorCount ?? 0);
    warnings += f.warningCount ?? 0;
  }
  return { files, errors, warnings };
}

/** Counts `error TSxxxx` diagnostics in `tsc --noEmit` output. */
export function countTscErrors(output) {
  const m = String(output).match(/error TS\d+:/g);
  return m ? m.length : 0;
}

/**
 * Formats the closing summary of `npm test`.
 *
 * Each stage is { name, ok, detail, passed, failed, skipped, notRun }. Stages that run tests (vitest, Playwright)
 * contribute their test counts; the others (set-up, type check, lint) count as one check each, passed or
 * failed; stages left out on request (notRun) count as neither. The last line is the plain `N passed, N failed` that CI reads.
 */
export function formatSummary(stages) {
  let passed = 0;
  let failed = 0;
  let skipped = 0;
  const width = Math.max(...stages.map((s) => s.name.length), 5);
  const lines = ['', '── Tetrawell test summary ' + '─'.repeat(40)];
  for (const s of stages) {
    const mark = s.notRun ? 'skip' : s.ok ? 'ok  ' : 'FAIL';
    lines.push(`${mark}  ${s.name.padEnd(width)}  ${s.detail ?? ''}`.trimEnd());
    if (s.notRun) {
      // Left out on request (--only/--skip): neither passed nor failed.
    } else if (typeof s.passed === 'number' || typeof s.failed === 'number') {
      passed += s.passed ?? 0;
      failed += s.failed ?? 0;
      skipped += s.skipped ?? 0;
      // A runner that exited non-zero without reporting a failed test still failed: count it once.
      if (!s.ok && (s.failed ?? 0) === 0) failed += 1;
    } else if (s.ok) {
      passed += 1;
    } else {
      failed += 1;
    }
  }
  lines.push('─'.repeat(66));
  const tail = skipped > 0 ? `, ${skipped} skipped` : '';
  lines.push(`${passed} passed, ${failed} failed${tail}`);
  return { text: lines.join('\n'), passed, failed, skipped };
}

/** Reads the demo sign-in from whatever `seedDemoIfEmpty` returned (an array, {accounts}, {users}, {credentials} or one object). */
export function demoLogins(result) {
  if (!result || typeof result !== 'object') return [];
  const list = Array.isArray(result)
    ? result
    : Array.isArray(result.credentials)
      ? result.credentials
      : Array.isArray(result.users)
        ? result.users
        : Array.isArray(result.accounts)
          ? result.accounts
          : [result];
  return list
    .filter((u) => u && typeof u === 'object' && typeof u.email === 'string' && typeof u.password === 'string')
    .map((u) => ({ email: u.email, password: u.password, role: roleLabel(u) }));
}

/** "site admin, project owner" from whichever role fields an account record carries. */
function roleLabel(u) {
  const parts = [];
  if (typeof u.role === 'string') parts.push(u.role);
  if (u.siteRole === 'admin') parts.push('site admin');
  if (typeof u.projectRole === 'string') parts.push(`project ${u.projectRole}`);
  return parts.length ? parts.join(', ') : null;
}
