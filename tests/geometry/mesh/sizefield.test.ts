/**
 * The size field and the marking rule.
 * Sources: the grading exponent 2(p+2)/(2p+3) follows from equidistributing the interpolation
 * error bound h^{2p}|D^{p+1}u|² h³ (Ciarlet, The Finite Element Method for Elliptic Problems,
 * Thm 3.1.6) for u = 1/r, whose (p+1)-th derivatives fall like r^{−(p+2)}: 6/5 for P1, 8/7 for P2
 * (also stated in the project's physics notes).
 */
import { describe, expect, it } from 'vitest';
import { SizeField, sizeFieldFromDesign, gradingExponent, autoCoreSize, orbitalLength, meshDesign, kuhnBox, refineToSize, toTetMesh, MeshError } from '../../../geometry/mesh/index';
import { checkMesh } from '../../../geometry/mesh/check';
import type { Design, Site } from '../../../geometry/design/types';
import { boxDesign } from '../design-fixtures';

function design(sites: Partial<Site>[], half: [number, number, number], order: 1 | 2, tol: number): Design {
  return boxDesign('size-field test (invented)', sites, half, order, tol);
}

/** h by the defining formula, brute force over sites */
function hRef(x: number[], sites: { p: number[]; h0: number; a: number }[], beta: number, hmax: number): number {
  let h = hmax;
  for (const s of sites) {
    const r = Math.hypot(x[0] - s.p[0], x[1] - s.p[1], x[2] - s.p[2]);
    h = Math.min(h, s.h0 * Math.max(1, r / s.a) ** beta);
  }
  return h;
}

describe('size field parameters', () => {
  it('grades like r^(6/5) for P1 and r^(8/7) for P2 (equidistribution for a 1/r field; Ciarlet Thm 3.1.6)', () => {
    expect(gradingExponent(1)).toBeCloseTo(6 / 5, 15);
    expect(gradingExponent(2)).toBeCloseTo(8 / 7, 15);
  });

  it('core size scales like tol^(1/(2p)) and never exceeds the orbital length', () => {
    // energy error ∝ h^{2p} (square of the energy-norm error O(h^p), Ciarlet Thm 3.2.2)
    for (const p of [1, 2] as const) {
      const small = autoCoreSize(2.5, 1e-6, p);
      const r = autoCoreSize(2.5, 16e-6, p) / small;
      expect(r).toBeCloseTo(16 ** (1 / (2 * p)), 12);
      expect(autoCoreSize(2.5, 0.5, p)).toBeLessThanOrEqual(2.5);
    }
  });

  it('orbital length: 1s radius, the smaller anisotropic radius, 2σ for a Gaussian', () => {
    expect(orbitalLength({ model: 'hydrogenic-1s', radiusNm: 2.5 })).toBe(2.5);
    expect(orbitalLength({ model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 1.4 })).toBe(1.4);
    expect(orbitalLength({ model: 'gaussian', sigmaNm: 0.8 })).toBe(1.6);
  });

  it('groups sites by (h0, a) and honours overrides', () => {
    const d = design([{ position: [1, 0, 0] }, { position: [-1, 0, 0], orbital: { model: 'gaussian', sigmaNm: 1 } }, { position: [3, 0, 0] }], [20, 20, 20], 1, 1e-3);
    const { params, spec } = sizeFieldFromDesign(d);
    expect(params.classes.map((c) => c.sites)).toEqual([2, 1]);
    expect(spec.classes[0].coreRadiusNm).toBe(2.5); // species preset radius
    expect(params.exponent).toBeCloseTo(1.2, 15);
    expect(params.hmaxNm).toBe(10); // a quarter of the smallest extent (40 nm)
    const o = sizeFieldFromDesign(d, { h0Nm: 0.3, hmaxNm: 4, exponent: 1.1 });
    expect(o.params.classes.every((c) => c.h0Nm === 0.3)).toBe(true);
    expect(o.params.hmaxNm).toBe(4);
    expect(o.params.exponent).toBe(1.1);
    expect(() => sizeFieldFromDesign(d, { hmaxNm: -1 })).toThrow(MeshError);
    expect(() => sizeFieldFromDesign(d, { h0Nm: Number.NaN })).toThrow(MeshError);
  });
});

describe('size field evaluation', () => {
  const sites = [
    { p: [0, 0, 0], h0: 0.3, a: 2.5 },
    { p: [6, 1, -2], h0: 0.3, a: 2.5 },
    { p: [-4, 3, 5], h0: 0.5, a: 1.2 },
  ];
  const beta = 1.2;
  const hmax = 7;
  const specOf = (ss: typeof sites) => {
    const byKey = new Map<string, { h0Nm: number; coreRadiusNm: number; positions: number[] }>();
    for (const s of ss) {
      const k = `${s.h0}|${s.a}`;
      if (!byKey.has(k)) byKey.set(k, { h0Nm: s.h0, coreRadiusNm: s.a, positions: [] });
      byKey.get(k)!.positions.push(...s.p);
    }
    return { exponent: beta, hmaxNm: hmax, classes: [...byKey.values()].map((c) => ({ ...c, positions: Float64Array.from(c.positions) })) };
  };

  it('matches the defining formula at points, including the core, the graded part and the cap', () => {
    const f = new SizeField(specOf(sites));
    const pts = [[0, 0, 0], [1, 1, 1], [3, 0, 0], [10, 0, 0], [6, 1, -1], [-4, 3, 5.5], [-30, 20, 10], [2.4, -0.3, 0.2]];
    for (const x of pts) expect(f.valueAt(x[0], x[1], x[2])).toBeCloseTo(hRef(x, sites, beta, hmax), 12);
  });

  it('over a box returns the minimum of h in it (checked on a 11³ sample) and is attained at the nearest point', () => {
    const f = new SizeField(specOf(sites));
    const boxes = [[1, 1, 1, 3, 2, 4], [-8, -1, 2, -5, 4, 6], [8, 8, 8, 9, 9, 9], [-1, -1, -1, 1, 1, 1]];
    for (const b of boxes) {
      const hb = f.minOverBox(b[0], b[1], b[2], b[3], b[4], b[5]);
      let sampled = Infinity;
      for (let i = 0; i <= 10; i++)
        for (let j = 0; j <= 10; j++)
          for (let k = 0; k <= 10; k++) {
            const x = [b[0] + ((b[3] - b[0]) * i) / 10, b[1] + ((b[4] - b[1]) * j) / 10, b[2] + ((b[5] - b[2]) * k) / 10];
            sampled = Math.min(sampled, hRef(x, sites, beta, hmax));
          }
      expect(hb).toBeLessThanOrEqual(sampled + 1e-12);
      // the exact minimum: h at the point of the box nearest each site
      let exact = hmax;
      for (const s of sites) {
        const q = [0, 1, 2].map((a) => Math.min(Math.max(s.p[a], b[a]), b[a + 3]));
        exact = Math.min(exact, hRef(q, [s], beta, hmax));
      }
      expect(hb).toBeCloseTo(exact, 12);
    }
  });

  it('the site grid (many sites) gives the same answers as a plain scan', () => {
    // 8×8×8 = 512 sites on a lattice with a deterministic jitter: the grid path is taken above 32 sites
    const many: typeof sites = [];
    for (let i = 0; i < 8; i++)
      for (let j = 0; j < 8; j++)
        for (let k = 0; k < 8; k++) many.push({ p: [3 * i + 0.37 * ((i * 7 + j * 3 + k) % 5), 3 * j - 0.21 * ((j * 5 + k) % 3), 3 * k + 0.11 * (i % 4)], h0: 0.2, a: 1 });
    const f = new SizeField(specOf(many));
    const pts = [[-5, -5, -5], [10.3, 7.7, 12.1], [30, 30, 30], [1.5, 1.5, 1.5], [22, 0.5, 13]];
    for (const x of pts) expect(f.valueAt(x[0], x[1], x[2])).toBeCloseTo(hRef(x, many, beta, hmax), 12);

    // boxes of all sizes inside, around and far outside the array: grid answer = exact minimum
    // (h at the point of the box nearest each site, brute force over all 512 sites)
    let seed = 7;
    const next = () => (seed = (Math.imul(seed, 1103515245) + 12345) >>> 0) / 2 ** 32; // LCG (Numerical Recipes constants)
    for (let q = 0; q < 400; q++) {
      const lo = [next() * 60 - 18, next() * 60 - 18, next() * 60 - 18];
      const w = [next() ** 3 * 15, next() ** 3 * 15, next() ** 3 * 15];
      const hb = f.minOverBox(lo[0], lo[1], lo[2], lo[0] + w[0], lo[1] + w[1], lo[2] + w[2]);
      let exact = hmax;
      for (const s of many) {
        const p = [0, 1, 2].map((a) => Math.min(Math.max(s.p[a], lo[a]), lo[a] + w[a]));
        exact = Math.min(exact, hRef(p, [s], beta, hmax));
      }
      expect(hb).toBeCloseTo(exact, 12);
    }
  });

  it('the site grid of a flat array and a row (one site per cell, bound from the grid\'s extent) matches a plain scan', () => {
    // a 30×30 plane of sites (z = 0) and a row of 200: the grid cells shrink to about one site each,
    // and queries far above the plane or beside the row end after a ring or two
    for (const layout of ['plane', 'row'] as const) {
      const many: typeof sites = [];
      if (layout === 'plane') for (let i = 0; i < 30; i++) for (let j = 0; j < 30; j++) many.push({ p: [4.5 * i + 0.3 * (j % 3), 3.9 * j, 0], h0: 0.4, a: 2 });
      else for (let i = 0; i < 200; i++) many.push({ p: [1.7 * i, 0.2 * (i % 4), -0.1 * (i % 3)], h0: 0.4, a: 2 });
      const f = new SizeField(specOf(many));
      let seed = 11;
      const next = () => (seed = (Math.imul(seed, 1103515245) + 12345) >>> 0) / 2 ** 32; // LCG (Numerical Recipes constants)
      for (let q = 0; q < 400; q++) {
        const lo = [next() * 400 - 60, next() * 200 - 60, next() * 120 - 60];
        const w = [next() ** 3 * 20, next() ** 3 * 20, next() ** 3 * 20];
        const hb = f.minOverBox(lo[0], lo[1], lo[2], lo[0] + w[0], lo[1] + w[1], lo[2] + w[2]);
        let exact = hmax;
        for (const s of many) {
          const p = [0, 1, 2].map((a) => Math.min(Math.max(s.p[a], lo[a]), lo[a] + w[a]));
          exact = Math.min(exact, hRef(p, [s], beta, hmax));
        }
        expect(hb).toBeCloseTo(exact, 12);
      }
    }
  });

  it('a mesh refined to the size field meets it: longest edge ≤ min of h over every tet (checked at the vertices and the centroid)', () => {
    const d = design([{ position: [1.3, -0.4, 0.9] }, { position: [-6, 2, 3], orbital: { model: 'gaussian', sigmaNm: 0.6 } }], [15, 12, 12], 1, 3e-2);
    const { spec } = sizeFieldFromDesign(d);
    const f = new SizeField(spec);
    const m = kuhnBox({ center: [0, 0, 0], halfExtents: [15, 12, 12], cells: [5, 4, 4] });
    refineToSize(m, f.tooLarge);
    const tm = toTetMesh(m);
    expect(checkMesh(tm, { box: { min: [-15, -12, -12], max: [15, 12, 12] } }).problems).toEqual([]);
    const refSites = spec.classes.flatMap((c) => {
      const out = [];
      for (let i = 0; i < c.positions.length; i += 3) out.push({ p: Array.from(c.positions.slice(i, i + 3)), h0: c.h0Nm, a: c.coreRadiusNm });
      return out;
    });
    let finest = Infinity;
    let coarsest = 0;
    for (let t = 0; t < tm.tets.length / 4; t++) {
      const v = Array.from(tm.tets.slice(4 * t, 4 * t + 4));
      const P = v.map((i) => Array.from(tm.coords.slice(3 * i, 3 * i + 3)));
      let L = 0;
      for (let i = 0; i < 4; i++) for (let j = i + 1; j < 4; j++) L = Math.max(L, Math.hypot(P[i][0] - P[j][0], P[i][1] - P[j][1], P[i][2] - P[j][2]));
      const c = [0, 1, 2].map((a) => (P[0][a] + P[1][a] + P[2][a] + P[3][a]) / 4);
      for (const x of [...P, c]) expect(L).toBeLessThanOrEqual(hRef(x, refSites, spec.exponent, spec.hmaxNm) * (1 + 1e-12));
      finest = Math.min(finest, L);
      coarsest = Math.max(coarsest, L);
    }
    // graded: the finest tet is at most the core size, the coarsest far bigger
    expect(finest).toBeLessThanOrEqual(Math.min(...spec.classes.map((c) => c.h0Nm)));
    expect(coarsest / finest).toBeGreaterThan(8);
  });

  it('meshDesign grades the mesh outwards: mean longest edge grows with distance from a single site', () => {
    const r = meshDesign(design([{ position: [0, 0, 0] }], [20, 20, 20], 2, 1e-3));
    const tm = r.mesh;
    const bins = [0, 0, 0, 0].map(() => ({ n: 0, h: 0 }));
    const edges = [2, 5, 10, 16];
    for (let t = 0; t < tm.tets.length / 4; t++) {
      const v = Array.from(tm.tets.slice(4 * t, 4 * t + 4));
      const c = [0, 1, 2].map((a) => v.reduce((s, i) => s + tm.coords[3 * i + a], 0) / 4);
      const d = Math.hypot(c[0], c[1], c[2]);
      const b = edges.findIndex((e) => d < e);
      if (b < 0) continue;
      let L = 0;
      for (let i = 0; i < 4; i++) for (let j = i + 1; j < 4; j++) L = Math.max(L, Math.hypot(...[0, 1, 2].map((a) => tm.coords[3 * v[i] + a] - tm.coords[3 * v[j] + a]) as [number, number, number]));
      bins[b].n++;
      bins[b].h += L;
    }
    const means = bins.map((b) => b.h / b.n);
    for (let i = 1; i < means.length; i++) expect(means[i]).toBeGreaterThan(means[i - 1]);
  });
});
