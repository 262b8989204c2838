/**
 * Local multigrid on the bisection hierarchy: the production preconditioner for PCG.
 *
 * The mesh comes from newest-vertex bisection, so it carries its own hierarchy: every vertex
 * after the initial Kuhn mesh is the midpoint of two parents. Following Chen, Nochetto & Xu,
 * "Optimal multilevel methods for graded bisection grids", Numer. Math. 120 (2012) 1–34, we
 * rebuild the nested conforming meshes T_0 ⊂ T_1 ⊂ … ⊂ T_G (T_g = the bisection forest cut at
 * generation g) and run a symmetric V-cycle whose level-g smoother touches only
 *
 *     Ñ_g = { vertices created in generation g } ∪ { their two parents }
 *
 * so one cycle costs O(N) even on strongly graded meshes with many generations.
 *
 *   level g+1:   a ●───────○───────● b       ○ = new vertex z (midpoint), smoothed at g+1
 *                  │  prolongation: e(z) = (e(a) + e(b))/2   (exact for P1 on T_g)
 *   level g:     a ●───────────────● b       restriction: r(a) += r(z)/2, r(b) += r(z)/2
 *
 * Level operators are rediscretisations on T_g (equal to the Galerkin products P^T A P because
 * the spaces are nested and ε is constant per element); only the rows at Ñ_g are stored.
 * Smoother: one forward Gauss–Seidel sweep going down, one backward sweep going up, exact
 * (dense Cholesky) coarse solve on T_0: the cycle is a symmetric positive definite operator, as
 * PCG needs. Dirichlet (boundary) vertices are excluded from every level.
 *
 * For P2, a two-level step on top: Gauss–Seidel on the P2 matrix, and the P1 space (a subspace
 * of P2: vertex hats plus half of each adjacent edge node) as the coarse correction, solved
 * approximately by the P1 V-cycle.
 *
 * Hierarchy facts relied upon (checked, with a clear error when violated):
 *  - a tetrahedron of level ℓ > 0 has one newest vertex z (created with its bisection); its
 *    parent tetrahedron is the same one with z replaced by z's parent that it lacks;
 *  - every bisection of one edge happens in one generation (compatible bisection).
 * The newest vertex is taken as the one with the largest (vertexLevel, index).
 */
import { cooperate, COOPERATE_MASK } from '../cooperate';
import type { TetMesh } from '../mesh/types';
import { NO_PARENT } from '../mesh/types';
import type { FeSpace } from './space';
import { type Csr, diagonal, spmv } from './csr';
import type { Preconditioner } from './pcg';
import { BLOCK_SLOTS, type BlockKernels } from './block-kernels';
import { GEOM_SIZE, tetGeometry } from './reference';
import { assembleStiffness } from './assemble';
import { CoreError } from '../errors';

/** The bisection hierarchy is inconsistent: a CoreError with code 'bad-hierarchy'. */
export class HierarchyError extends CoreError<'bad-hierarchy'> {
  constructor(message: string) {
    super('bad-hierarchy', message);
    this.name = 'HierarchyError';
  }
}

/** Statistics of the built hierarchy (for reports and benchmarks). */
export interface MultigridStats {
  levels: number;
  coarseVertices: number;
  forestNodes: number;
  smoothingRows: number;
  storedEntries: number;
  setupSeconds: number;
}

export interface P1Cycle {
  nV: number;
  interior: Uint8Array;
  G: number;
  /** new interior vertices per level: newPtr[g]..newPtr[g+1] into newV, parents in newPa/newPb */
  newPtr: Uint32Array;
  newV: Uint32Array;
  newPa: Uint32Array;
  newPb: Uint32Array;
  /** smoothing rows per level: rowLevelPtr[g]..rowLevelPtr[g+1] into rowV */
  rowLevelPtr: Uint32Array;
  rowV: Uint32Array;
  rowPtr: Uint32Array;
  cols: Uint32Array;
  vals: Float64Array;
  invDiag: Float64Array;
  /** coarse solve on the interior vertices of T_0 */
  coarseV: Uint32Array;
  coarseSolve: (rhs: Float64Array, out: Float64Array) => void;
  stats: MultigridStats;
}

// ---------------------------------------------------------------------------------------------
// Forest reconstruction
// ---------------------------------------------------------------------------------------------

function hash4(v: Uint32Array, o: number): number {
  let h = Math.imul(v[o] ^ 0x9e3779b9, 0x85ebca6b);
  h = Math.imul(h ^ v[o + 1] ^ (h >>> 13), 0xc2b2ae35);
  h = Math.imul(h ^ v[o + 2] ^ (h >>> 16), 0x85ebca6b);
  h = Math.imul(h ^ v[o + 3] ^ (h >>> 13), 0xc2b2ae35);
  return (h ^ (h >>> 16)) >>> 0;
}

function sort4(v: Uint32Array, o: number): void {
  // insertion sort of four entries
  for (let i = o + 1; i < o + 4; i++) {
    const x = v[i];
    let j = i - 1;
    while (j >= o && v[j] > x) {
      v[j + 1] = v[j];
      j--;
    }
    v[j + 1] = x;
  }
}

interface Forest {
  nNodes: number;
  nodeV: Uint32Array;
  nodeLevel: Uint8Array;
  nodeRegion: Uint8Array;
  nodeInternal: Uint8Array;
  newLevel: Int32Array;
  G: number;
}

function buildForest(mesh: TetMesh): Forest {
  const m = mesh.tets.length / 4;
  const nV = mesh.coords.length / 3;
  let G = 0;
  for (let t = 0; t < m; t++) if (mesh.tetLevel[t] > G) G = mesh.tetLevel[t];
  // A binary forest with m leaves has at most m − 1 internal nodes: 2m bounds the node count.
  const maxNodes = 2 * m;
  const nodeV = new Uint32Array(4 * maxNodes);
  const nodeLevel = new Uint8Array(maxNodes);
  const nodeRegion = new Uint8Array(maxNodes);
  const nodeInternal = new Uint8Array(maxNodes);
  let size = 1;
  while (size < 2 * maxNodes) size <<= 1; // load factor ≤ 1/2
  const mask = size - 1;
  const table = new Int32Array(size).fill(-1);
  const same = (a: number, b: number): boolean =>
    nodeV[4 * a] === nodeV[4 * b] && nodeV[4 * a + 1] === nodeV[4 * b + 1] &&
    nodeV[4 * a + 2] === nodeV[4 * b + 2] && nodeV[4 * a + 3] === nodeV[4 * b + 3];
  // find node equal to candidate slot `c` (already written at nodeV[4c..]); insert it if absent
  const findOrInsert = (c: number): number => {
    let h = hash4(nodeV, 4 * c) & mask;
    for (;;) {
      const id = table[h];
      if (id < 0) {
        table[h] = c;
        return c;
      }
      if (same(id, c)) return id;
      h = (h + 1) & mask; // linear probing: deterministic
    }
  };

  for (let t = 0; t < m; t++) {

    if ((t & COOPERATE_MASK) === 0) cooperate();
    for (let k = 0; k < 4; k++) nodeV[4 * t + k] = mesh.tets[4 * t + k];
    sort4(nodeV, 4 * t);
    nodeLevel[t] = mesh.tetLevel[t];
    nodeRegion[t] = mesh.tetRegion[t];
    if (findOrInsert(t) !== t) throw new HierarchyError(`tetrahedron ${t} appears twice in the mesh`);
  }
  // leaves bucketed by level (counting sort keeps index order inside a level)
  const lp = new Uint32Array(G + 2);
  for (let t = 0; t < m; t++) lp[mesh.tetLevel[t] + 1]++;
  for (let l = 0; l <= G; l++) lp[l + 1] += lp[l];
  const fillp = lp.slice(0, G + 1);
  const byLevel = new Uint32Array(m);
  for (let t = 0; t < m; t++) byLevel[fillp[mesh.tetLevel[t]]++] = t;

  const newLevel = new Int32Array(nV).fill(-1);
  const vl = mesh.vertexLevel;
  const par = mesh.parents;
  let nNodes = m;
  let createdStart = m, createdEnd = m;
  for (let l = G; l >= 1; l--) {
    const nextStart = nNodes;
    const visit = (n: number): void => {
      const o = 4 * n;
      // newest vertex: largest (vertexLevel, index)
      let z = nodeV[o];
      for (let k = 1; k < 4; k++) {
        const v = nodeV[o + k];
        if (vl[v] > vl[z] || (vl[v] === vl[z] && v > z)) z = v;
      }
      const pa = par[2 * z], pb = par[2 * z + 1];
      if (pa === NO_PARENT) throw new HierarchyError(`tetrahedron of level ${l} has no bisection vertex`);
      let hasA = false, hasB = false;
      for (let k = 0; k < 4; k++) {
        if (nodeV[o + k] === pa) hasA = true;
        if (nodeV[o + k] === pb) hasB = true;
      }
      if (hasA === hasB) throw new HierarchyError(`vertex ${z}: not the bisection vertex of its tetrahedron`);
      if (newLevel[z] === -1) newLevel[z] = l;
      else if (newLevel[z] !== l) throw new HierarchyError(`edge of vertex ${z} bisected in two generations (incompatible bisection)`);
      const other = hasA ? pb : pa;
      if (nNodes >= maxNodes) throw new HierarchyError('bisection forest larger than its bound');
      const c = nNodes;
      const oc = 4 * c;
      for (let k = 0; k < 4; k++) nodeV[oc + k] = nodeV[o + k] === z ? other : nodeV[o + k];
      sort4(nodeV, oc);
      const id = findOrInsert(c);
      if (id === c) {
        nNodes++;
        nodeLevel[c] = l - 1;
        nodeRegion[c] = nodeRegion[n];
      } else if (id < m || nodeLevel[id] !== l - 1) {
        throw new HierarchyError('parent tetrahedron found at an inconsistent level');
      }
      nodeInternal[id] = 1;
    };
    for (let k = lp[l]; k < lp[l + 1]; k++) visit(byLevel[k]);
    for (let n = createdStart; n < createdEnd; n++) visit(n);
    createdStart = nextStart;
    createdEnd = nNodes;
  }
  const used = new Uint8Array(nV);
  for (let k = 0; k < mesh.tets.length; k++) used[mesh.tets[k]] = 1;
  for (let v = 0; v < nV; v++) {
    if (newLevel[v] !== -1) continue;
    if (par[2 * v] === NO_PARENT) newLevel[v] = 0;
    else if (used[v]) throw new HierarchyError(`vertex ${v} has parents but no tetrahedron was bisected to create it`);
    else newLevel[v] = -2; // a created vertex no tetrahedron uses: left out of every level
  }
  for (let v = 0; v < nV; v++) {
    if (newLevel[v] <= 0) continue;
    const pa = par[2 * v], pb = par[2 * v + 1];
    // prolongation runs level by level: both parents must exist on the coarser levels
    if (!(newLevel[pa] >= 0 && newLevel[pa] < newLevel[v] && newLevel[pb] >= 0 && newLevel[pb] < newLevel[v])) {
      throw new HierarchyError(`vertex ${v} is older than its parents`);
    }
  }
  return { nNodes, nodeV, nodeLevel, nodeRegion, nodeInternal, newLevel, G };
}

// ---------------------------------------------------------------------------------------------
// Dense Cholesky for the coarse level
// ---------------------------------------------------------------------------------------------

function denseCholesky(n: number, a: Float64Array): void {
  for (let j = 0; j < n; j++) {
    let d = a[j * n + j];
    for (let k = 0; k < j; k++) d -= a[j * n + k] * a[j * n + k];
    if (!(d > 0)) throw new HierarchyError('coarse matrix is not positive definite');
    const ljj = Math.sqrt(d);
    a[j * n + j] = ljj;
    for (let i = j + 1; i < n; i++) {
      let s = a[i * n + j];
      for (let k = 0; k < j; k++) s -= a[i * n + k] * a[j * n + k];
      a[i * n + j] = s / ljj;
    }
  }
}

function choleskySolve(n: number, l: Float64Array, b: Float64Array, x: Float64Array): void {
  for (let i = 0; i < n; i++) {
    let s = b[i];
    for (let k = 0; k < i; k++) s -= l[i * n + k] * x[k];
    x[i] = s / l[i * n + i];
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = x[i];
    for (let k = i + 1; k < n; k++) s -= l[k * n + i] * x[k];
    x[i] = s / l[i * n + i];
  }
}

// ---------------------------------------------------------------------------------------------
// The P1 hierarchy and its V-cycle
// ---------------------------------------------------------------------------------------------

export interface MultigridOptions {
  /** ε per region id; when omitted a homogeneous ε is read off the matrix */
  epsByRegion?: ArrayLike<number>;
  /** largest coarse problem solved by dense Cholesky (default 1500, ~1 s to factor); above it, 20 symmetric Gauss–Seidel sweeps */
  denseCoarseMax?: number;
  /** Gauss–Seidel sweeps on the P2 matrix before and after the P1 correction (default 1) */
  p2Sweeps?: number;
}

export function buildP1Cycle(mesh: TetMesh, interiorIn: Uint8Array, eps: ArrayLike<number>, denseMax: number): P1Cycle {
  const t0 = performance.now();
  const nV = mesh.coords.length / 3;
  const F = buildForest(mesh);
  const { nNodes, nodeV, nodeLevel, nodeRegion, nodeInternal, newLevel, G } = F;
  const interior = new Uint8Array(nV);
  for (let v = 0; v < nV; v++) interior[v] = interiorIn[v] && newLevel[v] >= 0 ? 1 : 0;
  const par = mesh.parents;

  // new interior vertices per level
  const newPtr = new Uint32Array(G + 2);
  for (let v = 0; v < nV; v++) if (interior[v] && newLevel[v] > 0) newPtr[newLevel[v] + 1]++;
  for (let g = 0; g <= G; g++) newPtr[g + 1] += newPtr[g];
  const fillN = newPtr.slice(0, G + 1);
  const newV = new Uint32Array(newPtr[G + 1]);
  for (let v = 0; v < nV; v++) if (interior[v] && newLevel[v] > 0) newV[fillN[newLevel[v]]++] = v;
  const newPa = new Uint32Array(newV.length);
  const newPb = new Uint32Array(newV.length);
  for (let k = 0; k < newV.length; k++) {
    const v = newV[k];
    newPa[k] = par[2 * v];
    newPb[k] = par[2 * v + 1];
  }

  // smoothing rows Ñ_g (g ≥ 1) and the coarse rows (g = 0): sorted vertex lists per level
  const stamp = new Int32Array(nV).fill(-1);
  const rowLevelPtr = new Uint32Array(G + 2);
  // bound: each new vertex contributes itself and two parents
  const rowVTmp = new Uint32Array(3 * newV.length + nV);
  let nRows = 0;
  const coarseList: number[] = [];
  for (let v = 0; v < nV; v++) if (interior[v] && newLevel[v] === 0) coarseList.push(v);
  const coarseV = Uint32Array.from(coarseList);
  for (let k = 0; k < coarseV.length; k++) rowVTmp[nRows++] = coarseV[k];
  rowLevelPtr[1] = nRows;
  for (let g = 1; g <= G; g++) {
    const s = nRows;
    for (let k = newPtr[g]; k < newPtr[g + 1]; k++) {
      for (const u of [newV[k], newPa[k], newPb[k]]) {
        if (interior[u] && stamp[u] !== g) {
          stamp[u] = g;
          rowVTmp[nRows++] = u;
        }
      }
    }
    rowVTmp.subarray(s, nRows).sort();
    rowLevelPtr[g + 1] = nRows;
  }
  const rowV = rowVTmp.slice(0, nRows);

  // vertex → forest nodes incidence
  const vnPtr = new Uint32Array(nV + 1);
  for (let k = 0; k < 4 * nNodes; k++) vnPtr[nodeV[k] + 1]++;
  for (let v = 0; v < nV; v++) vnPtr[v + 1] += vnPtr[v];
  const fillV = vnPtr.slice(0, nV);
  const vn = new Uint32Array(4 * nNodes);
  for (let n = 0; n < nNodes; n++) for (let k = 0; k < 4; k++) vn[fillV[nodeV[4 * n + k]]++] = n;
  const alive = (n: number, g: number): boolean => nodeLevel[n] <= g && (nodeLevel[n] === g || !nodeInternal[n]);

  // pass 1: a bound on the entries (1 + 3 per alive element around the row's vertex)
  let bound = 0;
  for (let g = 0; g <= G; g++) {
    for (let k = rowLevelPtr[g]; k < rowLevelPtr[g + 1]; k++) {
      const u = rowV[k];
      let c = 1;
      for (let p = vnPtr[u]; p < vnPtr[u + 1]; p++) if (alive(vn[p], g)) c += 3;
      bound += c;
    }
  }
  // pass 2: assemble rows
  const rowPtr = new Uint32Array(nRows + 1);
  const colsTmp = new Uint32Array(bound);
  const valsTmp = new Float64Array(bound);
  const acc = new Float64Array(nV);
  const mark = new Int32Array(nV).fill(-1);
  const geom = new Float64Array(GEOM_SIZE);
  const touched = new Uint32Array(64 * 4);
  let nnz = 0;
  for (let g = 0; g <= G; g++) {
    for (let k = rowLevelPtr[g]; k < rowLevelPtr[g + 1]; k++) {
      const u = rowV[k];
      let nt = 0;
      let tbuf = touched;
      for (let p = vnPtr[u]; p < vnPtr[u + 1]; p++) {
        const n = vn[p];
        if (!alive(n, g)) continue;
        const o = 4 * n;
        tetGeometry(mesh.coords, nodeV[o], nodeV[o + 1], nodeV[o + 2], nodeV[o + 3], geom);
        let li = 0;
        while (nodeV[o + li] !== u) li++;
        const e = eps[nodeRegion[n]] * geom[12];
        const gx = geom[3 * li], gy = geom[3 * li + 1], gz = geom[3 * li + 2];
        for (let j = 0; j < 4; j++) {
          const w = nodeV[o + j];
          if (!interior[w]) continue;
          const val = e * (gx * geom[3 * j] + gy * geom[3 * j + 1] + gz * geom[3 * j + 2]);
          if (mark[w] !== k) {
            mark[w] = k;
            acc[w] = 0;
            if (nt === tbuf.length) {
              const bigger = new Uint32Array(2 * tbuf.length);
              bigger.set(tbuf);
              tbuf = bigger;
            }
            tbuf[nt++] = w;
          }
          acc[w] += val;
        }
      }
      const seg = tbuf.subarray(0, nt);
      seg.sort();
      for (let q = 0; q < nt; q++) {
        colsTmp[nnz] = seg[q];
        valsTmp[nnz] = acc[seg[q]];
        nnz++;
      }
      rowPtr[k + 1] = nnz;
    }
  }
  const cols = colsTmp.slice(0, nnz);
  const vals = valsTmp.slice(0, nnz);
  const invDiag = new Float64Array(nRows);
  for (let k = 0; k < nRows; k++) {
    const u = rowV[k];
    for (let p = rowPtr[k]; p < rowPtr[k + 1]; p++) if (cols[p] === u) invDiag[k] = 1 / vals[p];
    if (!(invDiag[k] > 0)) throw new HierarchyError(`level operator has no positive diagonal at vertex ${u}`);
  }

  // coarse solver on the rows of level 0
  const nc = coarseV.length;
  let coarseSolve: (rhs: Float64Array, out: Float64Array) => void;
  if (nc <= denseMax) {
    const idx = new Int32Array(nV).fill(-1);
    for (let i = 0; i < nc; i++) idx[coarseV[i]] = i;
    const dense = new Float64Array(nc * nc);
    for (let i = 0; i < nc; i++) {
      for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) dense[i * nc + idx[cols[p]]] = vals[p];
    }
    denseCholesky(nc, dense);
    const b = new Float64Array(nc), x = new Float64Array(nc);
    coarseSolve = (rhs, out) => {
      for (let i = 0; i < nc; i++) b[i] = rhs[coarseV[i]];
      choleskySolve(nc, dense, b, x);
      for (let i = 0; i < nc; i++) out[coarseV[i]] = x[i];
    };
  } else {
    // symmetric Gauss–Seidel sweeps from zero: a fixed symmetric positive definite approximation
    const sweeps = 20;
    const res = new Float64Array(nV);
    coarseSolve = (rhs, out) => {
      for (let i = 0; i < nc; i++) {
        res[coarseV[i]] = rhs[coarseV[i]];
        out[coarseV[i]] = 0;
      }
      for (let s = 0; s < sweeps; s++) {
        for (let dir = 0; dir < 2; dir++) {
          for (let q = 0; q < nc; q++) {
            const i = dir === 0 ? q : nc - 1 - q;
            const u = coarseV[i];
            const d = res[u] * invDiag[i];
            out[u] += d;
            for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) res[cols[p]] -= vals[p] * d;
          }
        }
      }
    };
  }
  const stats: MultigridStats = {
    levels: G + 1, coarseVertices: nc, forestNodes: nNodes, smoothingRows: nRows - nc, storedEntries: nnz,
    setupSeconds: (performance.now() - t0) / 1000,
  };
  return {
    nV, interior, G, newPtr, newV, newPa, newPb, rowLevelPtr, rowV, rowPtr, cols, vals, invDiag, coarseV, coarseSolve,
    stats,
  };
}

/**
 * One symmetric V-cycle: e ≈ A⁻¹ r on the interior vertices (e = 0 on the boundary).
 * Scratch arrays r, q, s, rs are owned by the caller (sizes nV, nV, rows, rows).
 */
function vcycle(
  c: P1Cycle, rIn: Float64Array, e: Float64Array,
  r: Float64Array, q: Float64Array, s: Float64Array, rs: Float64Array,
): void {
  const { nV, interior, G, newPtr, newV, newPa, newPb, rowLevelPtr, rowV, rowPtr, cols, vals, invDiag } = c;
  for (let v = 0; v < nV; v++) r[v] = interior[v] ? rIn[v] : 0;
  // down: pre-smooth on Ñ_g (forward Gauss–Seidel in residual form), save, restrict
  for (let g = G; g >= 1; g--) {
    const k0 = rowLevelPtr[g], k1 = rowLevelPtr[g + 1];
    for (let k = k0; k < k1; k++) {
      const d = r[rowV[k]] * invDiag[k];
      s[k] = d;
      for (let p = rowPtr[k]; p < rowPtr[k + 1]; p++) r[cols[p]] -= vals[p] * d;
    }
    for (let k = k0; k < k1; k++) rs[k] = r[rowV[k]];
    for (let k = newPtr[g]; k < newPtr[g + 1]; k++) {
      const h = 0.5 * r[newV[k]];
      r[newPa[k]] += h;
      r[newPb[k]] += h;
    }
  }
  e.fill(0);
  c.coarseSolve(r, e);
  // up: prolong, residual at Ñ_g, add the pre-smoothing correction, post-smooth backwards
  for (let g = 1; g <= G; g++) {
    for (let k = newPtr[g]; k < newPtr[g + 1]; k++) {
      const v = newV[k];
      e[v] = interior[newPa[k]] ? 0.5 * e[newPa[k]] : 0;
      if (interior[newPb[k]]) e[v] += 0.5 * e[newPb[k]];
    }
    const k0 = rowLevelPtr[g], k1 = rowLevelPtr[g + 1];
    for (let k = k0; k < k1; k++) {
      let acc = rs[k];
      for (let p = rowPtr[k]; p < rowPtr[k + 1]; p++) acc -= vals[p] * e[cols[p]];
      q[rowV[k]] = acc;
    }
    for (let k = k0; k < k1; k++) e[rowV[k]] += s[k];
    for (let k = k1 - 1; k >= k0; k--) {
      const u = rowV[k];
      const d = q[u] * invDiag[k];
      e[u] += d;
      for (let p = rowPtr[k]; p < rowPtr[k + 1]; p++) q[cols[p]] -= vals[p] * d;
    }
  }
}

/** A homogeneous ε read off the matrix: the ratio of its diagonal to the unit-ε diagonal. */
function inferEps(space: FeSpace, A: Csr): number {
  const unit = diagonal(assembleStiffness(space, new Float64Array(256).fill(1)));
  const d = diagonal(A);
  let num = 0, den = 0;
  for (let i = 0; i < A.n; i++) {
    if (space.boundaryDof[i]) continue;
    num += d[i];
    den += unit[i];
  }
  return den > 0 ? num / den : 1;
}

/**
 * The multigrid preconditioner for the (Dirichlet-lifted) stiffness matrix A of a P1 or P2 space.
 * Boundary rows of A must be identity rows (applyDirichlet makes them so).
 */
export function multigridPreconditioner(
  space: FeSpace, A: Csr, options: MultigridOptions = {},
): Preconditioner & { stats: MultigridStats } {
  const mesh = space.mesh;
  const nV = space.nVertices;
  let eps: ArrayLike<number>;
  if (options.epsByRegion) eps = options.epsByRegion;
  else eps = new Float64Array(256).fill(inferEps(space, A));
  const interior = new Uint8Array(nV);
  for (let v = 0; v < nV; v++) interior[v] = space.boundaryDof[v] ? 0 : 1;
  const cyc = buildP1Cycle(mesh, interior, eps, options.denseCoarseMax ?? 1500);
  const nRows = cyc.rowV.length;
  const r = new Float64Array(nV), q = new Float64Array(nV), e = new Float64Array(nV);
  const s = new Float64Array(nRows), rs = new Float64Array(nRows);

  if (space.order === 1) {
    return {
      name: 'multigrid',
      stats: cyc.stats,
      apply(rIn, z) {
        vcycle(cyc, rIn, e, r, q, s, rs);
        for (let v = 0; v < nV; v++) z[v] = interior[v] ? e[v] : rIn[v];
      },
    };
  }

  // P2: Gauss–Seidel on A, P1 correction through the vertex/edge-midpoint embedding
  const n = A.n;
  const { rowPtr, cols, vals } = A;
  const res = new Float64Array(n);
  const r1 = new Float64Array(nV);
  const edges = space.edges;
  const nE = edges.length / 2;
  const sweeps = options.p2Sweeps ?? 1;
  // Gauss–Seidel in correction form, x_i += (b_i − (A x)_i)/a_ii: no branch on the diagonal in
  // the inner loop, and the same code serves the first sweep from zero and later ones
  const dinv = new Float64Array(n);
  const diagPos = new Uint32Array(n); // columns are sorted: entries before it are the lower part
  for (let i = 0; i < n; i++) {
    for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) {
      if (cols[p] === i) {
        dinv[i] = 1 / vals[p];
        diagPos[i] = p;
      }
    }
    if (!(dinv[i] > 0)) throw new HierarchyError(`P2 matrix row ${i} has no positive diagonal`);
  }
  /**
   * One forward sweep from z = 0 followed by the residual, for the price of one product:
   * the sweep only sees the strictly lower part (later unknowns are still zero), and afterwards
   *   r_i − (A z)_i = (r_i − Σ_{j<i} a_ij z_j) − a_ii z_i − Σ_{j>i} a_ij z_j = −Σ_{j>i} a_ij z_j,
   * the strictly upper part.
   */
  const forwardFromZeroWithResidual = (b: Float64Array, x: Float64Array, out: Float64Array): void => {
    for (let i = 0; i < n; i++) {
      let s = b[i];
      for (let p = rowPtr[i], end = diagPos[i]; p < end; p++) s -= vals[p] * x[cols[p]];
      x[i] = s * dinv[i];
    }
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let p = diagPos[i] + 1, end = rowPtr[i + 1]; p < end; p++) s -= vals[p] * x[cols[p]];
      out[i] = s;
    }
  };
  const gsRow = (b: Float64Array, x: Float64Array, i: number): void => {
    let s0 = b[i];
    let s1 = 0;
    let p = rowPtr[i];
    const end = rowPtr[i + 1];
    for (; p + 1 < end; p += 2) {
      s0 -= vals[p] * x[cols[p]];
      s1 -= vals[p + 1] * x[cols[p + 1]];
    }
    if (p < end) s0 -= vals[p] * x[cols[p]];
    x[i] += (s0 + s1) * dinv[i];
  };
  const gsForward = (b: Float64Array, x: Float64Array): void => {
    for (let i = 0; i < n; i++) gsRow(b, x, i);
  };
  const gsBackward = (b: Float64Array, x: Float64Array): void => {
    for (let i = n - 1; i >= 0; i--) gsRow(b, x, i);
  };
  return {
    name: 'multigrid-p2',
    stats: cyc.stats,
    apply(rIn, z) {
      z.fill(0);
      if (sweeps === 1) forwardFromZeroWithResidual(rIn, z, res);
      else {
        for (let k = 0; k < sweeps; k++) gsForward(rIn, z);
        spmv(A, z, res);
        for (let i = 0; i < n; i++) res[i] = rIn[i] - res[i];
      }
      // restriction to P1: the vertex hat is φ_v + ½ Σ_{edges at v} φ_e in the P2 basis
      for (let v = 0; v < nV; v++) r1[v] = res[v];
      for (let k = 0; k < nE; k++) {
        const h = 0.5 * res[nV + k];
        r1[edges[2 * k]] += h;
        r1[edges[2 * k + 1]] += h;
      }
      vcycle(cyc, r1, e, r, q, s, rs);
      for (let v = 0; v < nV; v++) z[v] += e[v];
      for (let k = 0; k < nE; k++) z[nV + k] += 0.5 * (e[edges[2 * k]] + e[edges[2 * k + 1]]);
      for (let k = 0; k < sweeps; k++) gsBackward(rIn, z);
    },
    block: sweeps === 1 ? (kern) => p2Block(kern, cyc, edges, (rIn, eOut) => vcycle(cyc, rIn, eOut, r, q, s, rs)) : undefined,
  };
}

/**
 * The P2 preconditioner above on k interleaved columns (block-pcg.ts): the two Gauss–Seidel passes
 * stream the matrix once for all columns (block-kernels.ts, same bits per column); restriction,
 * the P1 V-cycle (one column at a time) and prolongation do per column what apply() does.
 */
function p2Block(
  kern: BlockKernels, cyc: P1Cycle, edges: Uint32Array, cycle: (rIn: Float64Array, e: Float64Array) => void,
): (R: Float64Array, Z: Float64Array) => void {
  const { k } = kern;
  const nV = cyc.nV;
  const nE = edges.length / 2;
  const res = kern.vector(BLOCK_SLOTS - 1);
  const R1 = new Float64Array(nV * k), E = new Float64Array(nV * k);
  const r1 = new Float64Array(nV), e = new Float64Array(nV);
  return (R, Z) => {
    kern.gsForwardFromZeroWithResidual(R, Z, res);
    R1.set(res.subarray(0, nV * k));
    for (let c = 0; c < nE; c++) {
      const a = edges[2 * c] * k, b = edges[2 * c + 1] * k, o = (nV + c) * k;
      for (let j = 0; j < k; j++) {
        const h = 0.5 * res[o + j];
        R1[a + j] += h;
        R1[b + j] += h;
      }
    }
    for (let j = 0; j < k; j++) {
      for (let v = 0; v < nV; v++) r1[v] = R1[v * k + j];
      cycle(r1, e);
      for (let v = 0; v < nV; v++) E[v * k + j] = e[v];
    }
    for (let q = 0; q < nV * k; q++) Z[q] += E[q];
    for (let c = 0; c < nE; c++) {
      const a = edges[2 * c] * k, b = edges[2 * c + 1] * k, o = (nV + c) * k;
      for (let j = 0; j < k; j++) Z[o + j] += 0.5 * (E[a + j] + E[b + j]);
    }
    kern.gsBackward(R, Z);
  };
}
