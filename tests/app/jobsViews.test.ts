/**
 * The pure parts of the jobs screens: per-element values of the mesh viewer, the design changes of a comparison, the
 * bond graph's plane, and the requests the order picker sends.
 *
 * Sources of the checks:
 * - a linear function's mean over a tetrahedron's four vertices is its value at the centroid (the centroid is the
 *   mean of the vertices; linearity);
 * - Kuhn's triangulation of a cube (H. W. Kuhn, IBM J. Res. Dev. 4 (1960) 518–524): 6 congruent tetrahedra, so a
 *   shape measure takes one value on all six; the cube's longest segment in each is the main diagonal, √3·edge;
 * - distances by Pythagoras (a move by (0.3, 0.4, 0) nm is 0.5 nm);
 * - the job contract (server/contracts/api.ts, issue 10): `{ kind, options: { order?, adaptive?, sweep? } }`.
 */
import { describe, expect, it } from 'vitest';
import { jobCreateBodySchema } from '@contracts/api';
import type { DesignDocument } from '@contracts/design';
import { computeTetQuality } from '../../geometry/mesh/quality';
import { kuhnBox, toTetMesh } from '../../geometry/mesh';
import { decodePotential, elementMean, histogram, range, sizeAgainstDistance } from '../../app/src/features/jobs/meshFields';
import { describeChanges, diffDesigns } from '../../app/src/features/jobs/designDiff';
import { bondPlane, layoutSites } from '../../app/src/features/jobs/bondLayout';
import { actionBodies } from '../../app/src/features/jobs/runActions';

const grid = toTetMesh(kuhnBox({ center: [0, 0, 0], halfExtents: [2, 2, 2], cells: [4, 4, 4] }));
const m = grid.tets.length / 4;

describe('mesh viewer values', () => {
  it('the element mean of a linear vertex field is its value at the centroid', () => {
    const nV = grid.coords.length / 3;
    const f = new Float64Array(nV);
    for (let v = 0; v < nV; v++) f[v] = 2 * grid.coords[3 * v] - 3 * grid.coords[3 * v + 1] + 0.5 * grid.coords[3 * v + 2] + 1;
    const mean = elementMean(grid, f);
    for (let t = 0; t < m; t++) {
      const c = [0, 1, 2].map((k) => [0, 1, 2, 3].reduce((s, i) => s + grid.coords[3 * grid.tets[4 * t + i] + k], 0) / 4);
      expect(mean[t]).toBeCloseTo(2 * c[0] - 3 * c[1] + 0.5 * c[2] + 1, 12);
    }
  });

  it('Kuhn tetrahedra are congruent: one bin holds every mean ratio; sizes are the cube diagonal √3 nm', () => {
    const q = computeTetQuality(grid);
    const h = histogram(q.meanRatio, 0, 1, 20);
    expect(h.reduce((a, b) => a + b, 0)).toBe(m);
    expect(h.filter((c) => c > 0)).toEqual([m]);
    const [lo, hi] = range(q.longestEdge);
    expect(lo).toBeCloseTo(Math.sqrt(3), 12);
    expect(hi).toBeCloseTo(Math.sqrt(3), 12);
  });

  it('histogram puts values outside the range into the end bins and skips non-numbers', () => {
    expect(histogram([-5, 0, 0.49, 0.5, 1, 7, NaN], 0, 1, 2)).toEqual([3, 3]);
  });

  it('size against distance: the distance from each sampled centroid to the nearest site, at most maxPoints points', () => {
    const size = new Float64Array(m).map((_, t) => t);
    const sites = [[0, 0, 0], [10, 0, 0]] as const;
    const pts = sizeAgainstDistance(grid, size, sites, 50);
    expect(pts.length).toBeLessThanOrEqual(50);
    expect(pts.length).toBeGreaterThan(40);
    const stride = Math.ceil(m / 50);
    pts.forEach((p, k) => {
      const t = k * stride;
      const c = [0, 1, 2].map((j) => [0, 1, 2, 3].reduce((s, i) => s + grid.coords[3 * grid.tets[4 * t + i] + j], 0) / 4);
      // every centroid lies in the box |x| ≤ 2 nm, so the site at the origin is the nearer one
      expect(p.distanceNm).toBeCloseTo(Math.hypot(c[0], c[1], c[2]), 12);
      expect(p.sizeNm).toBe(t);
    });
    expect(sizeAgainstDistance(grid, size, [])).toEqual([]);
  });

  it('potential.f64 is read little-endian, one value per vertex; a file of the wrong length is refused in words', () => {
    const bytes = new Uint8Array(24);
    const view = new DataView(bytes.buffer);
    [0.125, -3.5, 1e-3].forEach((v, i) => view.setFloat64(8 * i, v, true));
    expect(Array.from(decodePotential(bytes, 3))).toEqual([0.125, -3.5, 1e-3]);
    expect(() => decodePotential(bytes, 4)).toThrow('the potential file holds 3 values for a mesh of 4 vertices');
  });
});

const base: DesignDocument = {
  format: 'tetrawell-design',
  version: 1,
  name: 'Three donors (invented)',
  host: { material: 'Si', epsilonR: 11.7, latticeConstantNm: 0.5431020511 },
  sites: [
    { id: 'a', species: 'P', position: [0, 0, 0], electrons: 1 },
    { id: 'b', species: 'P', position: [1, 0, 0], electrons: 1 },
    { id: 'c', species: 'As', position: [2, 0, 0], electrons: 1 },
  ],
  domain: { center: [0, 0, 0], halfExtentsNm: [12, 12, 12], boundary: { kind: 'multipole', order: 2 } },
  refinement: { order: 2, targetRelError: 0.01, maxElements: 100000 },
};

describe('design changes between two revisions', () => {
  it('the same document: no changes', () => {
    expect(describeChanges(diffDesigns(base, structuredClone(base)))).toEqual([]);
  });

  it('sites added, removed, moved (by the Pythagorean distance) and changed; box, host and refinement', () => {
    const next: DesignDocument = {
      ...base,
      sites: [
        { id: 'a', species: 'P', position: [0.3, 0.4, 0], electrons: 1 },
        { id: 'c', species: 'Sb', position: [2, 0, 0], electrons: 0 },
        { id: 'd', species: 'P', position: [3, 0, 0], electrons: 1 },
      ],
      domain: { center: [0, 0, 1], halfExtentsNm: [14, 12, 12], boundary: { kind: 'grounded' } },
      host: { ...base.host, epsilonR: 11.4 },
      refinement: { ...base.refinement, order: 1 },
    };
    const c = diffDesigns(base, next);
    expect(c.added).toEqual(['d']);
    expect(c.removed).toEqual(['b']);
    expect(c.moved).toHaveLength(1);
    expect(c.moved[0].id).toBe('a');
    expect(c.moved[0].distanceNm).toBeCloseTo(0.5, 12);
    expect(c.changed).toEqual([{ id: 'c', what: ['species As → Sb', 'electrons 1 → 0'] }]);
    const lines = describeChanges(c);
    expect(lines).toContain('1 site added: d');
    expect(lines).toContain('1 site removed: b');
    expect(lines).toContain('1 site moved: a by 0.5 nm');
    expect(lines).toContain('box: half-extents 12 × 12 × 12 nm → 14 × 12 × 12 nm');
    expect(lines).toContain('box: centre (0, 0, 0) nm → (0, 0, 1) nm');
    expect(lines).toContain('box: multipole walls of order 2 → grounded walls');
    expect(lines).toContain('host: relative permittivity 11.7 → 11.4 (no unit)');
    expect(lines).toContain('refinement: default order P2 → P1');
  });
});

describe('bond graph plane', () => {
  it('drops the axis along which the sites spread least, and scales both kept axes alike', () => {
    expect(bondPlane([[0, 0, 0], [1, 0, 0], [0, 2, 0]])).toEqual([0, 1]);
    expect(bondPlane([[0, 0, 0], [0, 0, 3], [0, 2, 0]])).toEqual([1, 2]);
    expect(bondPlane([[0, 0, 0], [1, 5, 0.5]])).toEqual([0, 1]);
    expect(bondPlane([[0, 0, 0], [0.2, 5, 1]])).toEqual([1, 2]);
    const sites = [
      { id: 'a', position: [0, 0, 0] as const },
      { id: 'b', position: [3, 0, 0] as const },
      { id: 'c', position: [0, 4, 0] as const },
    ];
    const { points, pxPerNm } = layoutSites(sites, 500, 300, 20);
    const d = (i: number, j: number) => Math.hypot(points[i].x - points[j].x, points[i].y - points[j].y);
    // 3-4-5 triangle: pixel distances keep the nm proportions
    expect(d(0, 1) / pxPerNm).toBeCloseTo(3, 9);
    expect(d(0, 2) / pxPerNm).toBeCloseTo(4, 9);
    expect(d(1, 2) / pxPerNm).toBeCloseTo(5, 9);
    for (const p of points) {
      expect(p.x).toBeGreaterThanOrEqual(20 - 1e-9);
      expect(p.y).toBeLessThanOrEqual(300 - 20 + 1e-9);
    }
  });
});

describe('order picker requests', () => {
  it('every start button sends the picked order; only U and V takes the adaptive switch; each body fits the contract', () => {
    for (const order of [1, 2] as const)
      for (const adaptive of [false, true]) {
        const bodies = actionBodies(order, adaptive);
        expect(bodies.map((b) => b.body)).toEqual([
          { kind: 'mesh', options: { order } },
          { kind: 'coulomb', options: { order, adaptive } },
          { kind: 'convergence', options: { order, sweep: 'refinement' } },
          { kind: 'convergence', options: { order, sweep: 'box' } },
        ]);
        for (const b of bodies) expect(jobCreateBodySchema.parse(b.body)).toEqual(b.body);
      }
  });
});
