/**
 * The initial Kuhn (Freudenthal) mesh of a box.
 * Sources: Kuhn, "Some combinatorial lemmas in topology", IBM J. Res. Dev. 4 (1960) and
 * Freudenthal, Ann. Math. 43 (1942): the cube splits into 3! = 6 congruent path simplices of volume
 * 1/6 around its main diagonal, and translated cubes fit together conformingly.
 */
import { describe, expect, it } from 'vitest';
import { kuhnBox, toTetMesh, chooseInitialCells, MeshError } from '../../../geometry/mesh/index';
import { checkMesh, tetDet } from '../../../geometry/mesh/check';
import { computeTetQuality } from '../../../geometry/mesh/quality';
import { NO_PARENT } from '../../../geometry/mesh/types';

describe('kuhnBox', () => {
  it('cuts one cube into 6 Kuhn tets of volume 1/6 that all contain the main diagonal (Kuhn 1960)', () => {
    const m = kuhnBox({ center: [0.5, 0.5, 0.5], halfExtents: [0.5, 0.5, 0.5], cells: [1, 1, 1] });
    expect(m.nTets).toBe(6);
    expect(m.nVertices).toBe(8);
    const tm = toTetMesh(m);
    // vertex 0 is the corner (0,0,0), vertex 7 the corner (1,1,1)
    expect(Array.from(tm.coords.slice(0, 3))).toEqual([0, 0, 0]);
    expect(Array.from(tm.coords.slice(21, 24))).toEqual([1, 1, 1]);
    const seen = new Set<string>();
    for (let t = 0; t < 6; t++) {
      const vs = Array.from(tm.tets.slice(4 * t, 4 * t + 4));
      expect(vs).toContain(0);
      expect(vs).toContain(7);
      // volume det/6 = 1/6 (a sixth of the unit cube), i.e. det = 1, positively oriented
      expect(tetDet(tm.coords, tm.tets, t)).toBeCloseTo(1, 14);
      seen.add([...vs].sort((a, b) => a - b).join(','));
      // Maubach tag of the initial tets is 3 (Maubach 1995; Stevenson 2008 §4)
      expect(m.tetTag[t]).toBe(3);
      // the stored Maubach order is the path x0 → x1 → x2 → x3 along cube edges
      const y = Array.from(m.tets.slice(4 * t, 4 * t + 4));
      expect(y[0]).toBe(0);
      expect(y[3]).toBe(7);
      for (let i = 0; i < 3; i++) {
        const a = y[i], b = y[i + 1];
        const d = [0, 1, 2].map((k) => Math.abs(tm.coords[3 * a + k] - tm.coords[3 * b + k]));
        expect(d.sort()).toEqual([0, 0, 1]);
      }
    }
    expect(seen.size).toBe(6);
    for (let v = 0; v < 8; v++) expect(tm.parents[2 * v]).toBe(NO_PARENT);
  });

  it('dihedral angles of the Kuhn tet are 45°, 60° or 90° (path simplex / orthoscheme; from memory)', () => {
    const tm = toTetMesh(kuhnBox({ center: [0, 0, 0], halfExtents: [1, 1, 1], cells: [1, 1, 1] }));
    const q = computeTetQuality(tm);
    for (let t = 0; t < 6; t++) {
      expect(q.minDihedralDeg[t]).toBeCloseTo(45, 9);
      expect(q.maxDihedralDeg[t]).toBeCloseTo(90, 9);
    }
  });

  it('a box of 3×2×4 cells is conforming, positively oriented, fills the box and has Euler characteristic 1', () => {
    const box = { min: [-1.5, 2, -0.25] as [number, number, number], max: [1.5, 4, 3.75] as [number, number, number] };
    const m = kuhnBox({ center: [0, 3, 1.75], halfExtents: [1.5, 1, 2], cells: [3, 2, 4] });
    expect(m.nTets).toBe(6 * 3 * 2 * 4);
    expect(m.nVertices).toBe(4 * 3 * 5);
    const r = checkMesh(toTetMesh(m), { box });
    expect(r.problems).toEqual([]);
    // Euler–Poincaré: V − E + F − T = 1 for a triangulated ball
    expect(r.euler).toBe(1);
    expect(r.volumeRelError).toBeLessThanOrEqual(1e-12);
    expect(r.nonPositiveTets).toBe(0);
    expect(r.boundaryFacesOffDomain).toBe(0);
    // every boundary face of the box: 2 triangles per cell face on the surface
    expect(r.boundaryFaces).toBe(2 * 2 * (3 * 2 + 2 * 4 + 3 * 4));
  });

  it('refuses a degenerate box with a typed error', () => {
    const bad: [number, number, number][] = [
      [0, 1, 1],
      [1, -2, 1],
      [1, 1, Number.NaN],
      [1, Number.POSITIVE_INFINITY, 1],
    ];
    for (const halfExtents of bad) {
      let err: unknown;
      try {
        kuhnBox({ center: [0, 0, 0], halfExtents, cells: [1, 1, 1] });
      } catch (e) {
        err = e;
      }
      expect(err).toBeInstanceOf(MeshError);
      expect((err as MeshError).code).toBe('degenerate-box');
      expect((err as MeshError).message).toMatch(/degenerate/);
    }
    expect(() => kuhnBox({ center: [Number.NaN, 0, 0], halfExtents: [1, 1, 1], cells: [1, 1, 1] })).toThrow(MeshError);
    expect(() => kuhnBox({ center: [0, 0, 0], halfExtents: [1, 1, 1], cells: [0, 1, 1] })).toThrow(MeshError);
    expect(() => kuhnBox({ center: [0, 0, 0], halfExtents: [1, 1, 1], cells: [1.5, 1, 1] })).toThrow(MeshError);
  });

  it('chooses near-cubic cells: exactly cubic when the extents allow, else sides within a factor 1.5', () => {
    const cases: [number, number, number][] = [
      [10, 10, 10],
      [10, 15, 30],
      [30, 20, 25],
      [20, 16, 16],
      [7.45, 10, 22.4],
      [1, 1.49, 100],
    ];
    for (const half of cases) {
      for (const n of [1, 2, 3]) {
        const cells = chooseInitialCells(half, n);
        const sides = cells.map((c, a) => (2 * half[a]) / c);
        const smallest = cells[half.indexOf(Math.min(...half))];
        expect(smallest).toBeGreaterThanOrEqual(n);
        expect(smallest).toBeLessThanOrEqual(n + 6);
        const aspect = Math.max(...sides) / Math.min(...sides);
        expect(aspect).toBeLessThanOrEqual(1.5 + 1e-12);
        // integer ratios (all but the last two cases) admit exactly cubic cells
        if (half.every((h) => Number.isInteger(h))) expect(aspect).toBeCloseTo(1, 12);
      }
    }
  });
});
