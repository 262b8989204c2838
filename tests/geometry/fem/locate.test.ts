/**
 * The point locator (geometry/fem/locate.ts): each point's element found once per mesh, every
 * field evaluated there. Checks: P1 reproduces a linear function and P2 a quadratic one exactly
 * at arbitrary points (polynomial reproduction of Lagrange elements; any FEM text, e.g. Ciarlet
 * 1978, from memory); the element found really contains the point; the result equals the
 * O(tets × points) scan that the locator replaced (kept here as the reference) on the same points; points on vertices are
 * deterministic; points outside the mesh give NaN.
 */
import { describe, expect, it } from 'vitest';
import { kuhnBox, refineUniform, toTetMesh } from '../../../geometry/mesh/index';
import { buildSpace } from '../../../geometry/fem/space';
import { interpolate } from '../../../geometry/fem/assemble';
import { locatePoints, valuesAtPoints } from '../../../geometry/fem/locate';
import { GEOM_SIZE, p2BasisBary, tetGeometry } from '../../../geometry/fem/reference';
import type { FeSpace } from '../../../geometry/fem/space';

function mesh() {
  const bm = kuhnBox({ center: [0.5, -1, 2], halfExtents: [3, 2, 2.5], cells: [4, 3, 5] });
  refineUniform(bm, 2, {});
  return toTetMesh(bm);
}

/** Deterministic pseudo-random points in [lo, hi]³ per axis (a linear congruential generator; common practice). */
function points(n: number, lo: number[], hi: number[]): Float64Array {
  let s = 12345;
  const r = () => ((s = (s * 1103515245 + 12345) % 2147483648) / 2147483648);
  const p = new Float64Array(3 * n);
  for (let i = 0; i < n; i++) for (let a = 0; a < 3; a++) p[3 * i + a] = lo[a] + (hi[a] - lo[a]) * r();
  return p;
}

describe('locatePoints and valuesAtPoints', () => {
  const m = mesh();
  const pts = points(200, [-2.5, -3, -0.5], [3.5, 1, 4.5]);

  it('P1 reproduces a linear function and P2 a quadratic one at arbitrary points (polynomial reproduction)', () => {
    const lin = (x: number, y: number, z: number) => 1.5 + 0.3 * x - 2 * y + 0.7 * z;
    const quad = (x: number, y: number, z: number) => lin(x, y, z) + x * y - 0.5 * z * z + 0.25 * x * x;
    const loc = locatePoints(m, pts);
    for (const [order, f] of [[1, lin], [2, quad]] as const) {
      const space = buildSpace(m, order);
      const v = valuesAtPoints(space, loc, interpolate(space, f));
      for (let p = 0; p < 200; p++) expect(Math.abs(v[p] - f(pts[3 * p], pts[3 * p + 1], pts[3 * p + 2]))).toBeLessThan(1e-12);
    }
  });

  it('every point lies in the element found (barycentric coordinates ≥ 0, sum 1, and they map back to the point)', () => {
    const loc = locatePoints(m, pts);
    for (let p = 0; p < 200; p++) {
      const t = loc.tet[p];
      expect(t).toBeGreaterThanOrEqual(0);
      let sum = 0;
      const x = [0, 0, 0];
      for (let k = 0; k < 4; k++) {
        const l = loc.bary[4 * p + k];
        expect(l).toBeGreaterThanOrEqual(-1e-10);
        sum += l;
        for (let a = 0; a < 3; a++) x[a] += l * m.coords[3 * m.tets[4 * t + k] + a];
      }
      expect(sum).toBeCloseTo(1, 12);
      for (let a = 0; a < 3; a++) expect(x[a]).toBeCloseTo(pts[3 * p + a], 10);
    }
  });

  it('agrees with the scan over all elements (the former split.ts valuesAt) on a non-polynomial field', () => {
    const space = buildSpace(m, 2);
    const phi = interpolate(space, (x, y, z) => Math.sin(x) * Math.exp(0.3 * y) + Math.cos(z));
    const a = valuesAtPoints(space, locatePoints(m, pts), phi);
    const b = valuesAt(space, phi, pts);
    for (let p = 0; p < 200; p++) expect(Math.abs(a[p] - b[p])).toBeLessThan(1e-12);
  });

  it('points on vertices, edges and faces: the same element on every call (deterministic), and the right value', () => {
    // mesh vertices themselves, shared by many elements
    const pv = m.coords.slice(0, 3 * 50);
    const l1 = locatePoints(m, pv), l2 = locatePoints(m, pv);
    expect(Array.from(l1.tet)).toEqual(Array.from(l2.tet));
    const space = buildSpace(m, 1);
    const f = (x: number, y: number, z: number) => x - 3 * y + 2 * z;
    const v = valuesAtPoints(space, l1, interpolate(space, f));
    for (let p = 0; p < 50; p++) expect(v[p]).toBeCloseTo(f(pv[3 * p], pv[3 * p + 1], pv[3 * p + 2]), 12);
  });

  it('a point outside the mesh: tet −1 and NaN; a single point and an empty list work', () => {
    const space = buildSpace(m, 1);
    const phi = interpolate(space, () => 1);
    const loc = locatePoints(m, Float64Array.from([0, 0, 1, 100, 0, 0]));
    expect(loc.tet[0]).toBeGreaterThanOrEqual(0);
    expect(loc.tet[1]).toBe(-1);
    const v = valuesAtPoints(space, loc, phi);
    expect(v[0]).toBeCloseTo(1, 14);
    expect(Number.isNaN(v[1])).toBe(true);
    expect(locatePoints(m, new Float64Array(0)).tet.length).toBe(0);
  });
});

/**
 * Values of a finite-element function at points (3 per point), by locating each point's element
 * (a scan with a bounding-box test; the first element found wins, which is harmless because the
 * function is continuous). NaN for a point outside the mesh.
 */
function valuesAt(space: FeSpace, phi: Float64Array, points: Float64Array): Float64Array {
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
