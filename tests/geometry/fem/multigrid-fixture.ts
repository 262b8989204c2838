/**
 * Test-only stand-in for the mesher (geometry/mesh/index.ts) while it is being written:
 * Kuhn cells + Maubach bisection with closure (Maubach, SIAM J. Sci. Comput. 16 (1995);
 * conformity of closure on Kuhn meshes: Stevenson, Math. Comp. 77 (2008)).
 * Slow and simple (JS Map for edge midpoints); only for small test meshes.
 */
import type { TetMesh } from '../../../geometry/mesh/types';
import { NO_PARENT } from '../../../geometry/mesh/types';

export interface FixtureMesh {
  coords: number[];
  /** Maubach-ordered tets (4 each) and tags */
  tets: number[][];
  tags: number[];
  levels: number[];
  parents: number[];
  vertexLevel: number[];
  mid: Map<number, number>;
  lo: [number, number, number];
  hi: [number, number, number];
}

const KEY = 1 << 26;
const ekey = (a: number, b: number) => (a < b ? a * KEY + b : b * KEY + a);

export function fixtureKuhnBox(n: [number, number, number], lo: [number, number, number], h: number): FixtureMesh {
  const [nx, ny, nz] = n;
  const coords: number[] = [];
  const vid = (i: number, j: number, k: number) => (k * (ny + 1) + j) * (nx + 1) + i;
  for (let k = 0; k <= nz; k++)
    for (let j = 0; j <= ny; j++)
      for (let i = 0; i <= nx; i++) coords.push(lo[0] + i * h, lo[1] + j * h, lo[2] + k * h);
  const perms = [[0, 1, 2], [0, 2, 1], [1, 0, 2], [1, 2, 0], [2, 0, 1], [2, 1, 0]];
  const tets: number[][] = [];
  for (let k = 0; k < nz; k++)
    for (let j = 0; j < ny; j++)
      for (let i = 0; i < nx; i++)
        for (const p of perms) {
          const c = [i, j, k];
          const t = [vid(c[0], c[1], c[2])];
          for (const ax of p) {
            c[ax]++;
            t.push(vid(c[0], c[1], c[2]));
          }
          tets.push(t);
        }
  const nv = coords.length / 3;
  return {
    coords, tets, tags: tets.map(() => 3), levels: tets.map(() => 0),
    parents: new Array(2 * nv).fill(NO_PARENT), vertexLevel: new Array(nv).fill(0), mid: new Map(),
    lo, hi: [lo[0] + nx * h, lo[1] + ny * h, lo[2] + nz * h],
  };
}

function bisect(m: FixtureMesh, t: number): void {
  const T = m.tets[t];
  const k = m.tags[t];
  const a = T[0], b = T[k];
  const key = ekey(a, b);
  const lev = m.levels[t] + 1;
  let z = m.mid.get(key);
  if (z === undefined) {
    z = m.coords.length / 3;
    for (let c = 0; c < 3; c++) m.coords.push(0.5 * (m.coords[3 * a + c] + m.coords[3 * b + c]));
    m.parents.push(Math.min(a, b), Math.max(a, b));
    m.vertexLevel.push(lev);
    m.mid.set(key, z);
  }
  const k2 = k > 1 ? k - 1 : 3;
  const c1 = [...T.slice(0, k), z, ...T.slice(k + 1)];
  const c2 = [...T.slice(1, k + 1), z, ...T.slice(k + 1)];
  m.tets[t] = c1;
  m.tags[t] = k2;
  m.levels[t] = lev;
  m.tets.push(c2);
  m.tags.push(k2);
  m.levels.push(lev);
}

function hanging(m: FixtureMesh, t: number): boolean {
  const T = m.tets[t];
  for (let i = 0; i < 4; i++) for (let j = i + 1; j < 4; j++) if (m.mid.has(ekey(T[i], T[j]))) return true;
  return false;
}

/** Bisect the marked tets once, then close (bisect every tet with a hanging midpoint). */
export function fixtureRefine(m: FixtureMesh, marked: boolean[]): void {
  const n = m.tets.length;
  for (let t = 0; t < n; t++) if (marked[t]) bisect(m, t);
  for (;;) {
    let changed = false;
    for (let t = 0; t < m.tets.length; t++) {
      if (hanging(m, t)) {
        bisect(m, t);
        changed = true;
      }
    }
    if (!changed) break;
  }
}

export function fixtureRefineUniform(m: FixtureMesh, times: number): void {
  for (let i = 0; i < times; i++) fixtureRefine(m, m.tets.map(() => true));
}

/** Refine while a tet's longest edge exceeds h0 + grade·(distance of its nearest vertex to p). */
export function fixtureGraded(m: FixtureMesh, p: [number, number, number], h0: number, grade: number, maxTets: number): void {
  for (;;) {
    if (m.tets.length > maxTets) break;
    const marked = m.tets.map((T) => {
      let longest = 0;
      let dmin = Infinity;
      for (let i = 0; i < 4; i++) {
        const d = Math.hypot(m.coords[3 * T[i]] - p[0], m.coords[3 * T[i] + 1] - p[1], m.coords[3 * T[i] + 2] - p[2]);
        dmin = Math.min(dmin, d);
        for (let j = i + 1; j < 4; j++) {
          longest = Math.max(longest, Math.hypot(
            m.coords[3 * T[i]] - m.coords[3 * T[j]], m.coords[3 * T[i] + 1] - m.coords[3 * T[j] + 1],
            m.coords[3 * T[i] + 2] - m.coords[3 * T[j] + 2]));
        }
      }
      return longest > h0 + grade * dmin;
    });
    if (!marked.some((x) => x)) break;
    fixtureRefine(m, marked);
  }
}

export function fixtureToTetMesh(m: FixtureMesh): TetMesh {
  const nv = m.coords.length / 3;
  const coords = Float64Array.from(m.coords);
  const tets = new Uint32Array(4 * m.tets.length);
  m.tets.forEach((T, t) => {
    const [a, b, c, d] = T;
    const ux = coords[3 * b] - coords[3 * a], uy = coords[3 * b + 1] - coords[3 * a + 1], uz = coords[3 * b + 2] - coords[3 * a + 2];
    const vx = coords[3 * c] - coords[3 * a], vy = coords[3 * c + 1] - coords[3 * a + 1], vz = coords[3 * c + 2] - coords[3 * a + 2];
    const wx = coords[3 * d] - coords[3 * a], wy = coords[3 * d + 1] - coords[3 * a + 1], wz = coords[3 * d + 2] - coords[3 * a + 2];
    const det = ux * (vy * wz - vz * wy) - uy * (vx * wz - vz * wx) + uz * (vx * wy - vy * wx);
    if (det > 0) tets.set([a, b, c, d], 4 * t);
    else tets.set([a, c, b, d], 4 * t);
  });
  const boundaryVertex = new Uint8Array(nv);
  const eps = 1e-9;
  for (let v = 0; v < nv; v++) {
    for (let c = 0; c < 3; c++) {
      if (Math.abs(coords[3 * v + c] - m.lo[c]) < eps || Math.abs(coords[3 * v + c] - m.hi[c]) < eps) boundaryVertex[v] = 1;
    }
  }
  return {
    coords, tets,
    tetLevel: Uint8Array.from(m.levels),
    tetRegion: new Uint8Array(m.tets.length),
    parents: Uint32Array.from(m.parents),
    vertexLevel: Uint8Array.from(m.vertexLevel),
    boundaryVertex,
  };
}

/** A unit-ish box mesh: n³ Kuhn cells of size h, uniformly bisected `times` times. */
export function uniformBox(n: number, h: number, times: number, lo: [number, number, number] = [0, 0, 0]): TetMesh {
  const m = fixtureKuhnBox([n, n, n], lo, h);
  fixtureRefineUniform(m, times);
  return fixtureToTetMesh(m);
}

/** A box graded toward point p. */
export function gradedBox(n: number, h: number, p: [number, number, number], h0: number, grade: number, maxTets: number): TetMesh {
  const m = fixtureKuhnBox([n, n, n], [0, 0, 0], h);
  fixtureGraded(m, p, h0, grade, maxTets);
  return fixtureToTetMesh(m);
}
