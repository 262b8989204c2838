/**
 * Assembly of stiffness, mass and load on an FeSpace, and Dirichlet lifting.
 *
 * Units follow geometry/units.ts: the caller solves −∇·(εr∇φ) = 4πρ, so the stiffness is
 * ∫ εr ∇φ_i·∇φ_j and the load is 4π ∫ ρ φ_i (the 4π is the caller's, not ours).
 *
 * Each element's geometry (∇λ, volume) is computed once by tetGeometry and shared by all the
 * integrals of that element (assembleSystem does stiffness and load in one pass).
 */
import { cooperate, COOPERATE_MASK } from '../cooperate';
import type { FeSpace } from './space';
import { type Csr, sparsityPattern, withValues } from './csr';
import { NeumaierSum } from '../mesh/check';
import {
  GEOM_SIZE, P2_STIFFNESS_TENSOR, SYM4_INDEX, type TetRule, p2BasisBary, p2GradientsBary, tetGeometry,
  tetQuadrature,
} from './reference';

/** A function evaluated at quadrature points: physical point (nm) and the element index. */
export type PointFunction = (x: number, y: number, z: number, tet: number) => number;

const patternCache = new WeakMap<FeSpace, Csr>();

/** The sparsity pattern of a space, built once and shared by every matrix on it. */
export function spacePattern(space: FeSpace): Csr {
  let p = patternCache.get(space);
  if (!p) {
    p = sparsityPattern(space.tetDofs, space.dofsPerTet, space.nDofs);
    patternCache.set(space, p);
  }
  return p;
}

function epsOf(epsByRegion: ArrayLike<number>, region: number): number {
  const e = epsByRegion[region];
  if (!(e > 0)) throw new Error(`no positive permittivity for region ${region}`);
  return e;
}

const gramScratch = new Float64Array(10);

/**
 * Local stiffness of one element into K (nLoc × nLoc, row-major), scaled by eps.
 * g: geometry record from tetGeometry.
 */
export function localStiffness(order: 1 | 2, g: Float64Array, eps: number, K: Float64Array): void {
  const vol = g[12];
  if (order === 1) {
    for (let i = 0; i < 4; i++) {
      for (let j = i; j < 4; j++) {
        const v = eps * vol * (g[3 * i] * g[3 * j] + g[3 * i + 1] * g[3 * j + 1] + g[3 * i + 2] * g[3 * j + 2]);
        K[4 * i + j] = v;
        K[4 * j + i] = v;
      }
    }
    return;
  }
  const G = gramScratch;
  for (let p = 0; p < 4; p++) {
    for (let q = p; q < 4; q++) {
      G[SYM4_INDEX[p][q]] = g[3 * p] * g[3 * q] + g[3 * p + 1] * g[3 * q + 1] + g[3 * p + 2] * g[3 * q + 2];
    }
  }
  const S = P2_STIFFNESS_TENSOR;
  const c = eps * vol;
  for (let i = 0; i < 10; i++) {
    for (let j = i; j < 10; j++) {
      const o = (i * 10 + j) * 10;
      let v = 0;
      for (let s = 0; s < 10; s++) v += S[o + s] * G[s];
      K[10 * i + j] = c * v;
      K[10 * j + i] = c * v;
    }
  }
}

/** Basis values at the points of a rule, nLoc per point (cached per rule and order). */
const basisCache = new WeakMap<TetRule, Float64Array[]>();
export function basisAtRule(rule: TetRule, order: 1 | 2): Float64Array {
  let entry = basisCache.get(rule);
  if (!entry) {
    entry = [];
    basisCache.set(rule, entry);
  }
  if (!entry[order]) {
    const n = order === 1 ? 4 : 10;
    const out = new Float64Array(n * rule.n);
    const tmp = new Float64Array(10);
    for (let q = 0; q < rule.n; q++) {
      const l = rule.bary.subarray(4 * q, 4 * q + 4);
      if (order === 1) out.set(l, 4 * q);
      else {
        p2BasisBary(l, tmp);
        out.set(tmp, 10 * q);
      }
    }
    entry[order] = out;
  }
  return entry[order];
}

/**
 * Add the local matrix K of one element into A. The element's dofs are sorted once (insertion
 * sort of ≤ 10 entries); each local row then finds all its columns in one forward walk over the
 * sorted CSR row, instead of a search per entry.
 */
const order10 = new Int32Array(10);
/**
 * Physical coordinates of all quadrature points of element (a, b, c, d) into out (3 per point),
 * without allocating: the load and integral loops call this once per element.
 */
function quadPoints(coords: Float64Array, a: number, b: number, c: number, d: number, rule: TetRule, out: Float64Array): void {
  const l = rule.bary;
  const ax = 3 * a, bx = 3 * b, cx = 3 * c, dx = 3 * d;
  for (let q = 0; q < rule.n; q++) {
    const l0 = l[4 * q], l1 = l[4 * q + 1], l2 = l[4 * q + 2], l3 = l[4 * q + 3];
    for (let k = 0; k < 3; k++) out[3 * q + k] = l0 * coords[ax + k] + l1 * coords[bx + k] + l2 * coords[cx + k] + l3 * coords[dx + k];
  }
}

function scatter(A: Csr, dofs: Uint32Array, base: number, nLoc: number, K: Float64Array): void {
  const ord = order10;
  for (let a = 0; a < nLoc; a++) {
    const d = dofs[base + a];
    let j = a - 1;
    while (j >= 0 && dofs[base + ord[j]] > d) {
      ord[j + 1] = ord[j];
      j--;
    }
    ord[j + 1] = a;
  }
  const { rowPtr, cols, vals } = A;
  for (let i = 0; i < nLoc; i++) {
    let p = rowPtr[dofs[base + i]];
    const end = rowPtr[dofs[base + i] + 1];
    const rowK = nLoc * i;
    for (let q = 0; q < nLoc; q++) {
      const a = ord[q];
      const d = dofs[base + a];
      while (p < end && cols[p] < d) p++;
      if (p === end || cols[p] !== d) throw new Error(`sparsity pattern has no entry (${dofs[base + i]}, ${d})`);
      vals[p] += K[rowK + a];
    }
  }
}

export interface SystemOptions {
  /** right-hand-side density f: the load is ∫ f φ_i; omitted → zero load */
  load?: PointFunction;
  /** exact degree of the load quadrature (default 2·order + 1) */
  degree?: number;
}

/**
 * Stiffness ∫ ε ∇φ_i·∇φ_j (ε per region id) and, optionally, the load ∫ f φ_i, in one pass over
 * the elements so that each element's geometry is computed once.
 */
export function assembleSystem(
  space: FeSpace, epsByRegion: ArrayLike<number>, options: SystemOptions = {},
): { A: Csr; b: Float64Array } {
  const { mesh, order, nTets, tetDofs } = space;
  const nLoc = space.dofsPerTet;
  const A = withValues(spacePattern(space), new Float64Array(spacePattern(space).cols.length));
  const b = new Float64Array(space.nDofs);
  const g = new Float64Array(GEOM_SIZE);
  const K = new Float64Array(nLoc * nLoc);
  const rule = tetQuadrature(options.degree ?? 2 * order + 1);
  const phi = basisAtRule(rule, order);
  const x = new Float64Array(3 * rule.n);
  const tets = mesh.tets;
  for (let t = 0; t < nTets; t++) {
    if ((t & COOPERATE_MASK) === 0) cooperate();
    const a = tets[4 * t], bb = tets[4 * t + 1], c = tets[4 * t + 2], d = tets[4 * t + 3];
    tetGeometry(mesh.coords, a, bb, c, d, g);
    localStiffness(order, g, epsOf(epsByRegion, mesh.tetRegion[t]), K);
    scatter(A, tetDofs, nLoc * t, nLoc, K);
    if (options.load) {
      const jac = 6 * g[12];
      quadPoints(mesh.coords, a, bb, c, d, rule, x);
      for (let q = 0; q < rule.n; q++) {
        const f = options.load(x[3 * q], x[3 * q + 1], x[3 * q + 2], t) * rule.weights[q] * jac;
        if (f === 0) continue;
        for (let i = 0; i < nLoc; i++) b[tetDofs[nLoc * t + i]] += f * phi[nLoc * q + i];
      }
    }
  }
  return { A, b };
}

/** Stiffness matrix ∫ ε ∇φ_i·∇φ_j with ε per region id (Float64Array indexed by tetRegion). */
export function assembleStiffness(space: FeSpace, epsByRegion: ArrayLike<number>): Csr {
  return assembleSystem(space, epsByRegion).A;
}

/** Load vector ∫ f φ_i with a rule of the given exact degree (default 2·order + 1). */
export function assembleLoad(space: FeSpace, f: PointFunction, degree?: number): Float64Array {
  const { mesh, order, nTets, tetDofs } = space;
  const nLoc = space.dofsPerTet;
  const rule = tetQuadrature(degree ?? 2 * order + 1);
  const phi = basisAtRule(rule, order);
  const b = new Float64Array(space.nDofs);
  const g = new Float64Array(GEOM_SIZE);
  const x = new Float64Array(3 * rule.n);
  for (let t = 0; t < nTets; t++) {
    if ((t & COOPERATE_MASK) === 0) cooperate();
    const a = mesh.tets[4 * t], bb = mesh.tets[4 * t + 1], c = mesh.tets[4 * t + 2], d = mesh.tets[4 * t + 3];
    tetGeometry(mesh.coords, a, bb, c, d, g);
    const jac = 6 * g[12];
    quadPoints(mesh.coords, a, bb, c, d, rule, x);
    for (let q = 0; q < rule.n; q++) {
      const w = f(x[3 * q], x[3 * q + 1], x[3 * q + 2], t) * rule.weights[q] * jac;
      if (w === 0) continue;
      for (let i = 0; i < nLoc; i++) b[tetDofs[nLoc * t + i]] += w * phi[nLoc * q + i];
    }
  }
  return b;
}

/**
 * Mass matrix ∫ w φ_i φ_j (w = 1 when omitted), by a rule exact for degree 2·order (+ the
 * weight's degree, given as `degree`).
 */
export function assembleMass(space: FeSpace, weight?: PointFunction, degree?: number): Csr {
  const { mesh, order, nTets, tetDofs } = space;
  const nLoc = space.dofsPerTet;
  const rule = tetQuadrature(degree ?? 2 * order);
  const phi = basisAtRule(rule, order);
  const A = withValues(spacePattern(space), new Float64Array(spacePattern(space).cols.length));
  const g = new Float64Array(GEOM_SIZE);
  const K = new Float64Array(nLoc * nLoc);
  const x = new Float64Array(3 * rule.n);
  for (let t = 0; t < nTets; t++) {
    if ((t & COOPERATE_MASK) === 0) cooperate();
    const a = mesh.tets[4 * t], bb = mesh.tets[4 * t + 1], c = mesh.tets[4 * t + 2], d = mesh.tets[4 * t + 3];
    tetGeometry(mesh.coords, a, bb, c, d, g);
    const jac = 6 * g[12];
    K.fill(0);
    if (weight) quadPoints(mesh.coords, a, bb, c, d, rule, x);
    for (let q = 0; q < rule.n; q++) {
      let w = rule.weights[q] * jac;
      if (weight) w *= weight(x[3 * q], x[3 * q + 1], x[3 * q + 2], t);
      for (let i = 0; i < nLoc; i++) {
        const wi = w * phi[nLoc * q + i];
        for (let j = 0; j < nLoc; j++) K[nLoc * i + j] += wi * phi[nLoc * q + j];
      }
    }
    scatter(A, tetDofs, nLoc * t, nLoc, K);
  }
  return A;
}

/** ∫ f over the mesh with a rule of the given exact degree (e.g. the discrete charge of a density). */
export function integrate(space: FeSpace, f: PointFunction, degree: number): number {
  const { mesh, nTets } = space;
  const rule = tetQuadrature(degree);
  const g = new Float64Array(GEOM_SIZE);
  const x = new Float64Array(3 * rule.n);
  const sum = new NeumaierSum(); // millions of small positive terms
  for (let t = 0; t < nTets; t++) {
    if ((t & COOPERATE_MASK) === 0) cooperate();
    const a = mesh.tets[4 * t], bb = mesh.tets[4 * t + 1], c = mesh.tets[4 * t + 2], d = mesh.tets[4 * t + 3];
    tetGeometry(mesh.coords, a, bb, c, d, g);
    let s = 0;
    quadPoints(mesh.coords, a, bb, c, d, rule, x);
    for (let q = 0; q < rule.n; q++) s += f(x[3 * q], x[3 * q + 1], x[3 * q + 2], t) * rule.weights[q];
    sum.add(6 * g[12] * s);
  }
  return sum.value;
}

/**
 * ∫ fn(x, y, z, u_h, ∇u_h) over the mesh for a finite-element function u (nodal values per dof):
 * error norms, energies, recovered quantities. Gradients are physical.
 */
export function feIntegrate(
  space: FeSpace, u: Float64Array, degree: number,
  fn: (x: number, y: number, z: number, uh: number, gx: number, gy: number, gz: number, tet: number) => number,
): number {
  const { mesh, order, nTets, tetDofs } = space;
  const nLoc = space.dofsPerTet;
  const rule = tetQuadrature(degree);
  const phi = basisAtRule(rule, order);
  const g = new Float64Array(GEOM_SIZE);
  const grad = new Float64Array(30);
  const l4 = new Float64Array(4);
  const x = new Float64Array(3 * rule.n);
  const sum = new NeumaierSum();
  for (let t = 0; t < nTets; t++) {
    if ((t & COOPERATE_MASK) === 0) cooperate();
    const a = mesh.tets[4 * t], bb = mesh.tets[4 * t + 1], c = mesh.tets[4 * t + 2], d = mesh.tets[4 * t + 3];
    tetGeometry(mesh.coords, a, bb, c, d, g);
    let s = 0;
    quadPoints(mesh.coords, a, bb, c, d, rule, x);
    if (order === 1) for (let k = 0; k < 12; k++) grad[k] = g[k];
    for (let q = 0; q < rule.n; q++) {
      for (let k = 0; k < 4; k++) l4[k] = rule.bary[4 * q + k];
      if (order === 2) p2GradientsBary(l4, g, grad);
      let uh = 0, gx = 0, gy = 0, gz = 0;
      for (let i = 0; i < nLoc; i++) {
        const ui = u[tetDofs[nLoc * t + i]];
        uh += ui * phi[nLoc * q + i];
        gx += ui * grad[3 * i];
        gy += ui * grad[3 * i + 1];
        gz += ui * grad[3 * i + 2];
      }
      s += rule.weights[q] * fn(x[3 * q], x[3 * q + 1], x[3 * q + 2], uh, gx, gy, gz, t);
    }
    sum.add(6 * g[12] * s);
  }
  return sum.value;
}

/** Nodal interpolant of f: its value at every dof node. */
export function interpolate(space: FeSpace, f: (x: number, y: number, z: number) => number): Float64Array {
  const u = new Float64Array(space.nDofs);
  const c = space.dofCoords;
  for (let i = 0; i < space.nDofs; i++) u[i] = f(c[3 * i], c[3 * i + 1], c[3 * i + 2]);
  return u;
}

/**
 * Dirichlet conditions by symmetric lifting: with known values g on the boundary dofs,
 *   b_i ← b_i − Σ_{j ∈ boundary} A_ij g_j   for interior rows i,
 * then the boundary rows and columns are cleared and given a unit diagonal, and b = g there.
 * The result stays symmetric positive definite, the numbering is unchanged, and a solution of
 * the modified system has exactly the boundary values g. Returns new arrays (inputs untouched).
 */
export function applyDirichlet(
  A: Csr, b: Float64Array, boundaryDof: Uint8Array, g?: ArrayLike<number>,
): { A: Csr; b: Float64Array } {
  const vals = A.vals.slice();
  const out = b.slice();
  const { n, rowPtr, cols } = A;
  for (let i = 0; i < n; i++) {
    if (boundaryDof[i]) {
      for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) vals[k] = cols[k] === i ? 1 : 0;
      out[i] = g ? g[i] : 0;
      continue;
    }
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      const j = cols[k];
      if (boundaryDof[j]) {
        if (g) out[i] -= vals[k] * g[j];
        vals[k] = 0;
      }
    }
  }
  return { A: withValues(A, vals), b: out };
}

/**
 * The right-hand side of applyDirichlet alone, for one more load on a matrix already lifted:
 * pass the ORIGINAL (unlifted) matrix A. With many right-hand sides (one per site) this avoids
 * copying the matrix values for each of them; the lifted matrix from the first call is reused.
 */
export function applyDirichletRhs(
  A: Csr, b: Float64Array, boundaryDof: Uint8Array, g?: ArrayLike<number>,
): Float64Array {
  const out = b.slice();
  const { n, rowPtr, cols, vals } = A;
  for (let i = 0; i < n; i++) {
    if (boundaryDof[i]) {
      out[i] = g ? g[i] : 0;
      continue;
    }
    if (!g) continue;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      const j = cols[k];
      if (boundaryDof[j]) out[i] -= vals[k] * g[j];
    }
  }
  return out;
}
