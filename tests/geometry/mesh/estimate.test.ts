/**
 * Element-count estimate before meshing, and the refusals.
 * Theory: the Kuhn bisection ladder (three shapes per halving of the cell side; Maubach 1995 for
 * the Kuhn simplex), checked here against real uniform refinements; the cubature is checked on a
 * closed-form integral; the estimate is checked against real meshes (issue 4: within ±30 %).
 */
import { describe, expect, it } from 'vitest';
import { meshDesign, kuhnBox, refineUniform, toTetMesh, MeshError, LADDER_MEAN_CONSTANT, estimateDesignElements } from '../../../geometry/mesh/index';
import { adaptiveCubature, cellLadderEdges, coreLowerBound, ladderDensity, ladderEdge, ladderVolume } from '../../../geometry/mesh/estimate';
import { sizeFieldFromDesign, chooseInitialCells } from '../../../geometry/mesh/index';
import { computeTetQuality } from '../../../geometry/mesh/quality';
import type { Design, Site } from '../../../geometry/design/types';
import { boxDesign } from '../design-fixtures';

function design(sites: Partial<Site>[], half: [number, number, number], order: 1 | 2, tol: number, maxElements = 5_000_000): Design {
  return boxDesign('estimate test (invented)', sites, half, order, tol, maxElements);
}

describe('Kuhn bisection ladder', () => {
  it('longest edge and volume per generation match real uniform refinements of a cube', () => {
    const s = 2;
    const m = kuhnBox({ center: [0, 0, 0], halfExtents: [1, 1, 1], cells: [1, 1, 1] });
    for (let g = 0; g <= 7; g++) {
      const tm = toTetMesh(m);
      const q = computeTetQuality(tm);
      const L = Math.max(...q.longestEdge);
      expect(L).toBeCloseTo(ladderEdge(s, g), 12);
      expect(Math.min(...q.longestEdge)).toBeCloseTo(ladderEdge(s, g), 12);
      // all tets of a uniform generation have the same volume: the cube's 8 / (6·2^g)
      expect(tm.tets.length / 4).toBe(6 * 2 ** g);
      expect((s ** 3) / (tm.tets.length / 4)).toBeCloseTo(ladderVolume(s, g), 12);
      refineUniform(m, 1);
    }
  });

  it('per-cell ladder edges: √3 s, √2 s, s for a cube; a stretched cell has longer ones', () => {
    const s = 1.7;
    const L = cellLadderEdges([s, s, s]);
    expect(L[0]).toBeCloseTo(Math.sqrt(3) * s, 12);
    expect(L[1]).toBeCloseTo(Math.SQRT2 * s, 12);
    expect(L[2]).toBeCloseTo(s, 12);
    // generation 0 of any box cell: every Kuhn tet contains the main diagonal, the longest edge
    const d: [number, number, number] = [1.2, 1, 0.9];
    expect(cellLadderEdges(d)[0]).toBeCloseTo(Math.hypot(...d), 12);
  });

  it('the log-average of h³ × ladder density is the closed-form constant c ≈ 42.87', () => {
    // midpoint rule in log h over many ladder cycles (the step function is exact per interval)
    const s = 1;
    const lo = Math.log(0.01), hi = Math.log(0.01 * 2 ** 6); // six whole cycles (factor 2 each)
    const n = 600_000;
    let acc = 0;
    for (let i = 0; i < n; i++) {
      const h = Math.exp(lo + ((i + 0.5) * (hi - lo)) / n);
      acc += ladderDensity(s, h) * h ** 3;
    }
    expect(acc / n).toBeCloseTo(LADDER_MEAN_CONSTANT, 3);
    expect(LADDER_MEAN_CONSTANT).toBeGreaterThan(42.8);
    expect(LADDER_MEAN_CONSTANT).toBeLessThan(42.95);
  });
});

describe('adaptive cubature', () => {
  it('integrates a cusped, separable density to its closed form, ∏ 2a(1 − e^{−L/a}) (elementary calculus)', () => {
    const a = 0.7, L = 10;
    const f = (x: number, y: number, z: number) => Math.exp(-(Math.abs(x) + Math.abs(y) + Math.abs(z)) / a);
    const exact = (2 * a * (1 - Math.exp(-L / a))) ** 3;
    // the start cells meet at the cusp planes, so the integrand is smooth inside each cell;
    // split cells that are large against a or against their distance to the peak at the origin
    const split = (l: readonly number[], u: readonly number[]) => {
      const size = u[0] - l[0];
      const dist = Math.hypot(...([0, 1, 2].map((k) => (l[k] <= 0 && u[k] >= 0 ? 0 : Math.min(Math.abs(l[k]), Math.abs(u[k])))) as [number, number, number]));
      return size > 0.25 * a && size > 0.25 * dist;
    };
    const r = adaptiveCubature(f, [-L, -L, -L], [L, L, L], { cells: [2, 2, 2], split });
    expect(Math.abs(r.value - exact) / exact).toBeLessThan(2e-4);
    expect(r.aborted).toBe(false);
    // early stop: the running sum of a positive integrand only grows
    const s = adaptiveCubature(f, [-L, -L, -L], [L, L, L], { cells: [2, 2, 2], split, stopAbove: exact / 10 });
    expect(s.aborted).toBe(true);
  });
});

describe('estimate against real meshes', () => {
  const cases: [string, Design][] = [
    ['one P donor, P1', design([{ position: [0, 0, 0] }], [25, 25, 25], 1, 1e-2)],
    ['one P donor off-centre, P2, oblong box', design([{ position: [3.1, -2.2, 5.4] }], [30, 20, 25], 2, 1e-4)],
    ['donor pair 8 nm apart, P1', design([{ position: [-4, 0, 0] }, { position: [4, 0, 0] }], [30, 25, 25], 1, 1e-2)],
    ['row of five, Gaussian orbitals, P2', design([0, 1, 2, 3, 4].map((i) => ({ position: [6 * i - 12, 0.5, -0.5] as [number, number, number], orbital: { model: 'gaussian' as const, sigmaNm: 1.2 } })), [35, 20, 20], 2, 1e-3)],
    ['4×4×3 donor array 5 nm apart, P1 (48 sites: the site-grid path)', design(Array.from({ length: 48 }, (_, i) => ({ position: [5 * (i % 4) - 7.5, 5 * (Math.floor(i / 4) % 4) - 7.5, 5 * Math.floor(i / 16) - 5] as [number, number, number] })), [30, 30, 30], 1, 0.1)],
    ['anisotropic orbital near a face, P1, small cap', design([{ position: [0, 0, 14], orbital: { model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 1.4 } }], [20, 20, 18], 1, 3e-2)],
  ];
  for (const [name, d] of cases) {
    it(`within ±30 % of the actual count: ${name}`, () => {
      const r = meshDesign(d);
      const ratio = r.estimate / r.stats.tets;
      console.log(`estimate ${name}: ${Math.round(r.estimate)} vs ${r.stats.tets} tets, ratio ${ratio.toFixed(3)}`);
      expect(ratio).toBeGreaterThan(0.7);
      expect(ratio).toBeLessThan(1.3);
      expect(r.stats.tets).toBe(r.mesh.tets.length / 4);
      // the quick lower bound used for early refusals is a bound indeed, and not a trivial one
      const h = d.domain.halfExtentsNm;
      const lower = coreLowerBound(sizeFieldFromDesign(d).spec, h.map((x) => -x), h, chooseInitialCells(h, 2));
      expect(lower).toBeLessThanOrEqual(r.stats.tets);
      expect(lower).toBeGreaterThan(0);
    });
  }
});

describe('refusals', () => {
  it('refuses a design whose estimate exceeds maxElements, before meshing, with the figures', () => {
    const d = design([{ position: [0, 0, 0] }], [25, 25, 25], 1, 1e-3, 10_000);
    let err: unknown;
    try {
      meshDesign(d);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(MeshError);
    const me = err as MeshError;
    expect(me.code).toBe('too-many-elements');
    expect(me.message).toMatch(/maxElements \(10000\)/);
    expect(me.details.estimate).toBeGreaterThan(10_000);
  });

  it('never returns a mesh above maxElements: the running guard catches an estimate that was low', () => {
    const d = design([{ position: [0.4, 0.1, -0.3] }], [25, 25, 25], 1, 1e-2);
    const free = meshDesign(d);
    const limit = Math.floor((free.estimate + free.stats.tets) / 2);
    const tight = { ...d, refinement: { ...d.refinement, maxElements: limit } };
    if (free.estimate < free.stats.tets) {
      // the estimate passes the limit check, the mesh itself would not
      expect(() => meshDesign(tight)).toThrow(expect.objectContaining({ code: 'too-many-elements' }));
    } else {
      // the estimate is refused up front
      expect(() => meshDesign(tight)).toThrow(expect.objectContaining({ code: 'too-many-elements' }));
      expect(meshDesign({ ...d, refinement: { ...d.refinement, maxElements: Math.ceil(free.estimate) } }).stats.tets).toBeLessThanOrEqual(Math.ceil(free.estimate));
    }
  });

  it('refuses a large array (20 000 sites) from the quick lower bound, with the figures', () => {
    const sites = Array.from({ length: 20_000 }, (_, i) => ({ position: [2 * (i % 50) - 49, 2 * (Math.floor(i / 50) % 50) - 49, 2 * Math.floor(i / 2500) - 7] as [number, number, number] }));
    const d = design(sites, [60, 60, 20], 1, 1e-2, 2_000_000);
    let err: unknown;
    try {
      meshDesign(d);
    } catch (e) {
      err = e;
    }
    expect((err as MeshError).code).toBe('too-many-elements');
    expect((err as MeshError).message).toMatch(/needs at least \d+ tetrahedra/);
    expect((err as MeshError).details.estimate).toBeGreaterThan(2_000_000);
  });

  it('refuses above the server-wide cap even when maxElements allows it', () => {
    const d = design([{ position: [0, 0, 0] }], [25, 25, 25], 1, 1e-3, 50_000_000);
    let err: unknown;
    try {
      meshDesign(d, { hardCap: 20_000 });
    } catch (e) {
      err = e;
    }
    expect((err as MeshError).code).toBe('too-many-elements');
    expect((err as MeshError).message).toMatch(/server cap \(20000\)/);
  });

  it('a flat box (half-extents 1e6 × 1e6 × 1e-6 nm) is refused from its initial grid alone, before any allocation', () => {
    const d = design([{ position: [0, 0, 0] }], [1e6, 1e6, 1e-6], 1, 1e-2);
    const e = estimateDesignElements(d);
    // near-cubic cells: 2 across the thinnest axis, so 2e6/1e-6 = 2e12 along the others, 6 Kuhn tets each
    expect(e.cells).toEqual([2e12, 2e12, 2]);
    expect(e.stoppedBy).toBe('initial-grid');
    expect(e.aborted).toBe(true);
    expect(e.estimate).toBe(6 * 2e12 * 2e12 * 2);
    expect(e.leaves).toBe(0);
    let err: unknown;
    try {
      meshDesign(d);
    } catch (x) {
      err = x;
    }
    expect((err as MeshError).code).toBe('too-many-elements');
    expect((err as MeshError).message).toMatch(/longest\/shortest 1\.00e\+12\) need .* initial cells, 4\.80e\+25 tetrahedra before any refinement/);
  });

  it('the work bound stops the cubature with a lower bound (the integrand is positive: common practice)', () => {
    const d = design([{ position: [0.4, 0.1, -0.3] }], [25, 25, 25], 1, 1e-2);
    const full = estimateDesignElements(d);
    expect(full.stoppedBy).toBeNull();
    const cut = estimateDesignElements(d, { maxEstimateLeaves: 50 });
    expect(cut.stoppedBy).toBe('work');
    expect(cut.aborted).toBe(true);
    expect(cut.leaves).toBe(50);
    expect(cut.estimate).toBeLessThanOrEqual(full.estimate);
    // a gaussian σ = 1e-3 nm (valid, but a hundred times below a/100) with the default limits
    // answers at once: the count passes min(maxElements, server cap) and the estimate stops
    const tiny = design([{ position: [0, 0, 0], orbital: { model: 'gaussian', sigmaNm: 1e-3 } }], [2.2, 2.2, 0.005], 2, 1e-3, 2_000_000);
    const t = estimateDesignElements(tiny);
    expect(t.aborted).toBe(true);
    expect(t.estimate).toBeGreaterThan(2_000_000);
  });

  it('refuses a degenerate domain (zero, negative, NaN extent) with a clear error', () => {
    for (const half of [[0, 10, 10], [10, -1, 10], [10, 10, Number.NaN]] as [number, number, number][]) {
      let err: unknown;
      try {
        meshDesign(design([{ position: [0, 0, 0] }], half, 1, 1e-2));
      } catch (e) {
        err = e;
      }
      expect(err).toBeInstanceOf(MeshError);
      expect((err as MeshError).code).toBe('degenerate-box');
      expect((err as MeshError).message).toMatch(/domain is degenerate/);
    }
  });
});

describe('coreLowerBound counts each voxel once', () => {
  // Reference: the voxels (side a/4) lying wholly inside some ball of radius a, counted with a Set
  // of "i,j,k" strings over each ball's index range (plain geometry: a box lies inside a ball when
  // its farthest corner does). The box is wide enough that flat voxel indices pass 2^32.
  const a = 1, side = a / 4;
  const boxMin = [-5000, -5000, -5], boxMax = [5000, 5000, 5];
  const cells: [number, number, number] = [1000, 1000, 1];
  const reference = (pos: Float64Array): number => {
    const seen = new Set<string>();
    for (let q = 0; q < pos.length; q += 3) {
      const c = [pos[q], pos[q + 1], pos[q + 2]];
      const lo = c.map((v, ax) => Math.floor((v - a - boxMin[ax]) / side));
      const hi = c.map((v, ax) => Math.floor((v + a - boxMin[ax]) / side));
      for (let k = lo[2]; k <= hi[2]; k++)
        for (let j = lo[1]; j <= hi[1]; j++)
          for (let i = lo[0]; i <= hi[0]; i++) {
            const far = [i, j, k].map((t, ax) => {
              const l = boxMin[ax] + t * side;
              return Math.max(Math.abs(c[ax] - l), Math.abs(c[ax] - l - side));
            });
            if (far[0] ** 2 + far[1] ** 2 + far[2] ** 2 <= a * a) seen.add(`${i},${j},${k}`);
          }
    }
    return seen.size;
  };
  const bound = (pos: Float64Array) => coreLowerBound({ exponent: 1, hmaxNm: 100, classes: [{ h0Nm: 0.5, coreRadiusNm: a, positions: pos }] }, boxMin, boxMax, cells);

  it('matches a string-keyed reference count for 400 overlapping cores near the far corner', () => {
    const pos = new Float64Array(3 * 400);
    for (let s = 0; s < 400; s++) {
      // a 20 × 20 grid, spacing 0.7 a: neighbouring cores overlap, so shared voxels must count once
      pos[3 * s] = 4980 - 0.7 * (s % 20) + 0.013 * s;
      pos[3 * s + 1] = 4980 - 0.7 * Math.floor(s / 20);
      pos[3 * s + 2] = 0.1 * ((s % 7) - 3);
    }
    const one = new Float64Array([0.01, 0.02, 0.03]);
    const n = reference(pos), n1 = reference(one);
    expect(n).toBeGreaterThan(4096); // several table growths
    expect(n).toBeLessThan(400 * n1); // the overlap is real
    expect(bound(pos) / bound(one)).toBeCloseTo(n / n1, 9);
  });
});
