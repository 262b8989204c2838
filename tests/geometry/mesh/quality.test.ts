import { describe, expect, it } from 'vitest';
import { computeMeanRatio, computeTetQuality, qualityReport } from '../../../geometry/mesh/quality';
import { makeMesh, kuhnGrid, lcg, regularTet } from './check.fixtures';
import { kuhnBox, refine, refineUniform, toTetMesh } from '../../../geometry/mesh/index';
import type { TetMesh } from '../../../geometry/mesh/types';

type V3 = [number, number, number];
const sub = (a: V3, b: V3): V3 => [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
const dot = (a: V3, b: V3) => a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
const scale = (a: V3, s: number): V3 => [a[0] * s, a[1] * s, a[2] * s];

/**
 * Dihedral angle at edge (p, q) measured directly: project the two opposite vertices onto the
 * plane perpendicular to the edge and take the angle between the projections (elementary
 * geometry; independent of the face-normal formula in quality.ts).
 */
function dihedralByProjection(p: V3, q: V3, r: V3, s: V3): number {
  const e = sub(q, p);
  const ee = dot(e, e);
  const perp = (x: V3) => {
    const d = sub(x, p);
    return sub(d, scale(e, dot(d, e) / ee));
  };
  const a = perp(r);
  const b = perp(s);
  return (Math.acos(dot(a, b) / Math.sqrt(dot(a, a) * dot(b, b))) * 180) / Math.PI;
}

function allDihedrals(mesh: TetMesh, t: number): number[] {
  const P = [0, 1, 2, 3].map((i) => {
    const v = mesh.tets[4 * t + i];
    return [mesh.coords[3 * v], mesh.coords[3 * v + 1], mesh.coords[3 * v + 2]] as V3;
  });
  const out: number[] = [];
  for (let i = 0; i < 4; i++) for (let j = i + 1; j < 4; j++) {
    const [k, l] = [0, 1, 2, 3].filter((x) => x !== i && x !== j);
    out.push(dihedralByProjection(P[i], P[j], P[k], P[l]));
  }
  return out;
}

/**
 * Mean ratio from its definition (Liu & Joe 1994; also Knupp, SIAM J. Sci. Comput. 23 (2001)):
 * S = J·W⁻¹ maps the regular tet onto the element, η = 3·det(S)^(2/3) / ‖S‖_F².
 */
function meanRatioByJacobian(P: V3[]): number {
  const J = [sub(P[1], P[0]), sub(P[2], P[0]), sub(P[3], P[0])]; // columns
  // regular tet with unit edges: columns of W
  const W = [
    [1, 0, 0],
    [0.5, Math.sqrt(3) / 2, 0],
    [0.5, Math.sqrt(3) / 6, Math.sqrt(2 / 3)],
  ];
  // W as a matrix with columns w_i: Wm[r][c] = W[c][r]; invert it (3×3 cofactors)
  const M = [0, 1, 2].map((r) => [0, 1, 2].map((c) => W[c][r]));
  const det3 = (A: number[][]) =>
    A[0][0] * (A[1][1] * A[2][2] - A[1][2] * A[2][1]) - A[0][1] * (A[1][0] * A[2][2] - A[1][2] * A[2][0]) + A[0][2] * (A[1][0] * A[2][1] - A[1][1] * A[2][0]);
  const dM = det3(M);
  const inv = [0, 1, 2].map((r) =>
    [0, 1, 2].map((c) => {
      const rows = [0, 1, 2].filter((x) => x !== c);
      const cols = [0, 1, 2].filter((x) => x !== r);
      const minor = M[rows[0]][cols[0]] * M[rows[1]][cols[1]] - M[rows[0]][cols[1]] * M[rows[1]][cols[0]];
      return ((r + c) % 2 ? -1 : 1) * (minor / dM);
    }),
  );
  const Jm = [0, 1, 2].map((r) => [0, 1, 2].map((c) => J[c][r]));
  const S = [0, 1, 2].map((r) => [0, 1, 2].map((c) => Jm[r][0] * inv[0][c] + Jm[r][1] * inv[1][c] + Jm[r][2] * inv[2][c]));
  const fro2 = S.flat().reduce((s, x) => s + x * x, 0);
  return (3 * Math.cbrt(det3(S)) ** 2) / fro2;
}

describe('tet quality measures', () => {
  it('the regular tetrahedron scores 1 and has all dihedral angles arccos(1/3) ≈ 70.53° (standard geometry)', () => {
    const q = computeTetQuality(regularTet());
    const ref = (Math.acos(1 / 3) * 180) / Math.PI;
    expect(q.meanRatio[0]).toBeCloseTo(1, 12);
    expect(q.radiusRatio[0]).toBeCloseTo(1, 12);
    expect(q.minDihedralDeg[0]).toBeCloseTo(ref, 10);
    expect(q.maxDihedralDeg[0]).toBeCloseTo(ref, 10);
    expect(q.longestEdge[0]).toBeCloseTo(1, 14);
  });

  it('the Kuhn tetrahedron: circumsphere = the cube circumsphere, radius ratio from elementary geometry', () => {
    const h = 2.5;
    const mesh = kuhnGrid(1, 1, 1, h);
    const q = computeTetQuality(mesh);
    // all four vertices are cube corners: R = half the cube diagonal = √3·h/2. Faces: two right
    // triangles with legs h, h and two with legs h, √2·h → S = (1 + √2)·h²; V = h³/6; r = 3V/S.
    const R = (Math.sqrt(3) * h) / 2;
    const r = (3 * (h ** 3 / 6)) / ((1 + Math.SQRT2) * h * h);
    for (let t = 0; t < 6; t++) {
      expect(q.radiusRatio[t]).toBeCloseTo((3 * r) / R, 12);
      const d = allDihedrals(mesh, t);
      expect(q.minDihedralDeg[t]).toBeCloseTo(Math.min(...d), 9);
      expect(q.maxDihedralDeg[t]).toBeCloseTo(Math.max(...d), 9);
      // Kuhn simplex dihedral angles are 45°, 60° and 90° (from memory; checked by projection above)
      expect(q.minDihedralDeg[t]).toBeCloseTo(45, 9);
      expect(q.maxDihedralDeg[t]).toBeCloseTo(90, 9);
      expect(q.longestEdge[t]).toBeCloseTo(Math.sqrt(3) * h, 12);
    }
  });

  it('mean ratio agrees with its Jacobian definition on random tetrahedra, dihedrals with projection', () => {
    const rnd = lcg(2024);
    const coords: number[] = [];
    const tets: number[] = [];
    for (let t = 0; t < 200; t++) {
      for (let k = 0; k < 12; k++) coords.push(rnd() * 4 - 2);
      tets.push(4 * t, 4 * t + 1, 4 * t + 2, 4 * t + 3);
    }
    const mesh = makeMesh(coords, tets);
    const q = computeTetQuality(mesh);
    for (let t = 0; t < 200; t++) {
      const P = [0, 1, 2, 3].map((i) => {
        const v = mesh.tets[4 * t + i];
        return [mesh.coords[3 * v], mesh.coords[3 * v + 1], mesh.coords[3 * v + 2]] as V3;
      });
      expect(q.meanRatio[t]).toBeCloseTo(meanRatioByJacobian(P), 9);
      const d = allDihedrals(mesh, t);
      expect(q.minDihedralDeg[t]).toBeCloseTo(Math.min(...d), 6);
      expect(q.maxDihedralDeg[t]).toBeCloseTo(Math.max(...d), 6);
      expect(q.radiusRatio[t]).toBeGreaterThan(0);
      expect(q.radiusRatio[t]).toBeLessThanOrEqual(1 + 1e-12);
    }
  });

  it('the mean-ratio-only path gives identical values', () => {
    const mesh = toTetMesh(refineUniform(kuhnBox({ center: [0, 0, 0], halfExtents: [1, 2, 1], cells: [1, 2, 1] }), 3));
    expect(Array.from(computeMeanRatio(mesh))).toEqual(Array.from(computeTetQuality(mesh).meanRatio));
  });

  it('a nearly flat tetrahedron scores near 0', () => {
    const mesh = makeMesh([0, 0, 0, 1, 0, 0, 0, 1, 0, 0.3, 0.3, 1e-6], [0, 1, 2, 3]);
    const q = computeTetQuality(mesh);
    expect(q.meanRatio[0]).toBeLessThan(1e-3);
    expect(q.radiusRatio[0]).toBeLessThan(1e-4);
    expect(q.maxDihedralDeg[0]).toBeGreaterThan(179);
  });
});

describe('qualityReport', () => {
  it('Kuhn bisection meshes keep dihedral angles within [45°, 120°] (Maubach 1995; Stevenson 2008)', () => {
    const bm = refineUniform(kuhnBox({ center: [0, 0, 0], halfExtents: [1, 1, 1], cells: [2, 2, 2] }), 5);
    const mesh = toTetMesh(bm);
    const r = qualityReport(mesh);
    expect(r.minDihedralDeg).toBeGreaterThanOrEqual(45 - 1e-9);
    expect(r.maxDihedralDeg).toBeLessThanOrEqual(120 + 1e-9);
    // a bounded number of shapes: the mean ratio takes only a few distinct values
    const classes = new Set(Array.from(computeTetQuality(mesh).meanRatio, (x) => x.toFixed(9)));
    expect(classes.size).toBeLessThanOrEqual(4);
  });

  it('counts agree with each other: Euler V − E + F − T = 1, P2 nodes = V + E, levels sum to T', () => {
    const bm = kuhnBox({ center: [0, 0, 0], halfExtents: [2, 1.5, 1], cells: [4, 3, 2] });
    for (let pass = 0; pass < 8; pass++) {
      const marks = new Uint8Array(bm.nTets);
      for (let t = 0; t < bm.nTets; t++) {
        const v = 3 * bm.tets[4 * t];
        if (Math.hypot(bm.coords[v] - 0.2, bm.coords[v + 1] - 0.1, bm.coords[v + 2]) < 0.6) marks[t] = 1;
      }
      refine(bm, marks);
    }
    const mesh = toTetMesh(bm);
    const r = qualityReport(mesh, [{ id: 'P1', position: [0.2, 0.1, 0] }]);
    expect(r.vertices - r.edges + r.faces - r.tets).toBe(1);
    expect(r.p2Nodes).toBe(r.vertices + r.edges);
    expect(r.levels.reduce((a, b) => a + b, 0)).toBe(r.tets);
    expect(r.levels.length).toBeGreaterThan(2);
    expect(r.volumeNm3).toBeCloseTo(4 * 3 * 2, 10);
    expect(r.meanRatio.histogram.counts.reduce((a, b) => a + b, 0)).toBe(r.tets);
    expect(r.radiusRatio.min).toBeGreaterThan(0);
    // the site: fine elements at the site, coarser far away; the curve grows with distance
    const s = r.sites[0];
    expect(s.id).toBe('P1');
    expect(s.hAtSite).toBeLessThan(r.hMax / 4);
    expect(s.hMinNear).toBeLessThanOrEqual(s.hAtSite);
    expect(s.nearTets).toBeGreaterThan(0);
    const bins = s.sizeVsDistance;
    expect(bins.reduce((a, b) => a + b.count, 0)).toBe(r.tets);
    expect(bins[bins.length - 1].hMean).toBeGreaterThan(2 * bins[0].hMean);
  });

  it('with two sites each tet is counted once, by its nearest site', () => {
    const mesh = kuhnGrid(4, 2, 2, 0.5);
    const r = qualityReport(mesh, [
      { position: [0.5, 0.5, 0.5] },
      { position: [1.5, 0.5, 0.5], radiusNm: 0.6 },
    ]);
    const total = r.sites.reduce((a, s) => a + s.sizeVsDistance.reduce((b, x) => b + x.count, 0), 0);
    expect(total).toBe(r.tets);
    expect(r.sites[1].nearRadiusNm).toBe(0.6);
    expect(r.sites[0].id).toBe('site-0');
  });
});
