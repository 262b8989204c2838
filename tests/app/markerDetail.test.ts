/**
 * Warning rings at large counts: the triangle count per ring is checked against three.js's own
 * TorusGeometry (the reference library the canvas draws with), and the budget for 10,000 warned
 * sites (under a million triangles for the rings) is common practice for software WebGL.
 */
import { describe, expect, it } from 'vitest';
import { SphereGeometry, TorusGeometry } from 'three';
import { RING_COARSE_ABOVE, ringSegments, SPHERE_COARSE_ABOVE, sphereSegments, torusTriangles } from '../../app/src/features/studio/canvas/markerDetail';

describe('warning ring detail', () => {
  it('counts triangles as three.js builds them', () => {
    for (const n of [10, 10_000]) {
      const seg = ringSegments(n);
      const g = new TorusGeometry(1, 0.1, seg.radial, seg.tubular);
      expect(g.index!.count / 3).toBe(torusTriangles(seg));
    }
  });
  it('keeps 10,000 rings under a million triangles and few rings smooth', () => {
    expect(10_000 * torusTriangles(ringSegments(10_000))).toBeLessThan(1_000_000);
    expect(torusTriangles(ringSegments(RING_COARSE_ABOVE))).toBeGreaterThanOrEqual(256);
  });
});

describe('site sphere detail', () => {
  // triangles counted from three.js's own SphereGeometry (index count / 3)
  const triangles = (total: number) => {
    const seg = sphereSegments(total);
    return new SphereGeometry(1, seg.width, seg.height).index!.count / 3;
  };
  it('draws 10,000 sites under a million triangles, however they split into species', () => {
    // five species of 2,000 are 10,000 spheres too: the detail follows the design's total
    expect(10_000 * triangles(10_000)).toBeLessThan(1_000_000);
    expect(sphereSegments(10_000)).toEqual(sphereSegments(SPHERE_COARSE_ABOVE + 1));
  });
  it('keeps small designs smooth and their total modest', () => {
    expect(triangles(SPHERE_COARSE_ABOVE)).toBeGreaterThanOrEqual(300);
    expect(SPHERE_COARSE_ABOVE * triangles(SPHERE_COARSE_ABOVE)).toBeLessThan(1_000_000);
  });
});
