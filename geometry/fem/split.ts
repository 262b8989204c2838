/**
 * The free-space / reaction-field split (issue 11), as in the decomposition methods of
 * biomolecular Poisson solvers (e.g. I.-L. Chern, J.-G. Liu & W.-C. Wang, Methods Appl. Anal. 10
 * (2003) 309; M. Holst, J. A. McCammon et al., J. Comput. Phys. 231 (2012) 4427 — both from
 * memory): the potential of site i's unit density is
 *
 *     φ_i = φ_s + φ_r,    φ_s = V_i(x)/ε_i    (the closed form in an infinite host of ε_i, the
 *                                              permittivity of the site's own layer)
 *
 * and, since −∇·(ε_i ∇φ_s) = 4πρ_i everywhere, the remainder solves (for all v vanishing on the
 * Dirichlet parts)
 *
 *     ∫ ε ∇φ_r·∇v = −∫ (ε − ε_i) ∇φ_s·∇v,
 *     φ_r = g − φ_s on the box walls (g: boundary.ts),   φ_r = −φ_s on electrodes (held at 0).
 *
 * The right-hand side lives only where ε ≠ ε_i (other layers), away from the charge; the wall
 * values are smooth. So φ_r is smooth near the site and a coarse mesh resolves it: no grading to
 * the nucleus. Then
 *
 *     U_i  = selfEnergy_i/ε_i + ∫ρ_i φ_r,i
 *     V_ij = ½ (P_ij/ε_i + ∫ρ_j φ_r,i + P_ij/ε_j + ∫ρ_i φ_r,j)
 *
 * with P_ij the closed-form free-space interaction (geometry/density pairEnergy). Both closed forms
 * are over all space (the density outside the box included); the remainders over the mesh.
 *
 * In a homogeneous host without electrodes φ_r is harmonic in the whole box, and by the mean-value
 * property of harmonic functions (Gauss; e.g. Jackson §1.8 problem, or any text on potential
 * theory — from memory) a spherically symmetric unit density sees exactly its centre's value:
 * ∫ρ_j φ_r = φ_r(p_j) (up to the density outside the box, which the budget's density cut counts).
 * So there the remainders are read at the site centres (valuesAt) and no density load is needed;
 * with layers or electrodes (where φ_r is not harmonic across an interface or into metal) the
 * integrals use the density loads (load.ts).
 *
 * ∇φ_s = −Q(r) (x − p)/(ε_i r³) by Gauss's law, Q(r) the charge of the density within radius r:
 *   hydrogenic 1s: Q = 1 − e^{−t}(1 + t + t²/2),  t = 2r/a  (integral of the 1s density; textbook)
 *   Gaussian:      Q = erf(w) − (2/√π) w e^{−w²},  w = r/(σ√2)  (standard)
 */
import type { Orbital, Vec3 } from '../design/types';
import { erf, pairEnergy, potentialAt, radialPotential, selfEnergy } from '../density';
import type { TetMesh } from '../mesh/types';
import { GEOM_SIZE, mapBary, p2BasisBary, p2GradientsBary, tetGeometry, tetQuadrature } from './reference';
import type { FeSpace } from './space';
import { ELECTRODE_REGION } from '../mesh/device';

/** Exact degree of the rule for the right-hand side (∇φ_s smooth where it is integrated; common practice). */
export const SPLIT_RHS_DEGREE = 6;

/** The split needs a closed-form potential (the spherical models). */
export function hasClosedForm(orbital: Orbital): boolean {
  return radialPotential(orbital, 1) !== null;
}

/** The split of a pair needs a closed-form interaction of the two densities. */
export function pairClosedForm(o1: Orbital, o2: Orbital, R: number): number | null {
  return pairEnergy(o1, o2, R);
}

/** Free-space self-energy (εr = 1, nm⁻¹). */
export function freeSelfEnergy(orbital: Orbital): number {
  return selfEnergy(orbital);
}

/** Charge of the unit density within radius r of its centre (spherical models; NaN otherwise). */
export function enclosedCharge(orbital: Orbital, r: number): number {
  switch (orbital.model) {
    case 'hydrogenic-1s': {
      const t = (2 * r) / orbital.radiusNm;
      return -Math.expm1(-t) - Math.exp(-t) * (t + 0.5 * t * t);
    }
    case 'gaussian': {
      const w = r / (orbital.sigmaNm * Math.SQRT2);
      return erf(w) - (2 / Math.sqrt(Math.PI)) * w * Math.exp(-w * w);
    }
    default:
      return Number.NaN;
  }
}

/** φ_s = V(x)/ε_i at a point (nm⁻¹). */
export function singularPotential(orbital: Orbital, center: Vec3, epsSite: number, x: number, y: number, z: number): number {
  return potentialAt(orbital, center, x, y, z) / epsSite;
}

/**
 * b_k = −∫ (ε − ε_i) ∇φ_s·∇v_k over every element whose ε differs from ε_i (electrode elements
 * excluded: all their dofs are Dirichlet). `mesh` carries the device regions (device.ts).
 */
export function reactionRhs(
  space: FeSpace,
  mesh: TetMesh,
  eps: ArrayLike<number>,
  epsSite: number,
  orbital: Orbital,
  center: Vec3,
): Float64Array {
  const { order, nTets, tetDofs } = space;
  const nLoc = space.dofsPerTet;
  const b = new Float64Array(space.nDofs);
  const rule = tetQuadrature(SPLIT_RHS_DEGREE);
  const g = new Float64Array(GEOM_SIZE);
  const x = new Float64Array(3);
  const grad = new Float64Array(30);
  const l = new Float64Array(4);
  const coords = mesh.coords, tets = mesh.tets;
  for (let t = 0; t < nTets; t++) {
    const r = mesh.tetRegion[t];
    if (r === ELECTRODE_REGION) continue;
    const de = eps[r] - epsSite;
    if (de === 0) continue;
    const a = tets[4 * t], bb = tets[4 * t + 1], c = tets[4 * t + 2], d = tets[4 * t + 3];
    tetGeometry(coords, a, bb, c, d, g);
    const vol = g[12];
    if (order === 1) for (let i = 0; i < 12; i++) grad[i] = g[i];
    for (let q = 0; q < rule.n; q++) {
      for (let k = 0; k < 4; k++) l[k] = rule.bary[4 * q + k];
      mapBary(coords, a, bb, c, d, l, x);
      const dx = x[0] - center[0], dy = x[1] - center[1], dz = x[2] - center[2];
      const rr = Math.sqrt(dx * dx + dy * dy + dz * dz);
      if (rr === 0) continue;
      // ∇φ_s = −Q(r)(x − p)/(ε_i r³)
      const f = -enclosedCharge(orbital, rr) / (epsSite * rr * rr * rr);
      const w = -de * rule.weights[q] * 6 * vol; // reference weights sum to 1/6
      if (order === 2) p2GradientsBary(l, g, grad);
      for (let i = 0; i < nLoc; i++) {
        b[tetDofs[nLoc * t + i]] += w * f * (dx * grad[3 * i] + dy * grad[3 * i + 1] + dz * grad[3 * i + 2]);
      }
    }
  }
  return b;
}

/**
 * Values of a finite-element function at points (3 per point), by locating each point's element
 * (a scan with a bounding-box test; the first element found wins, which is harmless because the
 * function is continuous). NaN for a point outside the mesh.
 */
export function valuesAt(space: FeSpace, phi: Float64Array, points: Float64Array): Float64Array {
  const { mesh, order, nTets, tetDofs } = space;
  const nLoc = space.dofsPerTet;
  const coords = mesh.coords, tets = mesh.tets;
  const np = points.length / 3;
  const out = new Float64Array(np).fill(Number.NaN);
  const g = new Float64Array(GEOM_SIZE);
  const l = new Float64Array(4);
  const basis = new Float64Array(10);
  const EPS_BARY = -1e-12;
  let left = np;
  for (let t = 0; t < nTets && left > 0; t++) {
    const a = tets[4 * t], b = tets[4 * t + 1], c = tets[4 * t + 2], d = tets[4 * t + 3];
    let lo0 = Infinity, lo1 = Infinity, lo2 = Infinity, hi0 = -Infinity, hi1 = -Infinity, hi2 = -Infinity;
    for (const v of [a, b, c, d]) {
      lo0 = Math.min(lo0, coords[3 * v]); hi0 = Math.max(hi0, coords[3 * v]);
      lo1 = Math.min(lo1, coords[3 * v + 1]); hi1 = Math.max(hi1, coords[3 * v + 1]);
      lo2 = Math.min(lo2, coords[3 * v + 2]); hi2 = Math.max(hi2, coords[3 * v + 2]);
    }
    let geom = false;
    for (let p = 0; p < np; p++) {
      if (!Number.isNaN(out[p])) continue;
      const x = points[3 * p], y = points[3 * p + 1], z = points[3 * p + 2];
      if (x < lo0 - 1e-9 || x > hi0 + 1e-9 || y < lo1 - 1e-9 || y > hi1 + 1e-9 || z < lo2 - 1e-9 || z > hi2 + 1e-9) continue;
      if (!geom) {
        tetGeometry(coords, a, b, c, d, g);
        geom = true;
      }
      const dx = x - g[13], dy = y - g[14], dz = z - g[15];
      l[1] = g[3] * dx + g[4] * dy + g[5] * dz;
      l[2] = g[6] * dx + g[7] * dy + g[8] * dz;
      l[3] = g[9] * dx + g[10] * dy + g[11] * dz;
      l[0] = 1 - l[1] - l[2] - l[3];
      if (l[0] < EPS_BARY || l[1] < EPS_BARY || l[2] < EPS_BARY || l[3] < EPS_BARY) continue;
      let v = 0;
      if (order === 1) {
        for (let i = 0; i < 4; i++) v += l[i] * phi[tetDofs[4 * t + i]];
      } else {
        p2BasisBary(l, basis);
        for (let i = 0; i < 10; i++) v += basis[i] * phi[tetDofs[nLoc * t + i]];
      }
      out[p] = v;
      left--;
    }
  }
  return out;
}
