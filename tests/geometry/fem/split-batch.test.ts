/**
 * The batched reaction right-hand side (split.ts reactionRhsBatch) gives every site the vector the
 * single-site reactionRhs gives (the same integrals; only the loop order over sites changes), and
 * the vector is not trivially zero: b = −∫(ε − ε_i)∇φ_s·∇v sums to zero over all dofs (the basis is
 * a partition of unity, so Σ_k ∇v_k = 0: a check of the assembly that needs no reference value).
 */
import { describe, expect, it } from 'vitest';
import type { Design } from '../../../geometry/design/types';
import { reactionRhs, reactionRhsBatch, SPLIT_RHS_DEGREE } from '../../../geometry/fem/split';
import { enclosedCharge } from '../../../geometry/density';
import { GEOM_SIZE, mapBary, p2GradientsBary, tetGeometry, tetQuadrature } from '../../../geometry/fem/reference';
import type { FeSpace } from '../../../geometry/fem/space';
import type { TetMesh } from '../../../geometry/mesh/types';
import { ELECTRODE_REGION } from '../../../geometry/mesh/device';
import { erf } from '../../../geometry/density';
import { deviceMesh, epsByRegion, epsilonAt } from '../../../geometry/fem/device';
import { buildSpace } from '../../../geometry/fem/space';
import { meshDesign } from '../../../geometry/mesh/index';

const design: Design = {
  format: 'tetrawell-design',
  version: 2,
  name: 'three donors under oxide (invented)',
  host: {
    material: 'Si', epsilonR: 11.7, latticeConstantNm: 0.5431,
    // Si 11.7, SiO₂ 3.9 (Sze & Ng, Physics of Semiconductor Devices, from memory)
    layers: [{ name: 'silicon', epsilonR: 11.7, zMinNm: null, zMaxNm: 0 }, { name: 'oxide', epsilonR: 3.9, zMinNm: 0, zMaxNm: null }],
  },
  sites: [
    { id: 'a', species: 'P', position: [-2, 0, -3], electrons: 1, orbital: { model: 'gaussian', sigmaNm: 0.8 } },
    { id: 'b', species: 'P', position: [2, 1, -4], electrons: 1, orbital: { model: 'hydrogenic-1s', radiusNm: 1.2 } },
    { id: 'c', species: 'P', position: [0, -1, 2], electrons: 1, orbital: { model: 'gaussian', sigmaNm: 0.5 } },
  ],
  domain: { center: [0, 0, 0], halfExtentsNm: [8, 8, 8], boundary: { kind: 'grounded' } },
  refinement: { order: 2, targetRelError: 1e-1, maxElements: 2_000_000 },
};

describe('reactionRhsBatch', () => {
  it('equals reactionRhs site by site (P1 and P2), and each vector sums to zero', () => {
    for (const order of [1, 2] as const) {
      const mesh = deviceMesh(design, meshDesign(design, { order }).mesh);
      const space = buildSpace(mesh, order);
      const eps = epsByRegion(design);
      const sources = design.sites.map((s) => ({ orbital: s.orbital!, center: s.position, epsSite: epsilonAt(design, s.position[2]) }));
      const batch = reactionRhsBatch(space, mesh, eps, sources);
      sources.forEach((src, k) => {
        const one = reactionRhs(space, mesh, eps, src.epsSite, src.orbital, src.center);
        let scale = 0, diff = 0, sum = 0;
        for (let i = 0; i < one.length; i++) {
          scale = Math.max(scale, Math.abs(one[i]));
          diff = Math.max(diff, Math.abs(one[i] - batch[k][i]));
          sum += batch[k][i];
        }
        expect(scale).toBeGreaterThan(0);
        expect(diff).toBeLessThanOrEqual(1e-13 * scale);
        expect(Math.abs(sum)).toBeLessThanOrEqual(1e-10 * scale * Math.sqrt(one.length));
      });
    }
  });
});

describe('enclosedCharge', () => {
  it('is 1 − the closed-form tail at every radius, the far shortcut included (1s: e^{−t}(1 + t + t²/2), t = 2r/a; Gaussian: erfc(w) + (2/√π) w e^{−w²}, w = r/(σ√2); textbook integrals)', () => {
    const a = 1.3, s = 0.7;
    for (const t of [0.5, 3, 20, 49.9, 50.1, 80]) {
      const r = (t * a) / 2;
      expect(Math.abs(enclosedCharge({ model: 'hydrogenic-1s', radiusNm: a }, r) - (1 - Math.exp(-t) * (1 + t + t * t / 2)))).toBeLessThan(1e-15);
    }
    for (const w of [0.3, 2, 5, 6.9, 7.1, 12]) {
      const r = w * s * Math.SQRT2;
      expect(Math.abs(enclosedCharge({ model: 'gaussian', sigmaNm: s }, r) - (erf(w) - (2 / Math.sqrt(Math.PI)) * w * Math.exp(-w * w)))).toBeLessThan(1e-15);
    }
  });
});

/** The right-hand side with the 80-point rule on every element (the rule before the far-element shortcut). */
function referenceRhs(space: FeSpace, mesh: TetMesh, eps: ArrayLike<number>, epsSite: number, orbital: Parameters<typeof enclosedCharge>[0], center: readonly number[]): Float64Array {
  const nLoc = space.dofsPerTet;
  const b = new Float64Array(space.nDofs);
  const rule = tetQuadrature(SPLIT_RHS_DEGREE);
  const g = new Float64Array(GEOM_SIZE), x = new Float64Array(3), grad = new Float64Array(30), l = new Float64Array(4);
  for (let t = 0; t < space.nTets; t++) {
    const r = mesh.tetRegion[t];
    if (r === ELECTRODE_REGION || eps[r] === epsSite) continue;
    const [a, bb, c, d] = [mesh.tets[4 * t], mesh.tets[4 * t + 1], mesh.tets[4 * t + 2], mesh.tets[4 * t + 3]];
    tetGeometry(mesh.coords, a, bb, c, d, g);
    if (space.order === 1) for (let i = 0; i < 12; i++) grad[i] = g[i];
    for (let q = 0; q < rule.n; q++) {
      for (let k = 0; k < 4; k++) l[k] = rule.bary[4 * q + k];
      mapBary(mesh.coords, a, bb, c, d, l, x);
      if (space.order === 2) p2GradientsBary(l, g, grad);
      const dx = x[0] - center[0], dy = x[1] - center[1], dz = x[2] - center[2];
      const rr = Math.hypot(dx, dy, dz);
      const f = -enclosedCharge(orbital, rr) / (epsSite * rr ** 3);
      const w = -(eps[r] - epsSite) * rule.weights[q] * 6 * g[12] * f;
      for (let i = 0; i < nLoc; i++) b[space.tetDofs[nLoc * t + i]] += w * (dx * grad[3 * i] + dy * grad[3 * i + 1] + dz * grad[3 * i + 2]);
    }
  }
  return b;
}

describe('far elements take the 15-point rule', () => {
  it('the right-hand side stays within 1e-6 (relative to its largest entry) of the 80-point rule on every element, sites near and far from the interface', () => {
    const mesh = deviceMesh(design, meshDesign(design, { order: 2 }).mesh);
    const space = buildSpace(mesh, 2);
    const eps = epsByRegion(design);
    for (const s of design.sites) {
      const epsSite = epsilonAt(design, s.position[2]);
      const fast = reactionRhs(space, mesh, eps, epsSite, s.orbital!, s.position);
      const ref = referenceRhs(space, mesh, eps, epsSite, s.orbital!, s.position);
      let scale = 0, diff = 0;
      for (let i = 0; i < ref.length; i++) {
        scale = Math.max(scale, Math.abs(ref[i]));
        diff = Math.max(diff, Math.abs(ref[i] - fast[i]));
      }
      expect(scale).toBeGreaterThan(0);
      expect(diff).toBeLessThanOrEqual(1e-6 * scale);
    }
  });
});
