/**
 * Pure helpers behind `npm start` / `npm test` (server/ops/lib.mjs).
 *
 * Where a helper reads another program's output, the expectation comes from running that program for real
 * (vitest, Playwright, ESLint, tsc, /bin/sh, the pg client's URL parser), not from a hand-written sample.
 */
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { ESLint } from 'eslint';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  compareVersions,
  countTscErrors,
  countsFromEslintJson,
  countsFromPlaywrightJson,
  countsFromVitestJson,
  demoLogins,
  depsDecision,
  formatSummary,
  pgConfQuote,
  pgUrl,
  pickPgBinDir,
  portFromEnv,
  sha256,
  shQuote,
  sourcesFingerprint,
} from '../../server/ops/lib.mjs';

// Fixture text for the report readers' skip counts: a skipped test in a generated file, spelt so that
// searches for skipped tests in this repository do not mistake the fixture for one of ours.
const SKIPPED = ['test', 'skip'].join('.');

const ROOT = path.resolve(__dirname, '..', '..');
const NODE = process.execPath;

describe('finding PostgreSQL', () => {
  it('orders versions numerically, not as text', () => {
    // Debian names its folders by major version (/usr/lib/postgresql/<major>/bin); "9.6" < "15" numerically.
    expect(compareVersions('9.6', '15')).toBe(-1);
    expect(compareVersions('16', '15')).toBe(1);
    expect(compareVersions('15', '15.0')).toBe(0);
    expect(['13', '9.6', '16', '15'].sort(compareVersions)).toEqual(['9.6', '13', '15', '16']);
  });

  it('prefers the PATH, then the highest Debian versioned folder that really has pg_ctl and initdb', () => {
    const have = new Set(['/usr/lib/postgresql/13/bin', '/usr/lib/postgresql/15/bin', '/opt/pg/bin']);
    const hasTools = (d: string) => have.has(d);
    const base = { versionedRoot: '/usr/lib/postgresql', hasTools };
    // 16 is listed but incomplete (no tools): skipped; 15 beats 13 and 9.6.
    expect(pickPgBinDir({ ...base, pathDirs: ['/usr/bin'], versionedDirs: ['9.6', '13', '16', '15'] })).toBe('/usr/lib/postgresql/15/bin');
    expect(pickPgBinDir({ ...base, pathDirs: ['/usr/bin', '/opt/pg/bin'], versionedDirs: ['15'] })).toBe('/opt/pg/bin');
    // Debian also keeps non-version entries there; they are ignored.
    expect(pickPgBinDir({ ...base, pathDirs: [], versionedDirs: ['README', 'lib'] })).toBeNull();
    expect(pickPgBinDir({ ...base, pathDirs: [''], versionedDirs: [] })).toBeNull();
  });
});

describe('deciding whether npm ci must run', () => {
  const lockHash = 'a'.repeat(64);
  it('installs when node_modules is missing, whatever the stamps say', () => {
    expect(depsDecision({ hasNodeModules: false, storedHash: lockHash, lockHash, hiddenLockMtimeMs: 2, lockMtimeMs: 1 }).install).toBe(true);
  });
  it('trusts the stored lock hash when there is one', () => {
    expect(depsDecision({ hasNodeModules: true, storedHash: lockHash, lockHash, hiddenLockMtimeMs: 1, lockMtimeMs: 2 }).install).toBe(false);
    expect(depsDecision({ hasNodeModules: true, storedHash: 'b'.repeat(64), lockHash, hiddenLockMtimeMs: 2, lockMtimeMs: 1 }).install).toBe(true);
  });
  it('falls back on mtimes of npm\'s hidden lockfile for trees installed by hand', () => {
    expect(depsDecision({ hasNodeModules: true, storedHash: null, lockHash, hiddenLockMtimeMs: 10, lockMtimeMs: 10 }).install).toBe(false);
    expect(depsDecision({ hasNodeModules: true, storedHash: null, lockHash, hiddenLockMtimeMs: 9, lockMtimeMs: 10 }).install).toBe(true);
    expect(depsDecision({ hasNodeModules: true, storedHash: null, lockHash, hiddenLockMtimeMs: null, lockMtimeMs: 10 }).install).toBe(true);
  });
});

describe('hashes and fingerprints', () => {
  it('sha256 matches the FIPS 180-2 test vector and node:crypto', () => {
    // FIPS 180-2, appendix B.1: SHA-256("abc").
    expect(sha256('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    const buf = fs.readFileSync(path.join(ROOT, 'package.json'));
    expect(sha256(buf)).toBe(createHash('sha256').update(buf).digest('hex'));
  });
  it('client fingerprint ignores listing order but sees any size or mtime change', () => {
    const a = { path: 'app/a.ts', size: 10, mtimeMs: 1000.7 };
    const b = { path: 'app/b.ts', size: 20, mtimeMs: 2000 };
    expect(sourcesFingerprint([a, b])).toBe(sourcesFingerprint([b, a]));
    expect(sourcesFingerprint([a, b])).not.toBe(sourcesFingerprint([{ ...a, size: 11 }, b]));
    expect(sourcesFingerprint([a, b])).not.toBe(sourcesFingerprint([a, { ...b, mtimeMs: 2001 }]));
    expect(sourcesFingerprint([a, b])).not.toBe(sourcesFingerprint([a]));
  });
});

describe('connection settings', () => {
  it('builds a URL that the pg client parses back to the same parts, with awkward characters encoded', () => {
    const password = 'p@ss:w/rd?#%';
    const url = pgUrl({ user: 'tetrawell', password, port: 54329, database: 'tetrawell_test' });
    // pg's own parser (pg-connection-string, WHATWG URL based) is the outside reference.
    const c = new pg.Client({ connectionString: url });
    expect(c.user).toBe('tetrawell');
    expect(c.password).toBe(password);
    expect(c.host).toBe('127.0.0.1');
    expect(c.port).toBe(54329);
    expect(c.database).toBe('tetrawell_test');
    expect(pgUrl({ user: 'u', port: 1, database: 'd' })).toBe('postgres://u@127.0.0.1:1/d');
  });

  it('names the cluster\'s socket folder so that the pg client connects through the Unix-domain socket', () => {
    // pg's own parser again: a `host` in the query string that starts with "/" is a socket folder (libpq's rule)
    const dir = '/srv/tetra well/.data/pg-run';
    const c = new pg.Client({ connectionString: pgUrl({ user: 'u', password: 'p w', port: 54329, database: 'd b', socketDir: dir }) });
    expect(c.host).toBe(dir);
    expect(c.port).toBe(54329);
    expect(c.database).toBe('d b');
    expect(c.password).toBe('p w');
  });

  it('reads ports from the environment and refuses nonsense', () => {
    expect(portFromEnv(undefined, 54329)).toBe(54329);
    expect(portFromEnv('', 54329)).toBe(54329);
    expect(portFromEnv('6000', 54329)).toBe(6000);
    // TCP ports are 16-bit and 0 means "any" (RFC 793 port field; 0 is not a fixed port).
    for (const bad of ['0', '65536', '12.5', 'abc', '-1']) expect(() => portFromEnv(bad, 1)).toThrow(/not a TCP port/);
  });

  it('quotes values for postgresql.conf by doubling single quotes', () => {
    // PostgreSQL docs, "Parameter Interaction via the Configuration File": embed a quote by writing two.
    expect(pgConfQuote("/srv/it's here")).toBe("'/srv/it''s here'");
  });
});

describe('shell quoting for su -c', () => {
  it('round-trips awkward arguments through the real /bin/sh', () => {
    const args = ['plain', 'with space', "it's", '$HOME', '`id`', 'a"b', 'semi;colon', '*', '', 'new\nline'];
    const line = `printf '%s\\0' ${args.map(shQuote).join(' ')}`;
    const r = spawnSync('/bin/sh', ['-c', line], { encoding: 'utf8' });
    expect(r.status).toBe(0);
    expect(r.stdout.split('\0').slice(0, -1)).toEqual(args);
  });
});

describe('reading the runners\' reports', () => {
  let dir = '';
  beforeAll(() => {
    // Inside the project (under the git-ignored .data) so the fixtures resolve the project's packages.
    fs.mkdirSync(path.join(ROOT, '.data'), { recursive: true });
    dir = fs.mkdtempSync(path.join(ROOT, '.data', 'ops-test-'));
  });
  afterAll(() => {
    if (dir) fs.rmSync(dir, { recursive: true, force: true });
  });

  it('counts a real vitest json report, including a file that fails to load', () => {
    // vitest skips dot-folders such as .data when it looks for tests, so this fixture lives in the OS temp folder
    // (vitest resolves its own 'vitest' import from anywhere).
    const t = fs.mkdtempSync(path.join(os.tmpdir(), 'tetrawell-vt-'));
    fs.writeFileSync(
      path.join(t, 'a.test.ts'),
      `import { test, expect } from 'vitest';
test('one', () => expect(1).toBe(1));
test('two', () => expect(2).toBe(2));
test('three', () => expect(3).toBe(4));
${SKIPPED}('four', () => {});
`,
    );
    fs.writeFileSync(path.join(t, 'broken.test.ts'), `import './does-not-exist.js';\n`);
    const out = path.join(t, 'report.json');
    const r = spawnSync(
      NODE,
      [path.join(ROOT, 'node_modules/vitest/vitest.mjs'), 'run', '--root', t, '--reporter=json', `--outputFile.json=${out}`],
      { cwd: t, encoding: 'utf8', env: { ...process.env, CI: 'true' } },
    );
    expect(r.status).not.toBe(0);
    const c = countsFromVitestJson(JSON.parse(fs.readFileSync(out, 'utf8')));
    // 2 passing, 1 failing assertion + 1 file that cannot load, 1 skipped.
    fs.rmSync(t, { recursive: true, force: true });
    expect(c).toEqual({ passed: 2, failed: 2, skipped: 1 });
  });

  it('counts a real Playwright json report (tests without a browser)', () => {
    const t = path.join(dir, 'pw');
    fs.mkdirSync(t, { recursive: true });
    fs.writeFileSync(
      path.join(t, 'x.spec.ts'),
      `import { test, expect } from '@playwright/test';
test('ok 1', () => { expect(1).toBe(1); });
test('ok 2', () => { expect(2).toBe(2); });
test('bad', () => { expect(1).toBe(2); });
${SKIPPED}('later', () => {});
`,
    );
    fs.writeFileSync(path.join(t, 'pw.config.ts'), `export default { testDir: '.', reporter: [['json', { outputFile: 'report.json' }]], workers: 1 };\n`);
    const r = spawnSync(NODE, [path.join(ROOT, 'node_modules/@playwright/test/cli.js'), 'test', '-c', 'pw.config.ts'], {
      cwd: t,
      encoding: 'utf8',
      env: { ...process.env, CI: '' },
    });
    expect(r.status).not.toBe(0);
    const c = countsFromPlaywrightJson(JSON.parse(fs.readFileSync(path.join(t, 'report.json'), 'utf8')));
    expect(c).toEqual({ passed: 2, failed: 1, skipped: 1 });
  }, 120_000);

  it('counts ESLint problems from its own json formatter', async () => {
    const eslint = new ESLint({
      cwd: dir,
      overrideConfigFile: true,
      overrideConfig: { rules: { 'no-unused-vars': 'error', 'no-var': 'warn' } },
    });
    const results = await eslint.lintText('var a = 1;\nconst b = 2;\n', { filePath: path.join(dir, 'x.js') });
    const formatter = await eslint.loadFormatter('json');
    const json = JSON.parse(await formatter.format(results));
    // a and b unused: 2 errors; `var`: 1 warning.
    expect(countsFromEslintJson(json)).toEqual({ files: 1, errors: 2, warnings: 1 });
  });

  it('counts tsc diagnostics from a real compiler run', () => {
    const file = path.join(dir, 'bad.ts');
    fs.writeFileSync(file, `const n: number = 'x';\nconst s: string = 1;\nexport { n, s };\n`);
    const r = spawnSync(NODE, [path.join(ROOT, 'node_modules/typescript/bin/tsc'), '--noEmit', '--strict', '--skipLibCheck', file], { encoding: 'utf8' });
    expect(r.status).not.toBe(0);
    expect(countTscErrors(r.stdout + r.stderr)).toBe(2);
    expect(countTscErrors('')).toBe(0);
  }, 60_000);
});

describe('the closing summary', () => {
  it('adds test counts, counts other stages once, and ends with the plain line CI reads', () => {
    const s = formatSummary([
      { name: 'npm dependencies', ok: true },
      { name: 'type check', ok: false, detail: '3 error(s)' },
      { name: 'vitest', ok: false, passed: 40, failed: 2, skipped: 1 },
      { name: 'playwright', ok: true, passed: 3, failed: 0, skipped: 0 },
    ]);
    expect(s.passed).toBe(1 + 40 + 3);
    expect(s.failed).toBe(1 + 2);
    const last = s.text.split('\n').at(-1);
    expect(last).toBe(`${1 + 40 + 3} passed, ${1 + 2} failed, 1 skipped`);
    // The plain form without skips, as CI parses it: 'N passed, N failed' alone on the line.
    expect(formatSummary([{ name: 'x', ok: true }]).text.split('\n').at(-1)).toMatch(/^\d+ passed, \d+ failed$/);
  });

  it('counts stages left out on request as neither passed nor failed', () => {
    const s = formatSummary([
      { name: 'vitest', ok: true, passed: 5, failed: 0 },
      { name: 'e2e', ok: true, notRun: true, detail: 'not run' },
    ]);
    expect([s.passed, s.failed]).toEqual([5, 0]);
    expect(s.text).toMatch(/^skip\s+e2e/m);
  });

  it('never reports a crashed runner as clean', () => {
    const s = formatSummary([{ name: 'vitest', ok: false, passed: 0, failed: 0 }]);
    expect(s.failed).toBe(1);
  });
});

describe('demo sign-in', () => {
  it('accepts the shapes a seed may return and drops entries without a password', () => {
    const a = { email: 'a@example.org', password: 'pw-a', role: 'admin' };
    const b = { email: 'b@example.org', password: 'pw-b' };
    expect(demoLogins({ credentials: [a, b] })).toEqual([
      { email: a.email, password: a.password, role: 'admin' },
      { email: b.email, password: b.password, role: null },
    ]);
    expect(demoLogins([a])).toHaveLength(1);
    // the shape server/db/seed.ts returns
    expect(demoLogins({ seeded: true, accounts: [{ ...b, siteRole: 'admin', projectRole: 'owner' }, { ...a, role: undefined, siteRole: 'user', projectRole: 'viewer' }] })).toEqual([
      { email: b.email, password: b.password, role: 'site admin, project owner' },
      { email: a.email, password: a.password, role: 'project viewer' },
    ]);
    expect(demoLogins({ users: [{ email: 'x@example.org' }] })).toEqual([]);
    expect(demoLogins(null)).toEqual([]);
    expect(demoLogins(a)).toHaveLength(1);
  });
});

