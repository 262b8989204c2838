/**
 * The batched reaction right-hand side (split.ts reactionRhsBatch) gives every site the vector the
 * single-site reactionRhs gives (the same integrals; only the loop order over sites changes), and
 * the vector is not trivially zero: b = −∫(ε − ε_i)∇φ_s·∇v sums to zero over all dofs (the basis is
 * a partition of unity, so Σ_k ∇v_k = 0: a check of the assembly that needs no reference value).
 */
import { describe, expect, it } from 'vitest';
import type { Design } from '../../../geometry/design/types';
import { enclosedCharge, reactionRhs, reactionRhsBatch } from '../../../geometry/fem/split';
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
