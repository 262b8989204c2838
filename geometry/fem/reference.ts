/**
 * The reference tetrahedron: the one place that fixes vertex, edge and face numbering.
 * Everything else (mesher, exporters, P2 degrees of freedom, assembly) reads these tables.
 *
 *                 v3 (0,0,1)
 *                 /|\
 *                / | \          edges (VTK quadratic-tetra order, nodes 4..9):
 *            e3 /  |  \ e5        e0 = v0-v1   e1 = v1-v2   e2 = v0-v2
 *              /   |e4 \          e3 = v0-v3   e4 = v1-v3   e5 = v2-v3
 *             /    |    \
 *   (0,0,0) v0-----|-----v2 (0,1,0)   faces: face i is opposite vertex i, listed so that
 *             \ e0 |    /             its normal (right-hand rule) points out of a
 *              \   |   / e1           positively oriented tetrahedron:
 *               \  |  /                 f0 = (1,2,3)  f1 = (0,3,2)
 *                \ | /                  f2 = (0,1,3)  f3 = (0,2,1)
 *                 v1 (1,0,0)
 *
 * A tetrahedron (p0, p1, p2, p3) is positively oriented when det[p1−p0, p2−p0, p3−p0] > 0,
 * as the reference one is.
 */

/** Reference vertex coordinates, 3 per vertex. */
export const REF_VERTICES = new Float64Array([0, 0, 0, 1, 0, 0, 0, 1, 0, 0, 0, 1]);

/** Local vertex pairs of the six edges, in VTK order (node 4 + e is the midpoint of edge e). */
export const TET_EDGES: ReadonlyArray<readonly [number, number]> = [
  [0, 1],
  [1, 2],
  [0, 2],
  [0, 3],
  [1, 3],
  [2, 3],
];

/** Local vertices of the four faces; face i is opposite vertex i, outward-oriented. */
export const TET_FACES: ReadonlyArray<readonly [number, number, number]> = [
  [1, 2, 3],
  [0, 3, 2],
  [0, 1, 3],
  [0, 2, 1],
];
