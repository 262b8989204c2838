/**
 * Refinement marks for the bisection and multigrid tests: one flag per tet, chosen by where the
 * tet's centroid lies, so each test states its refinement region as a plain predicate.
 */
import type { BisectionMesh } from '../../../geometry/mesh/index';

/** marks (1) the tets whose centroid (x, y, z) satisfies `inside` */
export function marksWhere(m: BisectionMesh, inside: (x: number, y: number, z: number) => boolean): Uint8Array {
  const marks = new Uint8Array(m.nTets);
  for (let t = 0; t < m.nTets; t++) {
    let cx = 0, cy = 0, cz = 0;
    for (let i = 0; i < 4; i++) {
      const v = m.tets[4 * t + i];
      cx += m.coords[3 * v] / 4;
      cy += m.coords[3 * v + 1] / 4;
      cz += m.coords[3 * v + 2] / 4;
    }
    if (inside(cx, cy, cz)) marks[t] = 1;
  }
  return marks;
}
