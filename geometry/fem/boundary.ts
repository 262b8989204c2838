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
import { harmonicCount, irregularHarmonics, MAX_ORDER, multipolePotential, orbitalMoments } from '../farfield';
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
 * Dirichlet values for a multipole box in a layered host (issue 11): the site's multipole
 * expansion up to the order of `source.boundary` (the design's) carried through the image series of the
 * design's planar stack (geometry/host images.ts: Jackson, Classical Electrodynamics 3rd ed.,
 * §4.4 image and transmitted charges, exact for two half-spaces, a truncated series with a
 * rigorous tail bound for a slab or between metal planes).
 *
 * Order 0 is the point-charge Green's function, φ(x) = G(x, p_i) with −∇·(εr ∇G) = 4π δ(x − p_i).
 * Beyond it: each image of the series is the source density copied or mirrored in z (images.ts
 * header), with the same factor c_k, so its far field is the source's multipole expansion
 * (Jackson §4.1) about the image centre X_k = (p_x, p_y, Z_k), with the moments of the mirrored
 * density where the image is mirrored. Reflecting z → 2z₀ − z maps a real solid harmonic R_ℓm
 * (Racah normalisation, cos/sin basis, geometry/farfield harmonics.ts) to (−1)^{ℓ+m} R_ℓm, hence
 * Q_ℓm → (−1)^{ℓ+m} Q_ℓm (`mirrorMoments`; tested against the point images of displaced charges):
 *
 *     φ(x) = (1/ε_s) Σ_k c_k Σ_{ℓ ≤ L} Σ_m Q^{(k)}_ℓm I_ℓm(x − X_k).
 *
 * For the spherical models every moment beyond ℓ = 0 vanishes about the centre, so every order
 * gives the order-0 values (same numbers, same path); the anisotropic envelope gets its even
 * moments. Images far enough that their ℓ ≥ 1 terms are below SKIP_TOLERANCE_NM1 keep order 0;
 * what they leave out is bounded (|Σ_m Q_ℓm I_ℓm(r)| ≤ ‖Q_ℓ‖₂ / r^{ℓ+1}: Cauchy–Schwarz and the
 * addition theorem Σ_m R_ℓm(r)² = r^{2ℓ}) and added to the returned tail bound.
 * Dofs with `mask` 0 get 0 (interior, or electrodes, which the caller sets). A dof within
 * ON_INTERFACE_NM of an interface is evaluated just below it (G is continuous across an
 * interface). Returns the values and the largest tail bound (nm⁻¹, the series' truncation plus
 * the skipped orders), or null with the host's finding code when the stack has no series.
 */
export function layeredBoundaryValues(
  stack: PlanarStack,
  center: Vec3,
  dofCoords: Float64Array,
  mask: Uint8Array,
  source?: { orbital: Orbital; boundary: Boundary },
): LayeredWalls {
  if (source && source.boundary.kind === 'multipole' && source.boundary.order > 0) {
    const order = checkedOrder(source.boundary.order);
    const moments = orbitalMoments(source.orbital, center, center, order);
    let higher = false;
    for (let i = 1; i < moments.length; i++) if (moments[i] !== 0) higher = true;
    if (higher) return layeredMultipoleValues(stack, center, moments, order, dofCoords, mask);
  }
  const g = new Float64Array(mask.length);
  let tail = 0;
  const code = eachWallDof(stack, center[2], dofCoords, mask, (i, _z, series) => {
    tail = Math.max(tail, series.tailBound);
    g[i] = seriesAt(series, Math.hypot(dofCoords[3 * i] - center[0], dofCoords[3 * i + 1] - center[1]));
  });
  return code === null ? { g, tailBound: tail } : { g: null, code };
}

/**
 * Calls `visit` for every dof with `mask` set, with its height (nudged ON_INTERFACE_NM below an
 * interface it sits on) and the stack's image series for a source at `sourceZ` seen at that
 * height (one series per height, kept). Returns null, or the host's finding code when the stack
 * has no series (then some dofs were not visited).
 */
function eachWallDof(
  stack: PlanarStack,
  sourceZ: number,
  dofCoords: Float64Array,
  mask: Uint8Array,
  visit: (i: number, z: number, series: ImageSeries) => void,
): string | null {
  const cache = new Map<number, ImageSeries>();
  for (let i = 0; i < mask.length; i++) {
    if (!mask[i]) continue;
    let z = dofCoords[3 * i + 2];
    if (regionOf(stack, z) < 0) z -= 2 * ON_INTERFACE_NM;
    let series = cache.get(z);
    if (!series) {
      const r = imageSeries(stack, sourceZ, z);
      if (!r.series) return r.findings[0]?.code ?? 'no-series';
      series = r.series;
      cache.set(z, series);
    }
    visit(i, z, series);
  }
  return null;
}

export type LayeredWalls = { g: Float64Array; tailBound: number } | { g: null; code: string };

/** An image whose ℓ ≥ 1 terms are at most this (nm⁻¹) keeps order 0 (common practice: the series' own tolerance). */
export const SKIP_TOLERANCE_NM1 = 1e-12;

function checkedOrder(order: number): number {
  if (!(Number.isInteger(order) && order >= 0 && order <= MAX_ORDER)) {
    throw new RangeError(`multipole boundary order ${order} is outside 0..${MAX_ORDER}`);
  }
  return order;
}

/**
 * Moments of the density mirrored in z about its expansion centre: Q_ℓm → (−1)^{ℓ+m} Q_ℓm
 * (R_ℓm(x, y, −z) = (−1)^{ℓ+m} R_ℓm(x, y, z) in the cos/sin basis, harmonics.ts; m < 0 is the
 * sine part of order |m|, and (−1)^m = (−1)^{|m|}).
 */
export function mirrorMoments(moments: Float64Array, order: number, out?: Float64Array): Float64Array {
  const res = out ?? new Float64Array(harmonicCount(order));
  for (let l = 0; l <= order; l++) for (let m = -l; m <= l; m++) {
    const i = l * l + l + m;
    res[i] = (l + m) % 2 === 0 ? moments[i] : -moments[i];
  }
  return res;
}

/**
 * Wall values of a source with multipole moments `moments` (about `center`, up to `order`, total
 * charge moments[0]) in the stack: every image of the series carries the moments, mirrored where
 * the image is (see layeredBoundaryValues). Same mask, interface nudge and return as there.
 */
export function layeredMultipoleValues(
  stack: PlanarStack,
  center: Vec3,
  moments: Float64Array,
  order: number,
  dofCoords: Float64Array,
  mask: Uint8Array,
): LayeredWalls {
  checkedOrder(order);
  const nh = harmonicCount(order);
  const copy = moments.slice(0, nh);
  const mirrored = mirrorMoments(copy, order);
  // ‖Q_ℓ‖₂ per order: the bound of an image's ℓ ≥ 1 terms
  const norm = new Float64Array(order + 1);
  for (let l = 1; l <= order; l++) {
    let s2 = 0;
    for (let m = -l; m <= l; m++) s2 += copy[l * l + l + m] ** 2;
    norm[l] = Math.sqrt(s2);
  }
  const q0 = copy[0];
  const ih = new Float64Array(nh);
  const g = new Float64Array(mask.length);
  let tail = 0;
  const code = eachWallDof(stack, center[2], dofCoords, mask, (i, z, series) => {
    const dx = dofCoords[3 * i] - center[0];
    const dy = dofCoords[3 * i + 1] - center[1];
    const s2 = dx * dx + dy * dy;
    let sum = 0;
    let skipped = 0;
    // far images first, as seriesAt does (small terms added first lose less)
    for (let k = series.count - 1; k >= 0; k--) {
      const c = series.coef[k];
      const dz = z - series.imageZ[k];
      const d2 = s2 + dz * dz;
      const d = Math.sqrt(d2);
      let hob = 0;
      let dl = d;
      for (let l = 1; l <= order; l++) {
        dl *= d;
        hob += norm[l] / dl;
      }
      const rest = series.scale * Math.abs(c) * hob;
      if (rest <= SKIP_TOLERANCE_NM1) {
        sum += (c * q0) / d;
        skipped += rest;
        continue;
      }
      irregularHarmonics(dx, dy, dz, order, ih);
      const q = series.mirror[k] ? mirrored : copy;
      let v = 0;
      for (let j = 0; j < nh; j++) v += q[j] * ih[j];
      sum += c * v;
    }
    g[i] = series.scale * sum;
    tail = Math.max(tail, Math.abs(q0) * series.tailBound + skipped);
  });
  return code === null ? { g, tailBound: tail } : { g: null, code };
}
