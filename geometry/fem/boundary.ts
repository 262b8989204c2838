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
import { imageSeries, seriesAt, type ImageSeries } from '../host/images';
import { regionOf, ON_INTERFACE_NM } from '../host/stack';
import type { PlanarStack } from '../host/types';

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

/**
 * Dirichlet values for a multipole box in a layered host (issue 11): the point-charge Green's
 * function of the design's planar stack (geometry/host images.ts: Jackson, Classical
 * Electrodynamics 3rd ed., §4.4 image and transmitted charges, exact for two half-spaces, a
 * truncated series with a rigorous tail bound for a slab or between metal planes),
 *
 *     φ(x) = G(x, p_i),   −∇·(εr ∇G) = 4π δ(x − p_i),
 *
 * i.e. order 0 of the layered far field: the site's total (unit) charge at its centre. For the
 * spherical models every image of the density is the same density at the image point, so outside
 * the density (and its images) this is their exact potential; for the anisotropic model the higher
 * moments are left out (the caller says so). Dofs with `mask` 0 get 0 (interior, or electrodes,
 * which the caller sets). A dof within ON_INTERFACE_NM of an interface is evaluated just below it
 * (G is continuous across an interface). Returns the values and the largest tail bound of the
 * series used (nm⁻¹), or null with the host's finding code when the stack has no series.
 */
export function layeredBoundaryValues(
  stack: PlanarStack,
  center: Vec3,
  dofCoords: Float64Array,
  mask: Uint8Array,
): { g: Float64Array; tailBound: number } | { g: null; code: string } {
  const n = mask.length;
  const g = new Float64Array(n);
  const cache = new Map<number, ImageSeries>();
  let tail = 0;
  for (let i = 0; i < n; i++) {
    if (!mask[i]) continue;
    let z = dofCoords[3 * i + 2];
    if (regionOf(stack, z) < 0) z -= 2 * ON_INTERFACE_NM;
    let series = cache.get(z);
    if (!series) {
      const r = imageSeries(stack, center[2], z);
      if (!r.series) return { g: null, code: r.findings[0]?.code ?? 'no-series' };
      series = r.series;
      cache.set(z, series);
      tail = Math.max(tail, series.tailBound);
    }
    const s = Math.hypot(dofCoords[3 * i] - center[0], dofCoords[3 * i + 1] - center[1]);
    g[i] = seriesAt(series, s);
  }
  return { g, tailBound: tail };
}
