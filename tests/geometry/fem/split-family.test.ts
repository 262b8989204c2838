/**
 * The split's and the lever arms' nested meshes near electrode edges (coulomb-plan.ts splitFamily,
 * lever.ts leverFamily): a given electrodeEdgeNm is the finest level's edge size and the coarser
 * levels scale it with the level, so each level is really coarser at the edges (the size rule:
 * sizefield.ts ElectrodeEdgeSpec).
 * The design is an invented example: one Gaussian donor under a 2 nm oxide and a gate.
 */
import { describe, expect, it } from 'vitest';
import type { Design } from '../../../geometry/design/types';
import { activeSites, splitFamily } from '../../../geometry/fem/coulomb-plan';
import { leverFamily, leverLevelSizes } from '../../../geometry/fem/lever';
import { electrodeEdgeSegments } from '../../../geometry/mesh/device';
import { checkMesh } from '../../../geometry/mesh/check';
import type { TetMesh } from '../../../geometry/mesh/types';
import { siliconOxideVacuum } from '../../fixtures/stacks';

const design: Design = {
  format: 'tetrawell-design',
  version: 2,
  name: 'Gated donor for the split family (invented)',
  host: { material: 'Si', epsilonR: 11.7, latticeConstantNm: 0.5431020511, layers: siliconOxideVacuum(2) },
  sites: [{ id: 'd1', species: 'P', position: [0.2, 0.1, -4], electrons: 1, orbital: { model: 'gaussian', sigmaNm: 0.8 } }],
  domain: { center: [0, 0, -2], halfExtentsNm: [12, 12, 10], boundary: { kind: 'grounded' } },
  electrodes: [{ name: 'gate', minNm: [-3, -3, 2], maxNm: [3, 3, 3.5], voltageV: 0.3 }],
  refinement: { order: 2, targetRelError: 5e-2, maxElements: 2_000_000 },
};

/** longest edge of the tets that touch an electrode edge segment (closed boxes) */
function longestAtEdges(m: TetMesh, seg: Float64Array): number {
  let worst = 0;
  for (let t = 0; t < m.tets.length / 4; t++) {
    const lo = [Infinity, Infinity, Infinity], hi = [-Infinity, -Infinity, -Infinity];
    for (let i = 0; i < 4; i++) {
      const v = 3 * m.tets[4 * t + i];
      for (let a = 0; a < 3; a++) {
        lo[a] = Math.min(lo[a], m.coords[v + a]);
        hi[a] = Math.max(hi[a], m.coords[v + a]);
      }
    }
    let touches = false;
    for (let k = 0; k < seg.length && !touches; k += 6) {
      let gap = 0;
      for (let a = 0; a < 3; a++) gap += Math.max(0, lo[a] - Math.max(seg[k + a], seg[k + 3 + a]), Math.min(seg[k + a], seg[k + 3 + a]) - hi[a]);
      touches = gap === 0;
    }
    if (!touches) continue;
    for (let i = 0; i < 4; i++) {
      for (let j = i + 1; j < 4; j++) {
        const p = 3 * m.tets[4 * t + i], q = 3 * m.tets[4 * t + j];
        worst = Math.max(worst, Math.hypot(m.coords[p] - m.coords[q], m.coords[p + 1] - m.coords[q + 1], m.coords[p + 2] - m.coords[q + 2]));
      }
    }
  }
  return worst;
}

describe('split family with a given electrode-edge size', () => {
  it('three a priori levels, edge sizes h_E·4, h_E·2, h_E (coarsest first), each really coarser at the edges', () => {
    const hE = 0.5;
    const meshes = splitFamily(design, activeSites(design), 2, 3, { electrodeEdgeNm: hE, electrodeEdgeExponent: 1 });
    // before the fix every level got the same edge size, no coarser level was kept, and the
    // family fell back to one uniform refinement of the finest (two levels)
    expect(meshes.length).toBe(3);
    const seg = electrodeEdgeSegments(design);
    const at = meshes.map((m) => longestAtEdges(m, seg));
    meshes.forEach((m, l) => {
      expect(checkMesh(m).ok).toBe(true);
      // the size rule (ElectrodeEdgeSpec): tets touching an edge are no longer than that level's h_E
      expect(at[l]).toBeLessThanOrEqual(hE * Math.pow(2, 2 - l) * (1 + 1e-12));
    });
    // and the coarser levels do use their larger size there
    expect(at[0]).toBeGreaterThan(2 * hE);
    expect(at[1]).toBeGreaterThan(hE);
    expect(meshes[0].coords.length).toBeLessThan(meshes[1].coords.length);
    expect(meshes[1].coords.length).toBeLessThan(meshes[2].coords.length);
  });
});

describe('lever-arm family with a given electrode-edge size', () => {
  it('levels are nested refinements of one base, graded towards the edges: edge sizes h_E·16, h_E·4, h_E for β_E = 1/2 (capped at each level\'s hmax; Apel-type grading, lever.ts leverLevelSizes)', () => {
    const hE = 0.5;
    const sizes = leverLevelSizes(design, 2, 3, { electrodeEdgeNm: hE }, { edgeExponent: 0.5, levelRatio: 2 });
    // the edge size shrinks by 2^{1/(1−β_E)} = 4 per level while hmax halves (the graded part c·d^β_E halves)
    sizes.forEach((z, l) => {
      expect(z.electrodeEdgeNm).toBeCloseTo(Math.min(z.hmaxNm, hE * Math.pow(4, 2 - l)), 12);
      if (l > 0) expect(z.hmaxNm).toBeCloseTo(sizes[l - 1].hmaxNm / 2, 12);
    });
    const meshes = leverFamily(design, 2, 3, { electrodeEdgeNm: hE }, { edgeExponent: 0.5, levelRatio: 2 });
    expect(meshes.length).toBe(3);
    const seg = electrodeEdgeSegments(design);
    const at = meshes.map((m) => longestAtEdges(m, seg));
    meshes.forEach((m, l) => {
      expect(checkMesh(m).ok).toBe(true);
      expect(at[l]).toBeLessThanOrEqual(sizes[l].electrodeEdgeNm * (1 + 1e-12));
    });
    // each level is really coarser at the edges than the next one's size
    expect(at[0]).toBeGreaterThan(sizes[1].electrodeEdgeNm);
    expect(at[1]).toBeGreaterThan(sizes[2].electrodeEdgeNm);
    // nested: refinement only adds vertices, and the coarser level's vertices come first, unchanged
    for (let l = 1; l < 3; l++) {
      const c = meshes[l - 1].coords, f = meshes[l].coords;
      expect(f.length).toBeGreaterThan(c.length);
      expect(Array.from(f.subarray(0, c.length))).toEqual(Array.from(c));
    }
  });
});
