/**
 * Density loads: the discrete charge Σ_j ∫ρ v_j equals the charge inside the box, for every
 * orbital model and both orders, and the cusp subdivision is what makes the 1s charge exact.
 */
import { describe, expect, it } from 'vitest';
import { meshDesign } from '../../../geometry/mesh/index';
import { buildSpace } from '../../../geometry/fem/space';
import { densityLoad } from '../../../geometry/fem/load';
import { chargeOutsideBox } from '../../../geometry/density';
import type { Orbital, Vec3 } from '../../../geometry/design/types';
import { oneSite } from './coulomb-fixtures';

const cases: { name: string; orbital: Orbital; half: number }[] = [
  { name: 'hydrogenic 1s', orbital: { model: 'hydrogenic-1s', radiusNm: 2.5 }, half: 30 },
  { name: 'anisotropic 1s', orbital: { model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 1.4 }, half: 30 },
  { name: 'gaussian', orbital: { model: 'gaussian', sigmaNm: 1.5 }, half: 15 },
];

describe('densityLoad', () => {
  for (const c of cases) {
    for (const order of [1, 2] as const) {
      it(`${c.name}, P${order}: discrete charge = charge inside the box within 1e-6`, () => {
        const position: Vec3 = [0.13, -0.27, 0.41]; // off the mesh vertices on purpose
        const d = oneSite(c.orbital, { half: c.half, order, tol: order === 1 ? 3e-2 : 1e-3, position });
        const { mesh } = meshDesign(d);
        const space = buildSpace(mesh, order);
        const L = densityLoad(space, c.orbital, position);
        // normalisation: each model density integrates to one electron (geometry/density);
        // the box holds all of it except the fraction chargeOutsideBox (analytic tails)
        const inside = 1 - chargeOutsideBox(c.orbital, position, [0, 0, 0], [c.half, c.half, c.half]);
        expect(Math.abs(L.charge - inside)).toBeLessThan(1e-6);
        // partition of unity: the loads sum to the charge
        let s = 0;
        for (const v of L.load) s += v;
        expect(Math.abs(s - L.charge)).toBeLessThan(1e-12);
      });
    }
  }

  it('a coarse quadrature without the cusp treatment misses the charge by far more (the subdivision is needed)', () => {
    const orbital: Orbital = { model: 'hydrogenic-1s', radiusNm: 2.5 };
    const position: Vec3 = [0, 0, 0];
    // a uniform-ish coarse mesh: the size field switched to a large core size
    const d = oneSite(orbital, { half: 30, order: 1, tol: 3e-2 });
    const { mesh } = meshDesign(d, { h0Nm: 2.5 });
    const space = buildSpace(mesh, 1);
    const good = densityLoad(space, orbital, position);
    const crude = densityLoad(space, orbital, position, { degree: 1, pieceTolerance: Infinity });
    const inside = 1 - chargeOutsideBox(orbital, position, [0, 0, 0], [30, 30, 30]);
    expect(Math.abs(good.charge - inside)).toBeLessThan(1e-6);
    expect(Math.abs(crude.charge - inside)).toBeGreaterThan(10 * Math.abs(good.charge - inside));
    expect(good.subdivided).toBeGreaterThan(0);
  });

  it('P2 loads carry the second moment: Σ_j f_j (x_j − x0)² = ∫ρ (x − x0)² = a² for a 1s density', () => {
    // P2 reproduces quadratics, Σ_j (x_j − x0)² v_j = (x − x0)², so the loads must integrate ρ
    // times a quadratic, not only ρ: the quadrature criterion counts the basis degree. For the
    // hydrogen-like 1s density ⟨r²⟩ = 3a², so ⟨(x − x0)²⟩ = a² (standard, any quantum-mechanics text).
    const a = 2.5;
    const orbital: Orbital = { model: 'hydrogenic-1s', radiusNm: a };
    const position: Vec3 = [0.13, -0.27, 0.41];
    const d = oneSite(orbital, { half: 30, order: 2, tol: 1e-3, position });
    const { mesh } = meshDesign(d);
    const space = buildSpace(mesh, 2);
    const L = densityLoad(space, orbital, position);
    let m2 = 0;
    for (let j = 0; j < space.nDofs; j++) {
      const dx = space.dofCoords[3 * j] - position[0];
      m2 += L.load[j] * dx * dx;
    }
    // the box (half-width 12a) cuts a tail of relative size below 1e-7 of the second moment
    expect(Math.abs(m2 - a * a) / (a * a)).toBeLessThan(1e-5);
  });

  it('is deterministic: same input, identical bytes', () => {
    const orbital: Orbital = { model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 1.4 };
    const d = oneSite(orbital, { half: 20, order: 2, tol: 1e-2 });
    const { mesh } = meshDesign(d);
    const space = buildSpace(mesh, 2);
    const a = densityLoad(space, orbital, [0, 0, 0]).load;
    const b = densityLoad(space, orbital, [0, 0, 0]).load;
    expect(Buffer.from(a.buffer).equals(Buffer.from(b.buffer))).toBe(true);
  });
});
