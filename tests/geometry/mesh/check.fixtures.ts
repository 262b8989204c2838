/**
 * Small hand-built meshes for the edge/face, P2, check, quality and export tests, built here
 * independently of the mesher so those tests do not rest on the code they help to check.
 *
 * kuhnGrid: the box [0, nx·h] × [0, ny·h] × [0, nz·h] cut into cubes, each cube into the 6 Kuhn
 * (Freudenthal) tetrahedra around its main diagonal — for every permutation (p1, p2, p3) of the
 * axes, the path x0 → x0 + h e_p1 → … + h e_p2 → x0 + h(1,1,1) (Kuhn 1960; Freudenthal 1942).
 * With the same diagonal direction in every cube the triangulation is conforming.
 */
import { NO_PARENT, type TetMesh } from '../../../geometry/mesh/types';

const PERMS = [
  [0, 1, 2],
  [0, 2, 1],
  [1, 0, 2],
  [1, 2, 0],
  [2, 0, 1],
  [2, 1, 0],
];

function det(c: Float64Array, a: number, b: number, d: number, e: number): number {
  const u = [0, 1, 2].map((k) => c[3 * b + k] - c[3 * a + k]);
  const v = [0, 1, 2].map((k) => c[3 * d + k] - c[3 * a + k]);
  const w = [0, 1, 2].map((k) => c[3 * e + k] - c[3 * a + k]);
  return u[0] * (v[1] * w[2] - v[2] * w[1]) - u[1] * (v[0] * w[2] - v[2] * w[0]) + u[2] * (v[0] * w[1] - v[1] * w[0]);
}

/** Build a TetMesh from plain arrays, fixing orientation by swapping the last two vertices. */
export function makeMesh(coords: number[], tets: number[], opts: { keepOrientation?: boolean } = {}): TetMesh {
  const c = Float64Array.from(coords);
  const t = Uint32Array.from(tets);
  if (!opts.keepOrientation) {
    for (let i = 0; i < t.length; i += 4) {
      if (det(c, t[i], t[i + 1], t[i + 2], t[i + 3]) < 0) {
        const s = t[i + 2];
        t[i + 2] = t[i + 3];
        t[i + 3] = s;
      }
    }
  }
  const nV = c.length / 3;
  const m = t.length / 4;
  // boundary flags from the bounding box (exact for the axis-aligned fixtures here)
  const lo = [Infinity, Infinity, Infinity];
  const hi = [-Infinity, -Infinity, -Infinity];
  for (let i = 0; i < nV; i++) for (let k = 0; k < 3; k++) {
    lo[k] = Math.min(lo[k], c[3 * i + k]);
    hi[k] = Math.max(hi[k], c[3 * i + k]);
  }
  const boundaryVertex = new Uint8Array(nV);
  for (let i = 0; i < nV; i++) for (let k = 0; k < 3; k++) if (c[3 * i + k] === lo[k] || c[3 * i + k] === hi[k]) boundaryVertex[i] = 1;
  return {
    coords: c,
    tets: t,
    tetLevel: new Uint8Array(m),
    tetRegion: new Uint8Array(m),
    parents: new Uint32Array(2 * nV).fill(NO_PARENT),
    vertexLevel: new Uint8Array(nV),
    boundaryVertex,
  };
}

/** Kuhn grid of nx × ny × nz cubes of side h with its corner at `origin`. */
export function kuhnGrid(nx: number, ny: number, nz: number, h = 1, origin: [number, number, number] = [0, 0, 0]): TetMesh {
  const coords: number[] = [];
  const id = (i: number, j: number, k: number) => i + (nx + 1) * (j + (ny + 1) * k);
  for (let k = 0; k <= nz; k++) for (let j = 0; j <= ny; j++) for (let i = 0; i <= nx; i++) {
    coords.push(origin[0] + i * h, origin[1] + j * h, origin[2] + k * h);
  }
  const tets: number[] = [];
  for (let k = 0; k < nz; k++) for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) {
    for (const p of PERMS) {
      const x = [i, j, k];
      const path = [id(x[0], x[1], x[2])];
      for (const axis of p) {
        x[axis]++;
        path.push(id(x[0], x[1], x[2]));
      }
      tets.push(...path);
    }
  }
  return makeMesh(coords, tets);
}

/** The regular tetrahedron with unit edges. */
export function regularTet(): TetMesh {
  const s = 1 / Math.sqrt(8);
  // alternate corners of a cube of side 1/√2: all edges have length 1
  return makeMesh([s, s, s, s, -s, -s, -s, s, -s, -s, -s, s], [0, 1, 2, 3]);
}

/** Deterministic pseudo-random generator (Park–Miller minimal standard) for shuffles in tests. */
export function lcg(seed: number): () => number {
  let s = seed % 2147483647 || 1;
  return () => {
    s = (s * 16807) % 2147483647;
    return (s - 1) / 2147483646;
  };
}

/** The same mesh with its tets permuted (a stress test for order independence). */
export function shuffleTets(mesh: TetMesh, seed: number): TetMesh {
  const m = mesh.tets.length / 4;
  const order = Array.from({ length: m }, (_, i) => i);
  const rnd = lcg(seed);
  for (let i = m - 1; i > 0; i--) {
    const j = Math.floor(rnd() * (i + 1));
    [order[i], order[j]] = [order[j], order[i]];
  }
  const tets = new Uint32Array(4 * m);
  order.forEach((src, dst) => tets.set(mesh.tets.subarray(4 * src, 4 * src + 4), 4 * dst));
  return {
    ...mesh,
    tets,
    tetLevel: Uint8Array.from(order.map((s) => mesh.tetLevel[s])),
    tetRegion: Uint8Array.from(order.map((s) => mesh.tetRegion[s])),
  };
}
