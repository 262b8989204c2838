/**
 * The default electrode-edge rule (geometry/mesh/edge-rule.ts) and how the split family takes it
 * (coulomb-plan.ts familyEdge): h_E = min over sites of D·(tol/C)^{1/(2λ)}, D the distance to the
 * nearest electrode edge. The designs are invented examples (one or two donors under a 5 nm oxide
 * and a gate); permittivities Si 11.7, SiO₂ 3.9, vacuum 1 (Sze & Ng, Physics of Semiconductor
 * Devices, 3rd ed., appendix tables; from memory).
 */
import { describe, expect, it } from 'vitest';
import type { Design } from '../../../geometry/design/types';
import { EDGE_RULE_RATE, EDGE_RULE_CONSTANT, EDGE_RULE_EXPONENT, EDGE_WEIGHT_POWER, electrodeEdgeRule, nearestEdgeDistance } from '../../../geometry/mesh/edge-rule';
import { electrodeEdgeSegments } from '../../../geometry/mesh/device';
import { activeSites, familyEdge } from '../../../geometry/fem/coulomb-plan';
import { orbitalLengths } from '../../../geometry/density';
import { resolveOrbital } from '../../../geometry/design/presets';
import { siliconOxideVacuum } from '../../fixtures/stacks';

function gated(depthNm: number, target: number, extraSite = false): Design {
  return {
    format: 'tetrawell-design',
    version: 2,
    name: 'Gated donor for the edge rule (invented)',
    host: { material: 'Si', epsilonR: 11.7, latticeConstantNm: 0.5431020511, layers: siliconOxideVacuum(5) },
    sites: [
      { id: 'a', species: 'P', position: [0, 0, -depthNm], electrons: 1 },
      ...(extraSite ? [{ id: 'b', species: 'P' as const, position: [3, 0, -depthNm] as [number, number, number], electrons: 1 }] : []),
    ],
    domain: { center: [0, 0, -10], halfExtentsNm: [30, 30, 30], boundary: { kind: 'multipole', order: 2 } },
    // the gate's edge along y at x = 4, z = 5 is the nearest to site a
    electrodes: [{ name: 'gate', minNm: [4, -8, 5], maxNm: [14, 8, 7], voltageV: 0.2 }],
    refinement: { order: 2, targetRelError: target, maxElements: 2_000_000 },
  };
}

describe('electrode-edge rule', () => {
  it('h_E = D·(tol/(C (ℓ/D)^μ))^(1/EDGE_RULE_RATE) with D by Pythagoras to the nearest edge (the rule of edge-rule.ts)', () => {
    const d = gated(10, 1e-3);
    const r = electrodeEdgeRule(d)!;
    // site (0, 0, −10), edge x = 4, z = 5: D = √(4² + 15²) (Pythagoras)
    const D = Math.hypot(4, 15);
    expect(r.distanceNm).toBeCloseTo(D, 12);
    // one site: ℓ is its orbital's core length
    const ell = orbitalLengths(resolveOrbital(d.sites[0])).core;
    expect(r.lengthNm).toBe(ell);
    expect(r.hNm).toBeCloseTo(D * Math.pow(1e-3 / (EDGE_RULE_CONSTANT * Math.pow(ell / D, EDGE_WEIGHT_POWER)), 1 / EDGE_RULE_RATE), 12);
    expect(r.exponent).toBe(EDGE_RULE_EXPONENT);
    expect(r.siteId).toBe('a');
  });

  it('nearestEdgeDistance agrees with a brute-force walk along every segment', () => {
    const d = gated(10, 1e-3);
    const seg = electrodeEdgeSegments(d);
    for (const p of [[0, 0, -10], [9, 0, -3], [20, 12, 2], [4, 8, 6]] as [number, number, number][]) {
      let brute = Infinity;
      for (let k = 0; k < seg.length; k += 6) {
        for (let t = 0; t <= 4000; t++) {
          const x = seg[k] + ((seg[k + 3] - seg[k]) * t) / 4000, y = seg[k + 1] + ((seg[k + 4] - seg[k + 1]) * t) / 4000, z = seg[k + 2] + ((seg[k + 5] - seg[k + 2]) * t) / 4000;
          brute = Math.min(brute, Math.hypot(p[0] - x, p[1] - y, p[2] - z));
        }
      }
      // the walk's step is at most 16/4000 nm, so it lies within that of the exact distance
      expect(Math.abs(nearestEdgeDistance(seg, p) - brute)).toBeLessThan(16 / 4000);
    }
  });

  it('is monotone: a looser target or a deeper site gives a larger h_E; the nearer site sets it', () => {
    const tols = [3e-4, 1e-3, 3e-3, 1e-2];
    const byTol = tols.map((t) => electrodeEdgeRule(gated(10, t))!.hNm);
    for (let k = 1; k < byTol.length; k++) expect(byTol[k]).toBeGreaterThan(byTol[k - 1]);
    const depths = [4, 10, 20, 30];
    const byDepth = depths.map((z) => electrodeEdgeRule(gated(z, 1e-3))!.hNm);
    for (let k = 1; k < byDepth.length; k++) expect(byDepth[k]).toBeGreaterThan(byDepth[k - 1]);
    // site b at x = 3 is 1 nm from the edge's x: nearer than a, so b sets h_E
    const two = electrodeEdgeRule(gated(10, 1e-3, true))!;
    expect(two.siteId).toBe('b');
    expect(two.distanceNm).toBeCloseTo(Math.hypot(1, 15), 12);
    // and a nearer neighbour (V's length) weighs more than the core length alone: ℓ = 3 nm, the pair's distance
    expect(two.lengthNm).toBe(Math.max(3, orbitalLengths(resolveOrbital(gated(10, 1e-3).sites[0])).core));
  });

  it('is deterministic, and null without electrodes or for a gate outside the domain', () => {
    expect(electrodeEdgeRule(gated(10, 1e-3))).toEqual(electrodeEdgeRule(gated(10, 1e-3)));
    const bare = { ...gated(10, 1e-3), electrodes: [] };
    expect(electrodeEdgeRule(bare)).toBeNull();
    const away = { ...gated(10, 1e-3), electrodes: [{ name: 'far', minNm: [100, 100, 5], maxNm: [110, 110, 7], voltageV: 0 }] } as Design;
    expect(electrodeEdgeRule(away)).toBeNull();
  });

  it('the split family takes the rule unless electrodeEdgeNm / electrodeEdgeExponent are given (coulomb-plan.ts familyEdge)', () => {
    const d = gated(10, 1e-3);
    const sites = activeSites(d);
    const rule = electrodeEdgeRule(d)!;
    expect(familyEdge(d, sites, {})).toEqual({ edgeNm: rule.hNm, exponent: rule.exponent });
    // a given size alone keeps the size field's own default β_E (sizefield.ts electrodeEdgeExponent), as before the rule
    expect(familyEdge(d, sites, { electrodeEdgeNm: 0.7 })).toEqual({ edgeNm: 0.7 });
    expect(familyEdge(d, sites, { electrodeEdgeExponent: 0.75 })).toEqual({ edgeNm: rule.hNm, exponent: 0.75 });
    expect(familyEdge(d, sites, { electrodeEdgeNm: 0.7, electrodeEdgeExponent: 0.75 })).toEqual({ edgeNm: 0.7, exponent: 0.75 });
    // no electrodes: nothing set, so such designs mesh exactly as before
    const bare = { ...d, electrodes: [] };
    expect(familyEdge(bare, activeSites(bare), {})).toEqual({});
  });
});
