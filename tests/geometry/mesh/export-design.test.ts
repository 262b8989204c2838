/**
 * The output side on the mesher's own product: a graded mesh of a design (an invented demo
 * triad of donors) passes the invariant checks, reports sensible per-site sizes, exports to a
 * quadratic .vtu that meshio (Debian python3-meshio) reads back with the box volume, and is
 * byte-identical across runs in every format.
 */
import { describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { meshDesign } from '../../../geometry/mesh/index';
import { checkMesh } from '../../../geometry/mesh/check';
import { qualityReport } from '../../../geometry/mesh/quality';
import { encodeMeshBinary, writeVtkLegacy, writeVtu } from '../../../geometry/mesh/export/index';
import type { Design } from '../../../geometry/design/types';
import { siliconDesign } from '../design-fixtures';

const PYTHON = '/usr/bin/python3';
const READER = fileURLToPath(new URL('./read_vtu.py', import.meta.url));

// invented demo scenario: three donors in a bent row, 4.4 nm and ~4 nm apart
const design: Design = siliconDesign({
  name: 'Bent triad (demo)',
  sites: [
    { id: 'D1', species: 'P', position: [-2.2, 0, 0], electrons: 1 },
    { id: 'D2', species: 'P', position: [2.2, 0, 0], electrons: 1 },
    { id: 'D3', species: 'As', position: [0, 3.5, 0.5], electrons: 1 },
  ],
  domain: { center: [0, 1, 0], halfExtentsNm: [12, 12, 10], boundary: { kind: 'grounded' } },
  refinement: { order: 2, targetRelError: 0.01, maxElements: 400000 },
});
const box = { min: [-12, -11, -10] as [number, number, number], max: [12, 13, 10] as [number, number, number] };
const boxVolume = 24 * 24 * 20;

describe('export of a designed (graded) mesh', () => {
  const { mesh } = meshDesign(design);
  const nV = mesh.coords.length / 3;
  const m = mesh.tets.length / 4;

  it('passes every invariant: orientation, conformity, volume (1e-12), Euler characteristic 1', () => {
    const r = checkMesh(mesh, { box });
    expect(r.problems).toEqual([]);
    expect(r.euler).toBe(1);
    expect(r.volumeRelError).toBeLessThan(1e-12);
  });

  it('the quality report sees the grading: elements at each site are smaller than the largest', () => {
    const q = qualityReport(mesh, design.sites.map((s) => ({ id: s.id, position: s.position })));
    expect(q.tets).toBe(m);
    expect(q.vertices - q.edges + q.faces - q.tets).toBe(1);
    expect(Math.abs(q.volumeNm3 - boxVolume) / boxVolume).toBeLessThan(1e-12);
    expect(q.levels.length).toBeGreaterThan(1);
    let counted = 0;
    for (const s of q.sites) {
      expect(s.hAtSite).toBeLessThan(q.hMax);
      expect(s.hMinNear).toBeLessThanOrEqual(s.hAtSite);
      counted += s.sizeVsDistance.reduce((a, b) => a + b.count, 0);
    }
    expect(counted).toBe(m);
  });

  it('quadratic .vtu read by meshio: 10-node tets, VTK node order, box volume', () => {
    let python = true;
    try {
      execFileSync(PYTHON, ['-c', 'import meshio, numpy'], { stdio: 'pipe' });
    } catch {
      python = false;
    }
    if (!python) throw new Error(`The outside reader is missing: ${PYTHON} cannot import meshio (apt-get install -y python3-meshio).`);
    const dir = mkdtempSync(join(tmpdir(), 'tetrawell-design-'));
    try {
      const file = join(dir, 'triad.vtu');
      writeFileSync(file, writeVtu(mesh, { order: 2 }));
      const [r] = JSON.parse(execFileSync(PYTHON, [READER, file], { maxBuffer: 1 << 30, encoding: 'utf8' }));
      expect(r.cells[0].type).toBe('tetra10');
      expect(r.cells[0].count).toBe(m);
      expect(r.numPoints).toBe(qualityReport(mesh).p2Nodes);
      expect(r.maxMidEdgeDeviation).toBe(0);
      expect(r.minSignedVolume).toBeGreaterThan(0);
      expect(Math.abs(r.volume - boxVolume) / boxVolume).toBeLessThan(1e-12);
      expect(r.numPoints).toBeGreaterThan(nV);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('two meshing runs give byte-identical .vtu, .vtk and TWMESH files', () => {
    const again = meshDesign(design).mesh;
    const same = (a: Uint8Array, b: Uint8Array) => Buffer.from(a).equals(Buffer.from(b));
    expect(same(writeVtu(mesh, { order: 2 }), writeVtu(again, { order: 2 }))).toBe(true);
    expect(same(writeVtkLegacy(mesh), writeVtkLegacy(again))).toBe(true);
    expect(same(encodeMeshBinary(mesh), encodeMeshBinary(again))).toBe(true);
  });
});
