import { describe, expect, it } from 'vitest';
import { bondGraph, disorderEnsemble, generateArray, mulberry32 } from '../../../geometry/arrays';
import { arrayPoints } from '../../../geometry/arrays/generators';
import { isLatticeSite, snapToLattice, siteToNm } from '../../../geometry/lattice';
import { SI_LATTICE_CONSTANT_NM } from '../../../geometry/units';
import type { Site } from '../../../geometry/design/types';

const a = SI_LATTICE_CONSTANT_NM; // CODATA 2018

const positions = (sites: Site[]) => new Float64Array(sites.flatMap((s) => s.position));
const onLattice = (p: readonly number[]) => {
  const s = snapToLattice([p[0], p[1], p[2]], a);
  const q = siteToNm(s, a);
  return isLatticeSite(...s) && Math.hypot(q[0] - p[0], q[1] - p[1], q[2] - p[2]) < 1e-12;
};

describe('mulberry32', () => {
  it('is reproducible, in [0, 1), and uniform to within sampling error (mean 1/2, variance 1/12)', () => {
    const r1 = mulberry32(42), r2 = mulberry32(42), r3 = mulberry32(43);
    const xs = Array.from({ length: 100_000 }, () => r1());
    expect(Array.from({ length: 5 }, () => r2())).toEqual(xs.slice(0, 5));
    expect(r3()).not.toBe(xs[0]);
    expect(Math.min(...xs)).toBeGreaterThanOrEqual(0);
    expect(Math.max(...xs)).toBeLessThan(1);
    const mean = xs.reduce((s, x) => s + x, 0) / xs.length;
    const v = xs.reduce((s, x) => s + (x - mean) ** 2, 0) / xs.length;
    // standard error of the mean: √(1/12/N) ≈ 9e-4; allow 5σ
    expect(Math.abs(mean - 0.5)).toBeLessThan(5 * Math.sqrt(1 / 12 / xs.length));
    expect(Math.abs(v - 1 / 12)).toBeLessThan(0.002);
  });
});

describe('array generators', () => {
  it('produce the right counts and nearest-neighbour spacing for each kind (geometry of the 2D lattices)', () => {
    const s = 4;
    const expectNN = (pts: number[][], d: number) => {
      let nn = Infinity;
      for (let i = 0; i < pts.length; i++) for (let j = i + 1; j < pts.length; j++) nn = Math.min(nn, Math.hypot(pts[i][0] - pts[j][0], pts[i][1] - pts[j][1]));
      expect(nn).toBeCloseTo(d, 12);
    };
    expect(arrayPoints({ kind: 'chain', nx: 5, spacingNm: s }).length).toBe(5);
    expect(arrayPoints({ kind: 'square', nx: 3, ny: 4, spacingNm: s }).length).toBe(12);
    expectNN(arrayPoints({ kind: 'square', nx: 3, ny: 4, spacingNm: s }), s);
    expectNN(arrayPoints({ kind: 'rectangular', nx: 3, ny: 3, spacingNm: s, spacingYNm: 6 }), s);
    expectNN(arrayPoints({ kind: 'triangular', nx: 4, ny: 4, spacingNm: s }), s);
    const hc = arrayPoints({ kind: 'honeycomb', nx: 3, ny: 3, spacingNm: s });
    expect(hc.length).toBe(18);
    expectNN(hc, s);
    expect(() => arrayPoints({ kind: 'chain', nx: 0, spacingNm: s })).toThrow(RangeError);
    expect(() => arrayPoints({ kind: 'chain', nx: 3, spacingNm: -1 })).toThrow(/positive/);
  });
  it('snapped arrays sit on lattice sites within one bond length of the target; free ones keep the exact targets', () => {
    const spec = { kind: 'square' as const, nx: 3, ny: 3, spacingNm: 5, angleDeg: 30, center: [0, 0, 2] as [number, number, number], latticeConstantNm: a };
    const snapped = generateArray(spec);
    const free = generateArray({ ...spec, placement: 'free' });
    expect(snapped.length).toBe(9);
    for (let i = 0; i < 9; i++) {
      expect(onLattice(snapped[i].position)).toBe(true);
      const d = Math.hypot(...snapped[i].position.map((x, k) => x - free[i].position[k]));
      expect(d).toBeLessThanOrEqual((a * Math.sqrt(3)) / 4 + 1e-12);
    }
    // free: 30° rotation keeps spacing 5 between the first two targets
    expect(Math.hypot(free[1].position[0] - free[0].position[0], free[1].position[1] - free[0].position[1])).toBeCloseTo(5, 12);
    expect((Math.atan2(free[1].position[1] - free[0].position[1], free[1].position[0] - free[0].position[0]) * 180) / Math.PI).toBeCloseTo(30, 10);
  });
  it('clusters of 1–4 donors sit on the nearest lattice sites, one bond apart, sharing a cluster label', () => {
    for (const k of [2, 3, 4]) {
      const sites = generateArray({ kind: 'chain', nx: 2, spacingNm: 8, clusterSize: k, latticeConstantNm: a });
      expect(sites.length).toBe(2 * k);
      expect(new Set(sites.map((s) => s.cluster)).size).toBe(2);
      const first = sites.filter((s) => s.cluster === sites[0].cluster);
      for (const s of first) expect(onLattice(s.position)).toBe(true);
      // the central donor's bonded neighbours are at a√3/4
      for (const s of first.slice(1)) expect(Math.hypot(...s.position.map((x, i) => x - first[0].position[i]))).toBeCloseTo((a * Math.sqrt(3)) / 4, 12);
    }
    expect(() => generateArray({ kind: 'chain', nx: 2, spacingNm: 8, clusterSize: 5, latticeConstantNm: a })).toThrow(RangeError);
  });
  it('placement disorder: same seed → same ensemble; moves stay on lattice sites within the radius; no shared sites', () => {
    const sites = generateArray({ kind: 'triangular', nx: 4, ny: 3, spacingNm: 3, latticeConstantNm: a });
    const opts = { radiusNm: 1.0, samples: 20, seed: 99, latticeConstantNm: a };
    const e1 = disorderEnsemble(sites, opts);
    const e2 = disorderEnsemble(sites, opts);
    const e3 = disorderEnsemble(sites, { ...opts, seed: 100 });
    expect(JSON.stringify(e1)).toBe(JSON.stringify(e2));
    expect(JSON.stringify(e1)).not.toBe(JSON.stringify(e3));
    let moved = 0;
    for (const sample of e1) {
      const keys = new Set(sample.map((s) => s.position.map((x) => Math.round((x * 4) / a)).join(',')));
      expect(keys.size).toBe(sample.length);
      sample.forEach((s, i) => {
        expect(onLattice(s.position)).toBe(true);
        const d = Math.hypot(...s.position.map((x, k) => x - sites[i].position[k]));
        expect(d).toBeLessThanOrEqual(1.0 + 1e-12);
        if (d > 0) moved++;
      });
    }
    expect(moved).toBeGreaterThan(0);
  });
});

describe('bond graph', () => {
  const edgesOf = (g: ReturnType<typeof bondGraph>) => g.edges.length / 2;
  it('square 4×4: the 24 nearest-neighbour bonds, diagonals pruned', () => {
    const g = bondGraph(positions(generateArray({ kind: 'square', nx: 4, ny: 4, spacingNm: 5, placement: 'free', latticeConstantNm: a })));
    expect(edgesOf(g)).toBe(2 * 4 * 3);
    for (const l of g.lengths) expect(l).toBeCloseTo(5, 9);
  });
  it('triangular and honeycomb patches keep exactly the bonds of length = spacing', () => {
    for (const kind of ['triangular', 'honeycomb'] as const) {
      const pts = generateArray({ kind, nx: 4, ny: 4, spacingNm: 3, placement: 'free', latticeConstantNm: a });
      const g = bondGraph(positions(pts));
      // count bonds by brute force: pairs at distance = spacing
      let expected = 0;
      for (let i = 0; i < pts.length; i++) for (let j = i + 1; j < pts.length; j++) if (Math.abs(Math.hypot(...pts[i].position.map((x, k) => x - pts[j].position[k])) - 3) < 1e-9) expected++;
      expect(edgesOf(g)).toBe(expected);
    }
  });
  it('rectangular: shellFactor decides whether the long bonds are kept', () => {
    const p = positions(generateArray({ kind: 'rectangular', nx: 3, ny: 3, spacingNm: 4, spacingYNm: 6, placement: 'free', latticeConstantNm: a }));
    expect(edgesOf(bondGraph(p))).toBe(6);
    expect(edgesOf(bondGraph(p, { shellFactor: 1.6 }))).toBe(12);
  });
  it('collinear chains (any angle) and tiny inputs do not fail', () => {
    for (const angleDeg of [0, 90, 37]) {
      const g = bondGraph(positions(generateArray({ kind: 'chain', nx: 7, spacingNm: 4, angleDeg, placement: 'free', latticeConstantNm: a })));
      expect(edgesOf(g)).toBe(6);
    }
    expect(edgesOf(bondGraph(new Float64Array(0)))).toBe(0);
    expect(edgesOf(bondGraph(new Float64Array([0, 0, 0])))).toBe(0);
    expect(edgesOf(bondGraph(new Float64Array([0, 0, 0, 1, 0, 0])))).toBe(1);
    // stacked along z: same projection, joined with the 3D length
    const st = bondGraph(new Float64Array([0, 0, 0, 0, 0, 2, 5, 0, 0]));
    expect(edgesOf(st)).toBeGreaterThanOrEqual(1);
    expect(st.lengths[0]).toBeCloseTo(2, 12);
  });
  it('clusters become single nodes at their centroid', () => {
    const sites = generateArray({ kind: 'chain', nx: 3, spacingNm: 6, clusterSize: 2, latticeConstantNm: a });
    const g = bondGraph(positions(sites), { groups: sites.map((s) => s.cluster) });
    expect(g.members.length).toBe(3);
    expect(edgesOf(g)).toBe(2);
  });
});
