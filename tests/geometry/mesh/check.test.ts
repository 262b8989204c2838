import { describe, expect, it } from 'vitest';
import { checkMesh, meshVolume, NeumaierSum } from '../../../geometry/mesh/check';
import { kuhnGrid, makeMesh } from './check.fixtures';
import { kuhnBox, refine, refineUniform, toTetMesh } from '../../../geometry/mesh/index';
import type { TetMesh } from '../../../geometry/mesh/types';

function cornerGraded(): TetMesh {
  const bm = kuhnBox({ center: [0.5, -1, 2], halfExtents: [3, 2, 2.5], cells: [3, 2, 3] });
  for (let pass = 0; pass < 6; pass++) {
    const marks = new Uint8Array(bm.nTets);
    for (let t = 0; t < bm.nTets; t++) {
      const v = 3 * bm.tets[4 * t];
      const d = Math.hypot(bm.coords[v] - 1, bm.coords[v + 1] + 1, bm.coords[v + 2] - 2);
      if (d < 1.5) marks[t] = 1;
    }
    refine(bm, marks);
  }
  return toTetMesh(bm);
}

describe('NeumaierSum', () => {
  it('recovers a sum that naive summation loses (Neumaier 1974 example: 1 + 1e100 + 1 − 1e100 = 2)', () => {
    const s = new NeumaierSum();
    for (const x of [1, 1e100, 1, -1e100]) s.add(x);
    expect(s.value).toBe(2);
    expect(1 + 1e100 + 1 - 1e100).toBe(0); // the naive sum fails, so the test can fail
  });
});

describe('checkMesh', () => {
  it('accepts a Kuhn grid: Euler characteristic 1 for a ball (Euler–Poincaré), volume = box volume', () => {
    const h = 0.3;
    const r = checkMesh(kuhnGrid(4, 3, 2, h));
    expect(r.problems).toEqual([]);
    expect(r.ok).toBe(true);
    expect(r.euler).toBe(1);
    expect(r.tets).toBe(6 * 4 * 3 * 2);
    expect(r.volume).toBeCloseTo(4 * 3 * 2 * h ** 3, 12);
    expect(r.boundaryFaces).toBe(2 * 2 * (4 * 3 + 3 * 2 + 2 * 4));
    expect(2 * r.interiorFaces + r.boundaryFaces).toBe(4 * r.tets); // each tet has 4 faces
  });

  it('accepts a graded bisection mesh from the mesher (conformity, orientation, volume 1e-12, Euler = 1)', () => {
    const mesh = cornerGraded();
    const r = checkMesh(mesh, { box: { min: [-2.5, -3, -0.5], max: [3.5, 1, 4.5] } });
    expect(r.problems).toEqual([]);
    expect(r.volumeRelError).toBeLessThan(1e-12);
    expect(r.boxVolume).toBe(6 * 4 * 5);
    expect(r.euler).toBe(1);
    expect(r.tets).toBeGreaterThan(1000);
  });

  it('flags a tetrahedron stored with negative orientation', () => {
    const mesh = kuhnGrid(2, 1, 1);
    const t = mesh.tets;
    [t[2], t[3]] = [t[3], t[2]];
    const r = checkMesh(mesh);
    expect(r.ok).toBe(false);
    expect(r.nonPositiveTets).toBe(1);
    expect(r.orientationMismatches).toBeGreaterThan(0);
  });

  it('flags a hole: faces off the domain and a volume deficit', () => {
    const mesh = kuhnGrid(3, 3, 3);
    // drop one tet of the central cube (cube index 13)
    const drop = 6 * 13;
    const tets = new Uint32Array(mesh.tets.length - 4);
    tets.set(mesh.tets.subarray(0, 4 * drop));
    tets.set(mesh.tets.subarray(4 * drop + 4), 4 * drop);
    const holed = makeMesh(Array.from(mesh.coords), Array.from(tets));
    const r = checkMesh(holed, { box: { min: [0, 0, 0], max: [3, 3, 3] } });
    expect(r.ok).toBe(false);
    expect(r.boundaryFacesOffDomain).toBe(4);
    expect(r.volume).toBeCloseTo(27 - 1 / 6, 12);
  });

  it('flags a hanging node (one tet bisected without closure)', () => {
    const mesh = kuhnGrid(2, 2, 2);
    const coords = Array.from(mesh.coords);
    const tets = Array.from(mesh.tets);
    // bisect edge (v0, v1) of tet 0 at its midpoint without touching the neighbours
    const [a, b, c, d] = tets.slice(0, 4);
    const mid = coords.length / 3;
    coords.push(...[0, 1, 2].map((k) => (coords[3 * a + k] + coords[3 * b + k]) / 2));
    tets.splice(0, 4, a, mid, c, d, mid, b, c, d);
    const r = checkMesh(makeMesh(coords, tets), { box: { min: [0, 0, 0], max: [2, 2, 2] } });
    expect(r.ok).toBe(false);
    expect(r.volumeRelError).toBeLessThan(1e-12); // volume alone does not see it …
    expect(r.problems.join(' ')).toMatch(/not on the domain|Euler/); // … conformity does
  });

  it('reports a vertex index out of range instead of throwing', () => {
    const mesh = kuhnGrid(1, 1, 1);
    mesh.tets[5] = 99;
    const r = checkMesh(mesh);
    expect(r.ok).toBe(false);
    expect(r.problems.join(' ')).toMatch(/refers to vertex 99/);
  });

  it('flags a duplicated tetrahedron', () => {
    const mesh = kuhnGrid(1, 1, 1);
    const tets = [...mesh.tets, ...mesh.tets.subarray(0, 4)];
    const r = checkMesh(makeMesh(Array.from(mesh.coords), tets));
    expect(r.overSharedFaces).toBeGreaterThan(0);
    expect(r.ok).toBe(false);
  });

  it('volume sum stays exact to 1e-12 on a uniformly refined box (compensated sum)', () => {
    const mesh = toTetMesh(refineUniform(kuhnBox({ center: [0.1, 0.2, 0.3], halfExtents: [1.1, 0.7, 0.9], cells: [3, 2, 2] }), 6));
    const box = 2.2 * 1.4 * 1.8;
    expect(Math.abs(meshVolume(mesh) - box) / box).toBeLessThan(1e-12);
  });
});
