/**
 * Point location on a tetrahedral mesh, once per mesh, and evaluation of finite-element functions
 * at the located points.
 *
 * `locatePoints` bins the query points on a uniform grid over their own bounding box, then visits
 * every tetrahedron once: its bounding box names the grid cells it can hold points of, and only the
 * points of those cells get a barycentric test. Cost O(tets + tests) instead of the O(tets ×
 * points) scan it replaces; a mesh far larger than the points' box costs one bounding box per tet.
 *
 * A point on a shared face, edge or vertex lies in several tetrahedra: the one whose smallest
 * barycentric coordinate is largest wins, ties to the lowest tet index (deterministic; a continuous
 * function has the same value in all of them anyway). A point no tetrahedron holds (outside the
 * mesh, beyond the tolerance) gets tet −1 and evaluates to NaN.
 *
 * `valuesAtPoints` evaluates any number of P1/P2 functions on the same space at the located points
 * (the barycentric coordinates are kept, so each function costs O(points)).
 */
import type { TetMesh } from '../mesh/types';
import { GEOM_SIZE, p2BasisBary, tetGeometry } from './reference';
import type { FeSpace } from './space';

/** Barycentric slack for a point on a face (round-off of the affine map; common practice). */
export const LOCATE_BARY_TOLERANCE = 1e-10;
/** Slack of the bounding-box test (nm; common practice). */
const BOX_SLACK_NM = 1e-9;
/** Most grid cells per axis. */
const MAX_CELLS_PER_AXIS = 128;

export interface LocatedPoints {
  /** containing tetrahedron per point, −1 where none */
  tet: Int32Array;
  /** barycentric coordinates in that tetrahedron, 4 per point */
  bary: Float64Array;
}

/** Locate points (3 per point, nm) in the mesh's tetrahedra (header). */
export function locatePoints(mesh: TetMesh, points: Float64Array): LocatedPoints {
  const np = points.length / 3;
  const tet = new Int32Array(np).fill(-1);
  const bary = new Float64Array(4 * np);
  if (np === 0) return { tet, bary };
  const best = new Float64Array(np).fill(-Infinity);
  // the grid over the points' bounding box
  const lo = [Infinity, Infinity, Infinity], hi = [-Infinity, -Infinity, -Infinity];
  for (let p = 0; p < np; p++) {
    for (let a = 0; a < 3; a++) {
      lo[a] = Math.min(lo[a], points[3 * p + a]);
      hi[a] = Math.max(hi[a], points[3 * p + a]);
    }
  }
  const perAxis = Math.min(MAX_CELLS_PER_AXIS, Math.max(1, Math.ceil(2 * Math.cbrt(np))));
  const dims = [1, 1, 1];
  const inv = [0, 0, 0];
  for (let a = 0; a < 3; a++) {
    const ext = hi[a] - lo[a];
    dims[a] = ext > 0 ? perAxis : 1;
    inv[a] = ext > 0 ? dims[a] / ext : 0;
  }
  const cellOf = (a: number, x: number): number => Math.min(dims[a] - 1, Math.max(0, Math.floor((x - lo[a]) * inv[a])));
  const nCells = dims[0] * dims[1] * dims[2];
  // points per cell, compressed (start offsets, then point indices in increasing order)
  const start = new Int32Array(nCells + 1);
  const cellOfPoint = new Int32Array(np);
  for (let p = 0; p < np; p++) {
    const c = cellOf(0, points[3 * p]) + dims[0] * (cellOf(1, points[3 * p + 1]) + dims[1] * cellOf(2, points[3 * p + 2]));
    cellOfPoint[p] = c;
    start[c + 1]++;
  }
  for (let c = 0; c < nCells; c++) start[c + 1] += start[c];
  const fill = start.slice(0, nCells);
  const inCell = new Int32Array(np);
  for (let p = 0; p < np; p++) inCell[fill[cellOfPoint[p]]++] = p;

  const coords = mesh.coords, tets = mesh.tets;
  const nTets = tets.length / 4;
  const g = new Float64Array(GEOM_SIZE);
  const bl = new Float64Array(3), bh = new Float64Array(3);
  const c0 = new Int32Array(3), c1 = new Int32Array(3);
  for (let t = 0; t < nTets; t++) {
    const v0 = tets[4 * t], v1 = tets[4 * t + 1], v2 = tets[4 * t + 2], v3 = tets[4 * t + 3];
    let outside = false;
    for (let a = 0; a < 3 && !outside; a++) {
      const x0 = coords[3 * v0 + a], x1 = coords[3 * v1 + a], x2 = coords[3 * v2 + a], x3 = coords[3 * v3 + a];
      bl[a] = Math.min(x0, x1, x2, x3) - BOX_SLACK_NM;
      bh[a] = Math.max(x0, x1, x2, x3) + BOX_SLACK_NM;
      if (bh[a] < lo[a] || bl[a] > hi[a]) outside = true;
    }
    if (outside) continue;
    for (let a = 0; a < 3; a++) {
      c0[a] = cellOf(a, bl[a]);
      c1[a] = cellOf(a, bh[a]);
    }
    let geom = false;
    for (let k = c0[2]; k <= c1[2]; k++) {
      for (let j = c0[1]; j <= c1[1]; j++) {
        for (let i = c0[0]; i <= c1[0]; i++) {
          const c = i + dims[0] * (j + dims[1] * k);
          for (let q = start[c]; q < start[c + 1]; q++) {
            const p = inCell[q];
            const x = points[3 * p], y = points[3 * p + 1], z = points[3 * p + 2];
            if (x < bl[0] || x > bh[0] || y < bl[1] || y > bh[1] || z < bl[2] || z > bh[2]) continue;
            if (!geom) {
              tetGeometry(coords, v0, v1, v2, v3, g);
              geom = true;
            }
            const dx = x - g[13], dy = y - g[14], dz = z - g[15];
            const l1 = g[3] * dx + g[4] * dy + g[5] * dz;
            const l2 = g[6] * dx + g[7] * dy + g[8] * dz;
            const l3 = g[9] * dx + g[10] * dy + g[11] * dz;
            const l0 = 1 - l1 - l2 - l3;
            const m = Math.min(l0, l1, l2, l3);
            if (m < -LOCATE_BARY_TOLERANCE || m <= best[p]) continue;
            best[p] = m;
            tet[p] = t;
            bary[4 * p] = l0;
            bary[4 * p + 1] = l1;
            bary[4 * p + 2] = l2;
            bary[4 * p + 3] = l3;
          }
        }
      }
    }
  }
  return { tet, bary };
}

/** Values of a P1/P2 function φ (one value per dof of `space`) at located points; NaN where unlocated. */
export function valuesAtPoints(space: FeSpace, located: LocatedPoints, phi: Float64Array, out?: Float64Array): Float64Array {
  const np = located.tet.length;
  const res = out ?? new Float64Array(np);
  const nLoc = space.dofsPerTet;
  const { tetDofs } = space;
  const basis = new Float64Array(10);
  const l = new Float64Array(4);
  for (let p = 0; p < np; p++) {
    const t = located.tet[p];
    if (t < 0) {
      res[p] = Number.NaN;
      continue;
    }
    for (let k = 0; k < 4; k++) l[k] = located.bary[4 * p + k];
    let v = 0;
    if (space.order === 1) {
      for (let i = 0; i < 4; i++) v += l[i] * phi[tetDofs[4 * t + i]];
    } else {
      p2BasisBary(l, basis);
      for (let i = 0; i < 10; i++) v += basis[i] * phi[tetDofs[nLoc * t + i]];
    }
    res[p] = v;
  }
  return res;
}
