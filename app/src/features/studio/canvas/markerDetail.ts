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

/**
 * Site spheres: fine up to SPHERE_COARSE_ABOVE sites in the whole design, coarse above. The choice
 * goes by the total, not by each species' count: five species of 2,000 sites each are as many
 * spheres as one of 10,000, and must not be drawn finer.
 */
export const SPHERE_COARSE_ABOVE = 2000;

/** sphere width and height segment counts when the design has `totalSites` sites */
export function sphereSegments(totalSites: number): { width: number; height: number } {
  return totalSites > SPHERE_COARSE_ABOVE ? { width: 8, height: 6 } : { width: 16, height: 12 };
}
