/**
 * Meshes for the solver tests, made with the project's mesher (geometry/mesh): a uniform Kuhn box
 * and a box graded towards a point, as thin wrappers so every test states its mesh in one line.
 */
import { kuhnBox, refineUniform, refineToSize, toTetMesh } from '../../../geometry/mesh';
import type { TetMesh } from '../../../geometry/mesh/types';

type V3 = [number, number, number];

/** n³ Kuhn cells of edge h with its low corner at lo, bisected uniformly `times` times. */
export function uniformBox(n: number, h: number, times: number, lo: V3 = [0, 0, 0]): TetMesh {
  const half = (n * h) / 2;
  const m = kuhnBox({ center: [lo[0] + half, lo[1] + half, lo[2] + half], halfExtents: [half, half, half], cells: [n, n, n] });
  refineUniform(m, times);
  return toTetMesh(m);
}

/**
 * The box [0, n·h]³ graded towards p: a tet is bisected while its longest edge exceeds
 * h0 + grade·(distance from p to its nearest vertex).
 */
export function gradedBox(n: number, h: number, p: V3, h0: number, grade: number): TetMesh {
  const half = (n * h) / 2;
  const m = kuhnBox({ center: [half, half, half], halfExtents: [half, half, half], cells: [n, n, n] });
  refineToSize(m, (coords, tets, t) => {
    let longest = 0;
    let dmin = Infinity;
    for (let i = 0; i < 4; i++) {
      const a = 3 * tets[4 * t + i];
      dmin = Math.min(dmin, Math.hypot(coords[a] - p[0], coords[a + 1] - p[1], coords[a + 2] - p[2]));
      for (let j = i + 1; j < 4; j++) {
        const b = 3 * tets[4 * t + j];
        longest = Math.max(longest, Math.hypot(coords[a] - coords[b], coords[a + 1] - coords[b + 1], coords[a + 2] - coords[b + 2]));
      }
    }
    return longest > h0 + grade * dmin;
  });
  return toTetMesh(m);
}
