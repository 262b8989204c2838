/**
 * How finely the warning rings and site spheres are drawn. All warning rings are one instanced
 * mesh (one draw call), but each instance repeats the whole torus: at 10,000 warned sites a 8×32
 * torus alone is 5.1 M triangles. Above RING_COARSE_ABOVE rings a coarse torus (3×12, still read
 * as a ring at the size a site has on screen when that many are shown) keeps the total near 0.7 M.
 */
export const RING_COARSE_ABOVE = 500;

/** torus tube (radial) and ring (tubular) segment counts for `count` warning rings */
export function ringSegments(count: number): { radial: number; tubular: number } {
  return count > RING_COARSE_ABOVE ? { radial: 3, tubular: 12 } : { radial: 8, tubular: 32 };
}

/** triangles three.js's TorusGeometry makes: two per (radial × tubular) quad */
export function torusTriangles(seg: { radial: number; tubular: number }): number {
  return 2 * seg.radial * seg.tubular;
}
