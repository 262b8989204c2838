/**
 * Issue 8, command line: inputs that crashed V8 (exit 133) or hung `check`, `mesh`, `coulomb` and
 * `convergence` now get a plain message and the CLI's exit code, under a time limit. Each input runs
 * as a child process, as a user would run it.
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('../../..', import.meta.url));
const fixture = join(root, 'tests/fixtures/designs/plaquette.json');
const dir = mkdtempSync(join(tmpdir(), 'tetrawell-limits-'));
// Before the fix these inputs crashed within ~15 s or ran past 120 s; a healthy run takes ~2 s of
// tsx start-up plus milliseconds of work. 45 s leaves room for a loaded two-core machine.
const LIMIT_MS = 45_000;

// eslint-disable-next-line @typescript-eslint/no-explicit-any
type Doc = Record<string, any>;
const base = (): Doc => JSON.parse(readFileSync(fixture, 'utf8'));

function write(name: string, change: (d: Doc) => void, prefix = ''): string {
  const d = base();
  change(d);
  const f = join(dir, name);
  writeFileSync(f, prefix + JSON.stringify(d));
  return f;
}

function cli(...args: string[]) {
  const r = spawnSync(process.execPath, ['--import', 'tsx', 'server/cli/index.ts', ...args], { cwd: root, encoding: 'utf8', timeout: LIMIT_MS });
  return { code: r.status, signal: r.signal, out: r.stdout, err: r.stderr };
}

/** no V8 fatal error, no stack trace: what a user sees is plain words */
function expectPlain(r: ReturnType<typeof cli>) {
  expect(r.signal).toBeNull(); // null: neither killed by the time limit nor by a V8 abort
  expect(r.err).not.toMatch(/Fatal|invalid size|\n\s+at /);
}

const everySite = (orbital: Doc) => (d: Doc) => d.sites.forEach((s: Doc) => (s.orbital = orbital));
const codes = (out: string): string[] => JSON.parse(out).warnings.map((w: { code: string }) => w.code);

describe('check stays instant on tiny orbitals (the element estimate is capped)', () => {
  it('gaussian σ = 1e-3 nm (ran past 120 s): "more than N" elements, flagged as a lower bound, and a warning with the reason', () => {
    const r = cli('check', write('g1e-3.json', everySite({ model: 'gaussian', sigmaNm: 1e-3 })), '--json');
    expectPlain(r);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.recommendedElementsIsLowerBound).toBe(true);
    // the lower bound is at least the design's budget, so the element-budget warning fires
    expect(j.recommendedElements).toBeGreaterThan(base().refinement.maxElements);
    expect(codes(r.out)).toEqual(expect.arrayContaining(['element-budget', 'orbital-too-small']));
    const text = cli('check', write('g1e-3b.json', everySite({ model: 'gaussian', sigmaNm: 1e-3 })));
    expect(text.out).toMatch(/elements the refinement would need: more than \d+/);
    expect(text.out).toMatch(/orbital-too-small: .*below a hundredth of the lattice constant/);
  });
  it('hydrogenic radius at the schema floor 1e-4 nm: checked, estimate capped', () => {
    const r = cli('check', write('h1e-4.json', everySite({ model: 'hydrogenic-1s', radiusNm: 1e-4 })), '--json');
    expectPlain(r);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.out).recommendedElementsIsLowerBound).toBe(true);
  });
  for (const [name, orbital] of [
    ['gaussian σ = 1e-6 nm', { model: 'gaussian', sigmaNm: 1e-6 }],
    ['gaussian σ = 1e-12 nm', { model: 'gaussian', sigmaNm: 1e-12 }],
    ['hydrogenic radius 1e-12 nm', { model: 'hydrogenic-1s', radiusNm: 1e-12 }],
    ['anisotropic radiusZ 1e-300 nm', { model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 1e-300 }],
  ] as const) {
    it(`${name} (crashed V8, exit 133): refused by the schema's floor with the field path, exit 1`, () => {
      const r = cli('check', write(`tiny-${name.replace(/\W+/g, '-')}.json`, everySite(orbital)));
      expectPlain(r);
      expect(r.code).toBe(1);
      expect(r.err).toMatch(/sites\[0\]\.orbital\.(sigmaNm|radiusNm|radiusZNm): must be at least 0\.0001/);
    });
  }
  it('the default plaquette still reports an estimate that is not a lower bound', () => {
    const j = JSON.parse(cli('check', fixture, '--json').out);
    expect(j.recommendedElementsIsLowerBound).toBe(false);
    expect(j.recommendedElements).toBeGreaterThan(0);
  });
});

describe('mesh, coulomb and convergence refuse a box whose initial grid is too large (half-extents 1e6 × 1e6 × 1e-6 nm)', () => {
  const flat = write('flat.json', (d) => (d.domain.halfExtentsNm = [1e6, 1e6, 1e-6]));
  for (const args of [
    ['mesh', flat, '--out', join(dir, 'flat.vtu')],
    ['coulomb', flat],
    ['convergence', flat, '--kind', 'refinement'],
    ['convergence', flat, '--kind', 'box'],
  ]) {
    it(`${args[0]} ${args.slice(2).join(' ')}: plain refusal with the estimate, exit 1 (crashed V8 before)`, () => {
      const r = cli(...args);
      expectPlain(r);
      expect(r.code).toBe(1);
      // the figures behind the refusal: 2e12 × 2e12 × 2 cells of 6 Kuhn tetrahedra = 4.8e25
      expect(r.err).toMatch(/initial cells, 4\.80e\+25 tetrahedra before any refinement, more than the design's maxElements \(2000000\)/);
    });
  }
  it('check on the same box still answers (the recommended box is a sane one)', () => {
    const r = cli('check', flat, '--json');
    expectPlain(r);
    // it answers with figures; the 1e-6 nm thick box misses the target, so the status is 3 (not fit to mesh)
    expect(r.code).toBe(3);
    expect(JSON.parse(r.out).recommendedHalfExtentsNm.every((h: number) => h > 1 && h < 1e3)).toBe(true);
  });
});

describe('design files', () => {
  it('a file starting with a UTF-8 byte-order mark is read (RFC 8259 §8.1 lets a parser ignore it)', () => {
    const f = write('bom.json', () => {}, '\uFEFF');
    expect(readFileSync(f)[0]).toBe(0xef); // EF BB BF: the BOM in UTF-8 (Unicode 15, §23.8)
    const r = cli('check', f, '--json');
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    expect(JSON.parse(r.out).sites).toHaveLength(4);
  });
  it('an orbital above 100 nm gets the orbital-too-large warning with its size', () => {
    const r = cli('check', write('large.json', (d) => (d.sites[1].orbital = { model: 'gaussian', sigmaNm: 500 })), '--json');
    // a 500 nm orbital is cut by the box, so the bound misses the target: answered, with status 3
    expect(r.code).toBe(3);
    expect(JSON.parse(r.out).worstRelBound).toBeGreaterThan(JSON.parse(r.out).tolerance);
    const w = JSON.parse(r.out).warnings.find((x: { code: string }) => x.code === 'orbital-too-large');
    expect(w.siteIds).toEqual(['p2']);
    expect(w.message).toMatch(/largest 500 nm/);
  });
});
