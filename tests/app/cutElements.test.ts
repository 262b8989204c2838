/**
 * The mesh viewer's cut: which tetrahedra a plane passes through.
 * Source: Kuhn's triangulation of a cube into 6 tetrahedra that all share the main diagonal (H. W. Kuhn, "Some
 * combinatorial lemmas in topology", IBM J. Res. Dev. 4 (1960) 518–524): every one of them spans the whole cube along
 * each axis, so a plane through the cube cuts all 6 and a plane outside cuts none. On an n-cell grid a plane strictly
 * inside one layer of cells cuts exactly that layer: 6·n² tetrahedra (counting).
 */
import { describe, expect, it } from 'vitest';
import { kuhnBox, toTetMesh } from '../../geometry/mesh';
import { cutElements, ramp } from '../../app/src/features/jobs/cutElements';

describe('cutElements', () => {
  const one = toTetMesh(kuhnBox({ center: [0, 0, 0], halfExtents: [1, 1, 1], cells: [1, 1, 1] }));
  const zero = new Float64Array(one.tets.length / 4);

  it('a plane through one Kuhn cube cuts all 6 tetrahedra, one outside cuts none', () => {
    expect(one.tets.length / 4).toBe(6);
    for (const axis of [0, 1, 2]) {
      const c = cutElements(one, axis, 0.3, zero, 0, 1);
      expect(c.count).toBe(6);
      expect(c.positions.length).toBe(6 * 4 * 3 * 3);
      expect(cutElements(one, axis, 1.5, zero, 0, 1).count).toBe(0);
    }
  });

  it('a plane inside one layer of a 4×4×4 grid cuts that layer only: 6·4² tetrahedra', () => {
    const grid = toTetMesh(kuhnBox({ center: [0, 0, 0], halfExtents: [2, 2, 2], cells: [4, 4, 4] }));
    const c = cutElements(grid, 2, 0.5, new Float64Array(grid.tets.length / 4), 0, 1);
    expect(c.count).toBe(6 * 16);
    // every triangle vertex of a cut element lies within that layer, 0 ≤ z ≤ 1
    for (let i = 2; i < c.positions.length; i += 3) {
      expect(c.positions[i]).toBeGreaterThanOrEqual(-1e-6);
      expect(c.positions[i]).toBeLessThanOrEqual(1 + 1e-6);
    }
  });

  it('colours follow the value: the lowest and highest value get the ramp ends', () => {
    const value = Float64Array.from([0, 1, 2, 3, 4, 5]);
    const c = cutElements(one, 0, 0, value, 0, 5);
    const first = Array.from(c.colours.slice(0, 3));
    const last = Array.from(c.colours.slice(c.colours.length - 3));
    expect(first.map((v) => +v.toFixed(5))).toEqual(ramp(0).map((v) => +v.toFixed(5)));
    expect(last.map((v) => +v.toFixed(5))).toEqual(ramp(1).map((v) => +v.toFixed(5)));
    expect(first).not.toEqual(last);
  });
});
