/**
 * Maubach newest-vertex bisection with closure.
 * Sources: Maubach, SIAM J. Sci. Comput. 16 (1995) 210–227 (tagged simplices, the child rule);
 * Stevenson, Math. Comp. 77 (2008) 227–241 (conformity of the closure under the matching
 * condition, which the Kuhn triangulation with tag 3 satisfies). Conformity is checked here
 * face by face (check.ts), not assumed.
 */
import { describe, expect, it } from 'vitest';
import { kuhnBox, meshDesign, refine, refineUniform, refineWithStats, toTetMesh, MeshError, type BisectionMesh } from '../../../geometry/mesh/index';
import { checkMesh, tetDet } from '../../../geometry/mesh/check';
import { computeTetQuality } from '../../../geometry/mesh/quality';
import { NO_PARENT } from '../../../geometry/mesh/types';
import { marksWhere } from './marks.fixtures';
import { siliconDesign } from '../design-fixtures';

type Box = { min: [number, number, number]; max: [number, number, number] };
const UNIT: Box = { min: [0, 0, 0], max: [1, 1, 1] };

function unitCubes(n: number): BisectionMesh {
  return kuhnBox({ center: [0.5, 0.5, 0.5], halfExtents: [0.5, 0.5, 0.5], cells: [n, n, n] });
}

/** marks tets whose centroid lies within `radius` of p */
function marksNear(m: BisectionMesh, p: number[], radius: number): Uint8Array {
  return marksWhere(m, (cx, cy, cz) => Math.hypot(cx - p[0], cy - p[1], cz - p[2]) < radius);
}

/** number of distinct shapes: sorted squared edge lengths over the longest, to 1e-9 */
function similarityClasses(tm: { coords: Float64Array; tets: Uint32Array }): number {
  const sig = new Set<string>();
  const l = new Float64Array(6);
  for (let t = 0; t < tm.tets.length / 4; t++) {
    let k = 0;
    for (let i = 0; i < 4; i++) {
      for (let j = i + 1; j < 4; j++) {
        const a = 3 * tm.tets[4 * t + i], b = 3 * tm.tets[4 * t + j];
        l[k++] = (tm.coords[a] - tm.coords[b]) ** 2 + (tm.coords[a + 1] - tm.coords[b + 1]) ** 2 + (tm.coords[a + 2] - tm.coords[b + 2]) ** 2;
      }
    }
    l.sort();
    sig.add(Array.from(l, (x) => (x / l[5]).toFixed(9)).join(','));
  }
  return sig.size;
}

describe('Maubach bisection of one tagged tet', () => {
  it('follows the child rule (y0..y(k-1), z, y(k+1)..y3; k′) and (y1..yk, z, y(k+1)..y3; k′) (Maubach 1995)', () => {
    // one tet at a time: take the first Kuhn tet and bisect only it, three generations deep
    const m = unitCubes(1);
    let t = 0;
    for (let gen = 0; gen < 3; gen++) {
      const y = Array.from(m.tets.slice(4 * t, 4 * t + 4));
      const k = m.tetTag[t];
      const nt = m.nTets;
      const marks = new Uint8Array(m.nTets);
      marks[t] = 1;
      const before = m.nVertices;
      refine(m, marks);
      // the midpoint z of y0–yk is a new vertex with exactly those parents
      const z = before; // the first vertex created in this call is the one this tet asked for
      expect([m.parents[2 * z], m.parents[2 * z + 1]].sort((a, b) => a - b)).toEqual([y[0], y[k]].sort((a, b) => a - b));
      for (let c = 0; c < 3; c++) expect(m.coords[3 * z + c]).toBe(0.5 * (m.coords[3 * y[0] + c] + m.coords[3 * y[k] + c]));
      const kk = k > 1 ? k - 1 : 3;
      const childA = y.slice();
      childA[k] = z;
      const childB = [...y.slice(1, k + 1), z, ...y.slice(k + 1)];
      expect(Array.from(m.tets.slice(4 * t, 4 * t + 4))).toEqual(childA);
      expect(Array.from(m.tets.slice(4 * nt, 4 * nt + 4))).toEqual(childB);
      expect(m.tetTag[t]).toBe(kk);
      expect(m.tetTag[nt]).toBe(kk);
      expect(m.tetLevel[t]).toBe(gen + 1);
      expect(m.tetLevel[nt]).toBe(gen + 1);
      // the closure may have bisected neighbours; the mesh must stay conforming after each step
      expect(checkMesh(toTetMesh(m), { box: UNIT }).problems).toEqual([]);
      t = nt; // continue with child B
    }
  });

  it('records orientation exactly: the flip bit matches the sign of the Maubach-order determinant', () => {
    const m = unitCubes(2);
    refineUniform(m, 4);
    for (let t = 0; t < m.nTets; t++) {
      const det = tetDet(m.coords, m.tets, t);
      expect(det > 0 ? 0 : 1).toBe(m.tetFlip[t]);
    }
  });
});

describe('uniform and local refinement with closure', () => {
  it('uniform refinement doubles the count per generation and stays conforming (Stevenson 2008)', () => {
    const m = unitCubes(2);
    for (let g = 1; g <= 6; g++) {
      refineUniform(m, 1);
      expect(m.nTets).toBe(48 * 2 ** g);
      const r = checkMesh(toTetMesh(m), { box: UNIT });
      expect(r.problems).toEqual([]);
      expect(r.euler).toBe(1);
    }
  });

  it('only 3 similarity classes and dihedral angles within [45°, 120°] (Kuhn simplex under Maubach bisection; from memory)', () => {
    const m = unitCubes(2);
    for (let g = 0; g <= 6; g++) {
      const tm = toTetMesh(m);
      expect(similarityClasses(tm)).toBe(1); // uniform: every tet of a generation has the same shape
      const q = computeTetQuality(tm);
      for (let t = 0; t < q.minDihedralDeg.length; t++) {
        expect(q.minDihedralDeg[t]).toBeGreaterThanOrEqual(45 - 1e-9);
        expect(q.maxDihedralDeg[t]).toBeLessThanOrEqual(120 + 1e-9);
      }
      refineUniform(m, 1);
    }
    // locally refined: generations mix, the shapes do not multiply
    for (let round = 0; round < 9; round++) refine(m, marksNear(m, [0.3, 0.6, 0.45], 0.2));
    const tm = toTetMesh(m);
    expect(similarityClasses(tm)).toBeLessThanOrEqual(3);
    const q = computeTetQuality(tm);
    let lo = 180, hi = 0;
    for (let t = 0; t < q.minDihedralDeg.length; t++) {
      lo = Math.min(lo, q.minDihedralDeg[t]);
      hi = Math.max(hi, q.maxDihedralDeg[t]);
    }
    expect(lo).toBeGreaterThanOrEqual(45 - 1e-9);
    expect(hi).toBeLessThanOrEqual(120 + 1e-9);
  });

  it('repeated local refinement on refined meshes: every interior face shared by two tets, the rest on the box, volume exact, Euler 1', () => {
    const box: Box = { min: [-2, -1, 0], max: [2, 1, 3] };
    const m = kuhnBox({ center: [0, 0, 1.5], halfExtents: [2, 1, 1.5], cells: [4, 2, 3] });
    let levels = 0;
    for (let round = 0; round < 14; round++) {
      // marks near a moving point and on a corner, so closures of different depths interact
      const p = [-1.3 + 0.2 * round, 0.25, 0.7 + 0.1 * round];
      const marks = marksNear(m, p, 0.6);
      const corner = marksNear(m, [2, 1, 3], 0.5);
      for (let t = 0; t < marks.length; t++) marks[t] |= corner[t];
      const stats = refineWithStats(m, marks);
      expect(stats.bisections).toBeGreaterThanOrEqual(marks.reduce((a, b) => a + b, 0));
      const tm = toTetMesh(m);
      const r = checkMesh(tm, { box });
      expect(r.problems).toEqual([]);
      expect(r.boundaryFacesOffDomain).toBe(0);
      expect(r.overSharedFaces).toBe(0);
      expect(r.interiorFaces + r.boundaryFaces).toBe(r.faces);
      expect(2 * r.interiorFaces + r.boundaryFaces).toBe(4 * r.tets);
      expect(r.volumeRelError).toBeLessThanOrEqual(1e-12);
      expect(r.euler).toBe(1);
      expect(r.boundaryFlagMismatches).toBe(0);
      levels = Math.max(...tm.tetLevel);
    }
    expect(levels).toBeGreaterThan(10);
  });

  it('keeps the vertex hierarchy: each new vertex is the exact midpoint of its two parents, one generation deeper', () => {
    const m = unitCubes(2);
    const n0 = m.nVertices;
    for (let round = 0; round < 8; round++) refine(m, marksNear(m, [0.1, 0.2, 0.9], 0.3));
    const tm = toTetMesh(m);
    for (let v = 0; v < n0; v++) {
      expect(tm.parents[2 * v]).toBe(NO_PARENT);
      expect(tm.vertexLevel[v]).toBe(0);
    }
    for (let v = n0; v < tm.vertexLevel.length; v++) {
      const a = tm.parents[2 * v], b = tm.parents[2 * v + 1];
      expect(a).toBeLessThan(v);
      expect(b).toBeLessThan(v);
      for (let c = 0; c < 3; c++) expect(tm.coords[3 * v + c]).toBe(0.5 * (tm.coords[3 * a + c] + tm.coords[3 * b + c]));
      expect(tm.vertexLevel[v]).toBeGreaterThan(0);
      // a midpoint is on the boundary exactly when both parents are on one common box face
      const onFace = (p: number) => [0, 1, 2].flatMap((ax) => [tm.coords[3 * p + ax] === 0 ? 2 * ax : -1, tm.coords[3 * p + ax] === 1 ? 2 * ax + 1 : -1]).filter((f) => f >= 0);
      const common = onFace(a).filter((f) => onFace(b).includes(f));
      expect(tm.boundaryVertex[v]).toBe(common.length > 0 ? 1 : 0);
    }
  });

  it('a graded design mesh can be refined further by markers (the adaptive loop) and stays conforming', () => {
    const r = meshDesign(
      siliconDesign({
        name: 'adaptive continuation (invented)',
        host: { latticeConstantNm: 0.5431 },
        sites: [{ id: 'd', species: 'P', position: [0.7, -0.3, 0.2], electrons: 1 }],
        domain: { center: [0, 0, 0], halfExtentsNm: [12, 12, 12], boundary: { kind: 'grounded' } },
        refinement: { order: 1, targetRelError: 0.05, maxElements: 500_000 },
      }),
      { keepBisectionMesh: true },
    );
    const bm = r.bisectionMesh!;
    expect(bm.nTets).toBe(r.mesh.tets.length / 4);
    const box: Box = { min: [-12, -12, -12], max: [12, 12, 12] };
    for (let round = 0; round < 3; round++) {
      // mark the largest tenth by longest edge, ties by index (a stand-in for Dörfler marking)
      const tm = toTetMesh(bm);
      const q = computeTetQuality(tm);
      const order = Array.from(q.longestEdge.keys()).sort((a, b) => q.longestEdge[b] - q.longestEdge[a] || a - b);
      const marks = new Uint8Array(bm.nTets);
      for (const t of order.slice(0, Math.ceil(bm.nTets / 10))) marks[t] = 1;
      const before = bm.nTets;
      refine(bm, marks);
      expect(bm.nTets).toBeGreaterThan(before);
      const c = checkMesh(toTetMesh(bm), { box });
      expect(c.problems).toEqual([]);
    }
  });

  it('an empty marker changes nothing; a short marker array is refused', () => {
    const m = unitCubes(2);
    const before = toTetMesh(m);
    refine(m, new Uint8Array(m.nTets));
    const after = toTetMesh(m);
    expect(after.tets).toEqual(before.tets);
    expect(() => refine(m, new Uint8Array(3))).toThrow(MeshError);
    try {
      refine(m, new Uint8Array(3));
    } catch (e) {
      expect((e as MeshError).code).toBe('bad-marker');
    }
  });

  it('stops with too-many-elements when a refinement would pass maxTets; refuses untouched when the marks alone would', () => {
    const m = unitCubes(2);
    let err: unknown;
    try {
      refineUniform(m, 3, { maxTets: 200 });
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(MeshError);
    expect((err as MeshError).code).toBe('too-many-elements');
    expect(m.nTets).toBeLessThanOrEqual(200);

    const n = unitCubes(2);
    const before = toTetMesh(n);
    expect(() => refine(n, new Uint8Array(n.nTets).fill(1), { maxTets: 60 })).toThrow(/would pass 60/);
    expect(toTetMesh(n).tets).toEqual(before.tets);
  });
});
