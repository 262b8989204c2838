/** Boundary values: grounded zeros, exact monopole for spherical densities, multipole accuracy. */
import { describe, expect, it } from 'vitest';
import { meshDesign } from '../../../geometry/mesh/index';
import { buildSpace } from '../../../geometry/fem/space';
import { boundaryValues } from '../../../geometry/fem/boundary';
import { potentialAt } from '../../../geometry/density';
import type { Orbital, Vec3 } from '../../../geometry/design/types';
import { oneSite } from './coulomb-fixtures';

const eps = 11.7;

function space(half: number) {
  const d = oneSite({ model: 'gaussian', sigmaNm: 1 }, { half, order: 2, tol: 0.05 });
  return buildSpace(meshDesign(d).mesh, 2);
}

describe('boundaryValues', () => {
  const sp = space(10);
  const center: Vec3 = [0.5, -0.25, 1];

  it('grounded: zero everywhere', () => {
    const g = boundaryValues({ kind: 'grounded' }, { model: 'hydrogenic-1s', radiusNm: 1 }, center, eps, sp.dofCoords, sp.boundaryDof);
    expect(g.every((v) => v === 0)).toBe(true);
  });

  it('spherical density: every order gives the point-charge potential 1/(εr r) on the boundary (Gauss/Newton shell theorem)', () => {
    for (const order of [0, 2, 4]) {
      const g = boundaryValues({ kind: 'multipole', order }, { model: 'hydrogenic-1s', radiusNm: 1 }, center, eps, sp.dofCoords, sp.boundaryDof);
      let checked = 0;
      for (let i = 0; i < sp.nDofs; i++) {
        if (!sp.boundaryDof[i]) {
          expect(g[i]).toBe(0);
          continue;
        }
        const r = Math.hypot(sp.dofCoords[3 * i] - center[0], sp.dofCoords[3 * i + 1] - center[1], sp.dofCoords[3 * i + 2] - center[2]);
        expect(Math.abs(g[i] - 1 / (eps * r))).toBeLessThan(1e-14 / r);
        checked++;
      }
      expect(checked).toBeGreaterThan(100);
    }
  });

  it('anisotropic density: higher orders approach the exact potential (ellipsoidal-shell formula, geometry/density)', () => {
    const sp = space(15); // far enough that the density's own tail inside the boundary is negligible
    const orbital: Orbital = { model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 1.4 };
    const maxErr = (order: number): number => {
      const g = boundaryValues({ kind: 'multipole', order }, orbital, center, eps, sp.dofCoords, sp.boundaryDof);
      let m = 0;
      for (let i = 0; i < sp.nDofs; i += 7) {
        if (!sp.boundaryDof[i]) continue;
        const exact = potentialAt(orbital, center, sp.dofCoords[3 * i], sp.dofCoords[3 * i + 1], sp.dofCoords[3 * i + 2]) / eps;
        m = Math.max(m, Math.abs(g[i] - exact) / exact);
      }
      return m;
    };
    const e0 = maxErr(0), e2 = maxErr(2), e4 = maxErr(4);
    expect(e2).toBeLessThan(e0 / 5);
    expect(e4).toBeLessThan(e2 / 3);
    expect(e4).toBeLessThan(1e-3);
  });

  it('rejects an order outside 0..4', () => {
    expect(() => boundaryValues({ kind: 'multipole', order: 5 }, { model: 'gaussian', sigmaNm: 1 }, center, eps, sp.dofCoords, sp.boundaryDof)).toThrow(/order/);
  });
});
