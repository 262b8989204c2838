/**
 * Dirichlet values on the domain for the potential φ_i of one site's unit density ρ_i.
 *
 *   grounded   φ = 0 on the box. The simplest choice; it lowers U by roughly the potential the
 *              charge would have on the walls (≈ 1/(εr·L) for a centred charge in a box of
 *              half-width L), which the far-field bound (geometry/farfield) accounts for.
 *   multipole  φ = the free-space potential of ρ_i truncated after order ℓmax of its multipole
 *              expansion about the site's own centre, evaluated at every boundary dof:
 *
 *                  φ(x) = (1/εr) Σ_{ℓ ≤ ℓmax} Σ_m Q_ℓm I_ℓm(x − p_i)
 *
 *              (real solid harmonics, Racah normalisation; moments and the evaluation come from
 *              geometry/farfield, so the check and the solver use the same expansion). For the
 *              spherical models everything beyond ℓ = 0 vanishes about the centre, so the
 *              boundary values are exactly 1/(εr·|x − p_i|).
 *
 * Expanding about the site's own centre (not the domain centre) keeps the omitted orders as
 * small as the density's own shape allows, whatever the site's position in the box.
 */
import type { Boundary, Orbital, Vec3 } from '../design/types';
import { MAX_ORDER, multipolePotential, orbitalMoments } from '../farfield';

export { MAX_ORDER as MAX_MULTIPOLE_ORDER };

/**
 * Dirichlet values at the boundary dofs for the potential of one unit-charge density.
 * Returns a full-length vector (nDofs), zero at interior dofs, ready for the lifting step.
 */
export function boundaryValues(
  boundary: Boundary,
  orbital: Orbital,
  center: Vec3,
  epsilonR: number,
  dofCoords: Float64Array,
  boundaryDof: Uint8Array,
): Float64Array {
  const n = boundaryDof.length;
  const g = new Float64Array(n);
  if (boundary.kind === 'grounded') return g;
  const order = boundary.order;
  if (!(Number.isInteger(order) && order >= 0 && order <= MAX_ORDER)) {
    throw new RangeError(`multipole boundary order ${order} is outside 0..${MAX_ORDER}`);
  }
  const moments = orbitalMoments(orbital, center, center, order);
  const inv = 1 / epsilonR;
  for (let i = 0; i < n; i++) {
    if (!boundaryDof[i]) continue;
    const x = dofCoords[3 * i], y = dofCoords[3 * i + 1], z = dofCoords[3 * i + 2];
    if (x === center[0] && y === center[1] && z === center[2]) {
      throw new RangeError('a site lies on the domain boundary: multipole boundary values are undefined there');
    }
    g[i] = inv * multipolePotential(moments, order, center, x, y, z);
  }
  return g;
}
