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
 * φ_r,i is harmonic wherever ε = ε_i (no charge of its own there), so by the mean-value property
 * of harmonic functions a spherically symmetric unit density whose support lies (up to a negligible
 * tail) in such a ball sees exactly its centre's value, ∫ρ_j φ_r,i = φ_r,i(p_j): the rule and its
 * source are in mean-value.ts, and coulomb-level.ts reads those sites at their centres (located once
 * per mesh, locate.ts) without a density load; elsewhere (a site near an interface, an electrode or
 * a wall, or in a layer of another εr) the integrals use the density loads (load.ts).
 *
 * ∇φ_s = −Q(r) (x − p)/(ε_i r³) by Gauss's law, Q(r) the charge of the density within radius r:
 *   hydrogenic 1s: Q = 1 − e^{−t}(1 + t + t²/2),  t = 2r/a  (integral of the 1s density; textbook)
 *   Gaussian:      Q = erf(w) − (2/√π) w e^{−w²},  w = r/(σ√2)  (standard)
 */
import type { Orbital, Vec3 } from '../design/types';
import { orbitalModel, pairEnergy, potentialAt, radialPotential, selfEnergy, type OrbitalModel } from '../density';
import type { TetMesh } from '../mesh/types';
import { GEOM_SIZE, mapBary, p2GradientsBary, tetGeometry, tetQuadrature } from './reference';
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

/**
 * Charge of the unit density within radius r of its centre (spherical models; NaN otherwise): the
 * registry's answer (geometry/density/models.ts), kept here under its old name for the split's callers.
 */
export { enclosedCharge } from '../density';

/** φ_s = V(x)/ε_i at a point (nm⁻¹). */
export function singularPotential(orbital: Orbital, center: Vec3, epsSite: number, x: number, y: number, z: number): number {
  return potentialAt(orbital, center, x, y, z) / epsSite;
}

/** One site of a batch of reaction right-hand sides. */
export interface ReactionSource {
  orbital: Orbital;
  center: Vec3;
  /** ε_i, the permittivity of the site's own layer */
  epsSite: number;
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
  return reactionRhsBatch(space, mesh, eps, [{ orbital, center, epsSite }])[0];
}

/**
 * An element at least 1/FAR_RULE_RATIO of its size from a site takes the 15-point rule of degree
 * FAR_RHS_DEGREE for that site instead of SPLIT_RHS_DEGREE's 80 points: ∇φ_s is analytic there
 * with derivatives of order m about m!/r^{m+2}, so a degree-5 rule errs by about (h/r)^6 ≲ 2e-4
 * of the element's share (Taylor remainder; common practice), and in a device most elements of
 * the other layers lie many sizes away from every site. Size = the bounding box's diagonal,
 * distance = from the site to the bounding box (both conservative).
 */
export const FAR_RULE_RATIO = 4;
export const FAR_RHS_DEGREE = 5;
/**
 * Farther still, at least VERY_FAR_RULE_RATIO sizes away, the 4-point rule of degree 2 errs by
 * about (h/r)^3 ≤ 16^-3 ≈ 2.4e-4 of the element's share: the same bound as the 15-point rule at 4 sizes.
 */
export const VERY_FAR_RULE_RATIO = 16;
export const VERY_FAR_RHS_DEGREE = 2;

/**
 * reactionRhs for many sites in one pass over the elements: the quadrature points and the basis
 * gradients of an element are computed once per rule and shared by every site (the same sums per
 * site, in the same order, as one site alone).
 */
export function reactionRhsBatch(space: FeSpace, mesh: TetMesh, eps: ArrayLike<number>, sources: readonly ReactionSource[]): Float64Array[] {
  const { order, nTets, tetDofs } = space;
  const nLoc = space.dofsPerTet;
  const ns = sources.length;
  // each source's registry entry, looked up once: the hot loop below asks it for Q(r)
  const models: OrbitalModel[] = sources.map((src) => orbitalModel(src.orbital));
  const out = sources.map(() => new Float64Array(space.nDofs));
  // rules by distance: 0 very far (4 points), 1 far (15), 2 near (80)
  const rules = [tetQuadrature(VERY_FAR_RHS_DEGREE), tetQuadrature(FAR_RHS_DEGREE), tetQuadrature(SPLIT_RHS_DEGREE)];
  const g = new Float64Array(GEOM_SIZE);
  const x = new Float64Array(3);
  const grad = new Float64Array(30);
  const l = new Float64Array(4);
  const coords = mesh.coords, tets = mesh.tets;
  const de = new Float64Array(ns);
  // which rule each site takes on the current element: 0 very far, 1 far, 2 near, −1 none (same ε)
  const ruleOf = new Int8Array(ns);
  // each site's element vector, summed over the rule's points before one scatter into b
  const loc = new Float64Array(ns * nLoc);
  const lo = new Float64Array(3), hi = new Float64Array(3);
  for (let t = 0; t < nTets; t++) {
    const r = mesh.tetRegion[t];
    if (r === ELECTRODE_REGION) continue;
    const a = tets[4 * t], bb = tets[4 * t + 1], c = tets[4 * t + 2], d = tets[4 * t + 3];
    let diag2 = 0;
    for (let k = 0; k < 3; k++) {
      const x0 = coords[3 * a + k], x1 = coords[3 * bb + k], x2 = coords[3 * c + k], x3 = coords[3 * d + k];
      lo[k] = Math.min(x0, x1, x2, x3);
      hi[k] = Math.max(x0, x1, x2, x3);
      diag2 += (hi[k] - lo[k]) * (hi[k] - lo[k]);
    }
    let any = false;
    for (let s = 0; s < ns; s++) {
      de[s] = eps[r] - sources[s].epsSite;
      if (de[s] === 0) {
        ruleOf[s] = -1;
        continue;
      }
      any = true;
      const p = sources[s].center;
      let dist2 = 0;
      for (let k = 0; k < 3; k++) {
        const e = p[k] < lo[k] ? lo[k] - p[k] : p[k] > hi[k] ? p[k] - hi[k] : 0;
        dist2 += e * e;
      }
      ruleOf[s] = dist2 >= VERY_FAR_RULE_RATIO * VERY_FAR_RULE_RATIO * diag2 ? 0 : dist2 >= FAR_RULE_RATIO * FAR_RULE_RATIO * diag2 ? 1 : 2;
    }
    if (!any) continue;
    tetGeometry(coords, a, bb, c, d, g);
    const vol = g[12];
    if (order === 1) for (let i = 0; i < 12; i++) grad[i] = g[i];
    loc.fill(0);
    for (let ri = 0; ri < rules.length; ri++) {
      let used = false;
      for (let s = 0; s < ns && !used; s++) if (ruleOf[s] === ri) used = true;
      if (!used) continue;
      const rule = rules[ri];
      for (let q = 0; q < rule.n; q++) {
        for (let k = 0; k < 4; k++) l[k] = rule.bary[4 * q + k];
        mapBary(coords, a, bb, c, d, l, x);
        if (order === 2) p2GradientsBary(l, g, grad);
        const wq = rule.weights[q] * 6 * vol; // reference weights sum to 1/6
        for (let s = 0; s < ns; s++) {
          if (ruleOf[s] !== ri) continue;
          const src = sources[s];
          const dx = x[0] - src.center[0], dy = x[1] - src.center[1], dz = x[2] - src.center[2];
          const rr = Math.sqrt(dx * dx + dy * dy + dz * dz);
          if (rr === 0) continue;
          // ∇φ_s = −Q(r)(x − p)/(ε_i r³)
          const f = -(models[s].enclosedCharge(src.orbital, rr) ?? Number.NaN) / (src.epsSite * rr * rr * rr);
          const w = -de[s] * wq * f;
          const wx = w * dx, wy = w * dy, wz = w * dz;
          const o = s * nLoc;
          for (let i = 0; i < nLoc; i++) loc[o + i] += wx * grad[3 * i] + wy * grad[3 * i + 1] + wz * grad[3 * i + 2];
        }
      }
    }
    for (let s = 0; s < ns; s++) {
      if (ruleOf[s] < 0) continue;
      const b = out[s], o = s * nLoc;
      for (let i = 0; i < nLoc; i++) b[tetDofs[nLoc * t + i]] += loc[o + i];
    }
  }
  return out;
}
