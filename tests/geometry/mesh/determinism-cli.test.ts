/**
 * The mesh command: the same design gives a byte-identical file on every run (issue 4), --json
 * prints exactly the documented keys, and bad input gets a plain message and a non-zero exit.
 */
import { mkdtempSync, readFileSync, writeFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it, vi } from 'vitest';
import { run } from '../../../server/cli/mesh';
import { siliconDesign } from '../design-fixtures';

const dir = mkdtempSync(join(tmpdir(), 'tw-mesh-cli-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const design = siliconDesign({
  name: 'CLI determinism (invented: two donors)',
  host: { latticeConstantNm: 0.5431 },
  sites: [
    { id: 'left', species: 'P', position: [-3, 0.2, 0], electrons: 1 },
    { id: 'right', species: 'Bi', position: [3.5, -0.1, 0.4], electrons: 1 },
  ],
  domain: { center: [0, 0, 0], halfExtentsNm: [20, 16, 16], boundary: { kind: 'grounded' } },
  refinement: { order: 1, targetRelError: 0.02, maxElements: 500_000 },
});

async function capture(argv: string[]): Promise<{ code: number; out: string; err: string }> {
  const out: string[] = [];
  const err: string[] = [];
  const log = vi.spyOn(console, 'log').mockImplementation((...a: unknown[]) => void out.push(a.join(' ')));
  const error = vi.spyOn(console, 'error').mockImplementation((...a: unknown[]) => void err.push(a.join(' ')));
  try {
    const code = await run(argv);
    return { code, out: out.join('\n'), err: err.join('\n') };
  } finally {
    log.mockRestore();
    error.mockRestore();
  }
}

describe('npm run cli -- mesh', () => {
  const file = join(dir, 'design.json');
  writeFileSync(file, JSON.stringify(design));

  it('writes byte-identical files on two runs, for vtu (P1 and P2), vtk and binary', async () => {
    for (const [ext, extra] of [['vtu', []], ['vtu', ['--order', '2']], ['vtk', []], ['twmesh', ['--format', 'binary']]] as const) {
      const a = join(dir, `a.${ext}`);
      const b = join(dir, `b.${ext}`);
      expect((await capture([file, '--out', a, ...extra])).code).toBe(0);
      expect((await capture([file, '--out', b, ...extra])).code).toBe(0);
      const ba = readFileSync(a);
      expect(ba.length).toBeGreaterThan(1000);
      expect(readFileSync(b).equals(ba)).toBe(true);
    }
  });

  it('--json prints exactly the documented keys, consistent with the mesh', async () => {
    const r = await capture([file, '--out', join(dir, 'j.vtu'), '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(Object.keys(j).sort()).toEqual(['file', 'levels', 'maxDihedralDeg', 'minDihedralDeg', 'p2Nodes', 'seconds', 'tets', 'vertices', 'volumeNm3']);
    // box volume 40 × 32 × 32 nm³
    expect(Math.abs(j.volumeNm3 - 40 * 32 * 32) / (40 * 32 * 32)).toBeLessThan(1e-12);
    expect(j.levels.reduce((s: number, n: number) => s + n, 0)).toBe(j.tets);
    // Kuhn bisection bounds (Maubach 1995 classes; from memory)
    expect(j.minDihedralDeg).toBeGreaterThanOrEqual(45 - 1e-9);
    expect(j.maxDihedralDeg).toBeLessThanOrEqual(120 + 1e-9);
    expect(j.p2Nodes).toBeGreaterThan(j.vertices);
  });

  it('a site outside the domain: the mesh is written, with a warning that names the site', async () => {
    const outsideFile = join(dir, 'outside.json');
    writeFileSync(outsideFile, JSON.stringify({ ...design, sites: [design.sites[0], { ...design.sites[1], position: [25, 0, 0] }] }));
    const r = await capture([outsideFile, '--out', join(dir, 'outside.vtu')]);
    expect(r.code).toBe(0);
    expect(r.err).toMatch(/1 site\(s\) outside the domain \(right\)/);
    const inside = await capture([file, '--out', join(dir, 'inside.vtu')]);
    expect(inside.err).not.toMatch(/outside the domain/);
  });

  it('bad input: plain words, no stack trace, non-zero exit', async () => {
    const missing = await capture([join(dir, 'nope.json'), '--out', join(dir, 'x.vtu')]);
    expect(missing.code).toBe(1);
    expect(missing.err).toMatch(/no such file/);

    const invalid = join(dir, 'invalid.json');
    writeFileSync(invalid, JSON.stringify({ ...design, domain: { ...design.domain, halfExtentsNm: [20, 0, 16] } }));
    const inv = await capture([invalid, '--out', join(dir, 'x.vtu')]);
    expect(inv.code).toBe(1);
    expect(inv.err).toMatch(/not a valid design document/);
    expect(inv.err).not.toMatch(/\n\s+at /);

    const huge = join(dir, 'huge.json');
    writeFileSync(huge, JSON.stringify({ ...design, refinement: { order: 1, targetRelError: 1e-4, maxElements: 10_000 } }));
    const h = await capture([huge, '--out', join(dir, 'x.vtu')]);
    expect(h.code).toBe(1);
    expect(h.err).toMatch(/cannot mesh .*tetrahedra, more than the design's maxElements \(10000\)/);

    expect((await capture([file])).code).toBe(2);
    expect((await capture([file, '--out', join(dir, 'x.vtu'), '--order', '3'])).code).toBe(2);
    expect((await capture([file, '--out', join(dir, 'x.vtu'), '--format', 'stl'])).code).toBe(2);
  });
});
