/**
 * The precompiled command line (server/ops/cli.mjs, the launcher behind `npm run cli`, and
 * server/ops/cli-bundle.mjs): the bundle prints the same bytes with the same exit status as the
 * sources run through tsx, and it never runs stale code. Each case works in a copy of the sources
 * in a temporary folder (node_modules linked), so the real tree and its dist/ are never touched.
 */
import { spawn, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CLI_SOURCE_ROOTS, cliFingerprint } from '../../server/ops/cli-bundle.mjs';

const root = fileURLToPath(new URL('../..', import.meta.url));
const plaquette = path.join(root, 'tests/fixtures/designs/plaquette.json');
let work = '';
let project = '';
let outside = '';
let invalid = '';

/** A copy of what the command line is built from, with the real node_modules linked in. */
function copyProject(dest: string): void {
  for (const rel of [...CLI_SOURCE_ROOTS, 'server/ops/cli-bundle.mjs', 'server/ops/cli.mjs', 'tsconfig.json']) {
    fs.cpSync(path.join(root, rel), path.join(dest, rel), { recursive: true });
  }
  fs.symlinkSync(path.join(root, 'node_modules'), path.join(dest, 'node_modules'), 'dir');
}

const launch = (dir: string, ...args: string[]) => spawnSync(process.execPath, [path.join(dir, 'server/ops/cli.mjs'), ...args], { cwd: dir, encoding: 'utf8', timeout: 60_000 });
const fromSource = (...args: string[]) => spawnSync(process.execPath, ['--import', 'tsx', 'server/cli/index.ts', ...args], { cwd: root, encoding: 'utf8', timeout: 60_000 });
const bundles = (dir: string) => (fs.existsSync(path.join(dir, 'dist/cli')) ? fs.readdirSync(path.join(dir, 'dist/cli')).filter((n) => !n.startsWith('.')) : []);

/** Replaces `from` by `to` (same length) in a file and puts its old modification time back. */
function editKeepingTime(file: string, from: string, to: string): void {
  expect(to.length).toBe(from.length);
  const st = fs.statSync(file);
  const text = fs.readFileSync(file, 'utf8');
  expect(text).toContain(from);
  fs.writeFileSync(file, text.replace(from, to));
  fs.utimesSync(file, st.atime, st.mtime);
  expect(fs.statSync(file).size).toBe(st.size);
}

beforeAll(() => {
  work = fs.mkdtempSync(path.join(os.tmpdir(), 'tetrawell-cli-bundle-'));
  project = path.join(work, 'project');
  copyProject(project);
  const doc = JSON.parse(fs.readFileSync(plaquette, 'utf8'));
  // a site far outside the domain: checked, but exit status 3 (not fit to mesh)
  doc.sites[0].position = [500, 0, 0];
  outside = path.join(work, 'outside.json');
  fs.writeFileSync(outside, JSON.stringify(doc));
  invalid = path.join(work, 'invalid.json');
  fs.writeFileSync(invalid, JSON.stringify({ ...doc, sites: [{ ...doc.sites[0], electrons: 7 }] }));
});
afterAll(() => {
  fs.rmSync(work, { recursive: true, force: true });
});

describe('the bundle runs what the sources run', () => {
  it('same stdout, stderr and exit status as tsx for the readable table, --json, --moments, an unfit design, an invalid one and a usage mistake', () => {
    const cases = [
      ['check', plaquette],
      ['check', plaquette, '--json'],
      ['check', plaquette, '--json', '--moments'],
      ['check', outside, '--json'],
      ['check', invalid, '--json'],
      ['check'],
      ['nonsense'],
      ['--help'],
    ];
    const statuses: (number | null)[] = [];
    for (const args of cases) {
      const a = launch(project, ...args);
      const b = fromSource(...args);
      expect(a.stdout, args.join(' ')).toBe(b.stdout);
      expect(a.stderr, args.join(' ')).toBe(b.stderr);
      expect(a.status, args.join(' ')).toBe(b.status);
      statuses.push(a.status);
    }
    // the cases cover every exit status the check documents (server/cli/check.ts)
    expect(statuses).toEqual([0, 0, 0, 3, 1, 2, 2, 0]);
    expect(bundles(project)).toHaveLength(1);
  });

  it('check loads neither the mesher nor the finite elements (the chunks its own chunk imports, from esbuild\'s metafile)', () => {
    const [fp] = bundles(project);
    const dir = path.join(project, 'dist/cli', fp);
    const chunks = JSON.parse(fs.readFileSync(path.join(dir, 'chunks.json'), 'utf8')) as Record<string, { inputs: string[]; imports: string[] }>;
    const checkChunk = Object.keys(chunks).find((n) => n.startsWith('check-'))!;
    // the dynamic import in index.ts made a chunk of its own for check
    expect(chunks[checkChunk].inputs).toContain('server/cli/check.ts');
    const loaded = new Set<string>();
    const visit = (file: string) => {
      if (loaded.has(file)) return;
      loaded.add(file);
      for (const i of chunks[file].imports) visit(i);
    };
    visit(checkChunk);
    const inputs = [...loaded].flatMap((f) => chunks[f].inputs);
    expect(inputs).toContain('geometry/farfield/check.ts');
    expect(inputs).toContain('server/contracts/design.ts');
    expect(inputs.filter((i) => i.startsWith('geometry/fem/') || i.startsWith('geometry/mesh/export/') || i === 'server/cli/mesh.ts')).toEqual([]);
    // and the other commands' code is in the bundle, elsewhere
    expect(Object.values(chunks).flatMap((c) => c.inputs)).toContain('geometry/fem/coulomb.ts');
  });
});

describe('never stale', () => {
  it('a run with unchanged sources reuses the bundle; a changed source in each watched folder is rebuilt even with its old modification time and size', () => {
    launch(project, '--help');
    const [first] = bundles(project);
    const entry = path.join(project, 'dist/cli', first, 'index.mjs');
    const built = fs.statSync(entry).mtimeMs;
    launch(project, 'check', plaquette);
    expect(fs.statSync(entry).mtimeMs).toBe(built);
    expect(bundles(project)).toEqual([first]);

    // server/cli
    editKeepingTime(path.join(project, 'server/cli/check.ts'), "'usage: npm run cli -- check", "'usage: npm run cli -- CHECK");
    expect(launch(project, 'check', '--help').stdout).toMatch(/^usage: npm run cli -- CHECK/);
    // geometry
    editKeepingTime(path.join(project, 'geometry/farfield/check.ts'), "'Homogeneous host with", "'HOMOGENEOUS host with");
    expect(launch(project, 'check', plaquette).stdout).toContain('  - HOMOGENEOUS host with');
    // server/contracts
    editKeepingTime(path.join(project, 'server/contracts/design.ts'), 'every site needs its own id', 'EVERY site needs its own id');
    const doc = JSON.parse(fs.readFileSync(plaquette, 'utf8'));
    const twice = path.join(work, 'twice.json');
    fs.writeFileSync(twice, JSON.stringify({ ...doc, sites: [doc.sites[0], doc.sites[0]] }));
    const r = launch(project, 'check', twice);
    expect(r.status).toBe(1);
    expect(r.stderr).toContain('EVERY site needs its own id');
    // and back: the first sources give the first fingerprint again
    editKeepingTime(path.join(project, 'server/cli/check.ts'), "'usage: npm run cli -- CHECK", "'usage: npm run cli -- check");
    expect(launch(project, 'check', '--help').stdout).toMatch(/^usage: npm run cli -- check/);
  });

  it('the fingerprint changes when a file is added to or removed from a watched folder', () => {
    const before = cliFingerprint(project);
    const extra = path.join(project, 'geometry/farfield/extra.ts');
    fs.writeFileSync(extra, 'export const extra = 1;\n');
    const withExtra = cliFingerprint(project);
    fs.rmSync(extra);
    expect(withExtra).not.toBe(before);
    expect(cliFingerprint(project)).toBe(before);
  });

  it('a source that does not compile: a plain error, exit 1, no bundle; fixed, the command runs again', () => {
    const file = path.join(project, 'server/cli/text.ts');
    const good = fs.readFileSync(file, 'utf8');
    fs.writeFileSync(file, `${good}\nexport const broken = ;\n`);
    const r = launch(project, '--help');
    expect(r.status).toBe(1);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/^error: cannot build the command line:\n {2}server\/cli\/text\.ts:\d+:\d+: /);
    expect(fs.existsSync(path.join(project, 'dist/cli', cliFingerprint(project)))).toBe(false);
    fs.writeFileSync(file, good);
    expect(launch(project, '--help').status).toBe(0);
  });

  it('refuses to build when the command line imports a source outside the folders the fingerprint reads', () => {
    const other = path.join(work, 'other');
    copyProject(other);
    fs.writeFileSync(path.join(other, 'server/elsewhere.ts'), 'export const elsewhere = 1;\n');
    const text = path.join(other, 'server/cli/text.ts');
    fs.writeFileSync(text, `import { elsewhere } from '../elsewhere';\nexport const seen = elsewhere;\n${fs.readFileSync(text, 'utf8')}`);
    const r = launch(other, '--help');
    expect(r.status).toBe(1);
    expect(r.stderr).toContain('imports server/elsewhere.ts, outside the folders its freshness check reads');
    expect(bundles(other)).toEqual([]);
  });

  it('two first runs at once both succeed and leave one bundle', async () => {
    const fresh = path.join(work, 'fresh');
    copyProject(fresh);
    const run = () =>
      new Promise<{ code: number | null; out: string }>((resolve) => {
        const c = spawn(process.execPath, [path.join(fresh, 'server/ops/cli.mjs'), 'check', plaquette, '--json'], { cwd: fresh });
        let out = '';
        c.stdout.on('data', (d: Buffer) => (out += d));
        c.on('close', (code) => resolve({ code, out }));
      });
    const [a, b] = await Promise.all([run(), run()]);
    expect(a.code).toBe(0);
    expect(b.code).toBe(0);
    expect(a.out).toBe(b.out);
    expect(a.out).toBe(fromSource('check', plaquette, '--json').stdout);
    expect(bundles(fresh)).toHaveLength(1);
  });
});
