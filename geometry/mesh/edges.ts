/**
 * Edge and face tables of a tetrahedral mesh, built from the flat `tets` array.
 *
 * Both tables are built the same way, without hashing: a compressed-row (CSR) table keyed by
 * the SMALLEST vertex of each edge/face. Every tet contributes its 6 edges (4 faces) to the row
 * of their smallest vertex; each row is then sorted and de-duplicated in place. Numbering the
 * surviving entries row by row gives a global order that depends only on the vertex indices
 * (lexicographic in the sorted vertex tuple), never on the order of the tets: the output is
 * deterministic and identical across runs and machines.
 *
 *     row a (smallest vertex a):  [ b c b d c ]  --sort-->  [ b b c c d ]  --dedupe-->  [ b c d ]
 *                                                                           edges (a,b) (a,c) (a,d)
 *
 * Cost: O(m) passes plus sorting short rows (a vertex of a bisection mesh owns a bounded number of
 * edges, so rows are a few dozen entries at most; longer rows fall back to the typed-array sort).
 * Memory: the candidate array holds 6m (edges) or 4m (faces) entries before de-duplication — the
 * proven bound, since every tet has exactly 6 edges and 4 faces.
 */
import { cooperate, COOPERATE_MASK } from '../cooperate';
import { TET_EDGES, TET_FACES } from '../fem/reference';

/** Marks "no tetrahedron" in `faceTets` (a boundary face has only one). */
export const NO_TET = 0xffffffff;

export interface EdgeTable {
  /** 2 vertex indices per edge, (min, max), edges sorted by (min, max) */
  edges: Uint32Array;
  /** 6 edge indices per tet, in the reference TET_EDGES order (VTK quadratic-tetra order) */
  tetEdges: Uint32Array;
}

export interface FaceTable {
  /**
   * 3 vertex indices per face. Faces are numbered in lexicographic order of their sorted vertex
   * triple; the stored triple starts at the smallest vertex and is oriented so that its normal
   * (right-hand rule) points OUT of the tet faceTets[2f] — for a boundary face, out of the domain.
   */
  faces: Uint32Array;
  /** 2 tets per face: the lower-indexed tet first; NO_TET in the second slot on the boundary */
  faceTets: Uint32Array;
  /** 4 face indices per tet; local face i is opposite local vertex i (reference TET_FACES) */
  tetFaces: Uint32Array;
  /**
   * Faces met by more than two tets (a broken, non-manifold mesh). Always 0 for a valid mesh;
   * reported instead of thrown so that `check.ts` can say what is wrong.
   */
  overSharedFaces: number;
}

const E0 = TET_EDGES.map((e) => e[0]);
const E1 = TET_EDGES.map((e) => e[1]);
const F0 = TET_FACES.map((f) => f[0]);
const F1 = TET_FACES.map((f) => f[1]);
const F2 = TET_FACES.map((f) => f[2]);

function checkInput(tets: Uint32Array, nVertices: number): number {
  if (tets.length % 4 !== 0) throw new Error(`tets length ${tets.length} is not a multiple of 4`);
  for (let i = 0; i < tets.length; i++) {
    if (tets[i] >= nVertices) throw new Error(`tet ${i >> 2} refers to vertex ${tets[i]} but the mesh has ${nVertices}`);
  }
  return tets.length >> 2;
}

/** Insertion sort of a short typed-array range; longer ranges use the (numeric) typed-array sort. */
function sortRange(a: Uint32Array | Float64Array, lo: number, hi: number): void {
  if (hi - lo > 48) {
    a.subarray(lo, hi).sort();
    return;
  }
  for (let i = lo + 1; i < hi; i++) {
    const v = a[i];
    let j = i - 1;
    while (j >= lo && a[j] > v) {
      a[j + 1] = a[j];
      j--;
    }
    a[j + 1] = v;
  }
}

/** Index of `key` in the sorted range [lo, hi) (it is known to be present). */
function findInRow(a: Uint32Array | Float64Array, lo: number, hi: number, key: number): number {
  // rows are short: a linear scan beats binary search below ~32 entries
  if (hi - lo <= 32) {
    for (let i = lo; i < hi; i++) if (a[i] === key) return i;
    return -1;
  }
  let l = lo;
  let h = hi - 1;
  while (l <= h) {
    const mid = (l + h) >>> 1;
    const v = a[mid];
    if (v === key) return mid;
    if (v < key) l = mid + 1;
    else h = mid - 1;
  }
  return -1;
}

/**
 * Unique edges of the mesh and, for each tet, its 6 edges in the reference (VTK) order.
 * Edge e joins edges[2e] < edges[2e+1]; edges are sorted by (min, max).
 */
export function buildEdges(tets: Uint32Array, nVertices: number): EdgeTable {
  const m = checkInput(tets, nVertices);
  // 1. count candidates per smallest vertex
  const start = new Uint32Array(nVertices + 1);
  for (let t = 0; t < m; t++) {
    if ((t & COOPERATE_MASK) === 0) cooperate();
    const o = 4 * t;
    for (let e = 0; e < 6; e++) {
      const a = tets[o + E0[e]];
      const b = tets[o + E1[e]];
      start[(a < b ? a : b) + 1]++;
    }
  }
  for (let v = 0; v < nVertices; v++) start[v + 1] += start[v];
  // 2. fill rows with the larger vertex (6m entries: the proven bound)
  const fill = start.slice(0, nVertices);
  const other = new Uint32Array(6 * m);
  for (let t = 0; t < m; t++) {
    if ((t & COOPERATE_MASK) === 0) cooperate();
    const o = 4 * t;
    for (let e = 0; e < 6; e++) {
      const a = tets[o + E0[e]];
      const b = tets[o + E1[e]];
      if (a < b) other[fill[a]++] = b;
      else other[fill[b]++] = a;
    }
  }
  // 3. sort and de-duplicate each row in place; uniqStart[v] = first edge index of row v
  const uniqStart = new Uint32Array(nVertices + 1);
  let nEdges = 0;
  for (let v = 0; v < nVertices; v++) {
    const lo = start[v];
    const hi = start[v + 1];
    uniqStart[v] = nEdges;
    if (hi === lo) continue;
    sortRange(other, lo, hi);
    // compact the unique entries to the front of the row
    let w = lo;
    for (let i = lo + 1; i < hi; i++) if (other[i] !== other[w]) other[++w] = other[i];
    const count = w - lo + 1;
    fill[v] = lo + count; // reuse `fill` as the end of the unique part of row v
    nEdges += count;
  }
  uniqStart[nVertices] = nEdges;
  // 4. emit edges in row order
  const edges = new Uint32Array(2 * nEdges);
  for (let v = 0, k = 0; v < nVertices; v++) {
    for (let i = start[v], end = fill[v]; i < end; i++) {
      edges[k++] = v;
      edges[k++] = other[i];
    }
  }
  // 5. each tet's edges by lookup in the (short, sorted) row of the smaller vertex
  const tetEdges = new Uint32Array(6 * m);
  for (let t = 0; t < m; t++) {
    if ((t & COOPERATE_MASK) === 0) cooperate();
    const o = 4 * t;
    for (let e = 0; e < 6; e++) {
      const a = tets[o + E0[e]];
      const b = tets[o + E1[e]];
      const lo = a < b ? a : b;
      const hi = a < b ? b : a;
      const rowStart = start[lo];
      const i = findInRow(other, rowStart, fill[lo], hi);
      tetEdges[6 * t + e] = uniqStart[lo] + (i - rowStart);
    }
  }
  return { edges, tetEdges };
}

/**
 * Unique faces of the mesh, the (one or two) tets on each side, and each tet's 4 faces.
 *
 * Within the row of its smallest vertex a, a face (a, b, c) with a < b < c is keyed by
 * b·n + c, exact in a double while n² < 2⁵³ (n < 9.4·10⁷ vertices — checked).
 */
export function buildFaces(tets: Uint32Array, nVertices: number): FaceTable {
  const m = checkInput(tets, nVertices);
  if (nVertices > 94_000_000) throw new Error(`buildFaces supports at most 94 million vertices (got ${nVertices})`);
  const n = nVertices;
  const start = new Uint32Array(n + 1);
  for (let t = 0; t < m; t++) {
    if ((t & COOPERATE_MASK) === 0) cooperate();
    const o = 4 * t;
    for (let f = 0; f < 4; f++) {
      const a = tets[o + F0[f]];
      const b = tets[o + F1[f]];
      const c = tets[o + F2[f]];
      const mn = a < b ? (a < c ? a : c) : b < c ? b : c;
      start[mn + 1]++;
    }
  }
  for (let v = 0; v < n; v++) start[v + 1] += start[v];
  const fill = start.slice(0, n);
  const keys = new Float64Array(4 * m); // 4m candidates: the proven bound
  for (let t = 0; t < m; t++) {
    if ((t & COOPERATE_MASK) === 0) cooperate();
    const o = 4 * t;
    for (let f = 0; f < 4; f++) {
      let a = tets[o + F0[f]];
      let b = tets[o + F1[f]];
      let c = tets[o + F2[f]];
      let s: number;
      // sort the triple a < b < c (three compare-swaps)
      if (a > b) {
        s = a;
        a = b;
        b = s;
      }
      if (b > c) {
        s = b;
        b = c;
        c = s;
      }
      if (a > b) {
        s = a;
        a = b;
        b = s;
      }
      keys[fill[a]++] = b * n + c;
    }
  }
  const uniqStart = new Uint32Array(n + 1);
  const uniqEnd = new Uint32Array(n);
  let nFaces = 0;
  for (let v = 0; v < n; v++) {
    const lo = start[v];
    const hi = start[v + 1];
    uniqStart[v] = nFaces;
    uniqEnd[v] = lo;
    if (hi === lo) continue;
    sortRange(keys, lo, hi);
    let w = lo;
    for (let i = lo + 1; i < hi; i++) if (keys[i] !== keys[w]) keys[++w] = keys[i];
    const count = w - lo + 1;
    uniqEnd[v] = lo + count;
    nFaces += count;
  }
  uniqStart[n] = nFaces;

  const faces = new Uint32Array(3 * nFaces);
  const faceTets = new Uint32Array(2 * nFaces).fill(NO_TET);
  const tetFaces = new Uint32Array(4 * m);
  let overSharedFaces = 0;
  // Visiting tets in increasing index puts the lower-indexed tet first in faceTets, and the
  // first visitor also fixes the stored orientation of the face (outward from that tet).
  for (let t = 0; t < m; t++) {
    if ((t & COOPERATE_MASK) === 0) cooperate();
    const o = 4 * t;
    for (let f = 0; f < 4; f++) {
      const p = tets[o + F0[f]];
      const q = tets[o + F1[f]];
      const r = tets[o + F2[f]];
      let a = p;
      let b = q;
      let c = r;
      let s: number;
      if (a > b) {
        s = a;
        a = b;
        b = s;
      }
      if (b > c) {
        s = b;
        b = c;
        c = s;
      }
      if (a > b) {
        s = a;
        a = b;
        b = s;
      }
      const rowStart = start[a];
      const i = findInRow(keys, rowStart, uniqEnd[a], b * n + c);
      const face = uniqStart[a] + (i - rowStart);
      tetFaces[o + f] = face;
      if (faceTets[2 * face] === NO_TET) {
        faceTets[2 * face] = t;
        // rotate the outward triple (p, q, r) so that it starts at its smallest vertex a;
        // a cyclic rotation keeps the orientation
        const fo = 3 * face;
        if (p === a) {
          faces[fo] = p;
          faces[fo + 1] = q;
          faces[fo + 2] = r;
        } else if (q === a) {
          faces[fo] = q;
          faces[fo + 1] = r;
          faces[fo + 2] = p;
        } else {
          faces[fo] = r;
          faces[fo + 1] = p;
          faces[fo + 2] = q;
        }
      } else if (faceTets[2 * face + 1] === NO_TET) {
        faceTets[2 * face + 1] = t;
      } else {
        overSharedFaces++;
      }
    }
  }
  return { faces, faceTets, tetFaces, overSharedFaces };
}
