/**
 * The automatic core-size rule of the size field (geometry/mesh/sizefield.ts) delivers its
 * promise: on the default graded mesh for targetRelError, the true relative error of U is below
 * the target, for the three orbital models and both orders, at cheap tolerances.
 *
 * True error against the closed forms in geometry/density (selfEnergy):
 *  - hydrogen-like 1s of radius a: U = (5/8)·e²/(4πε0 εr a) — the classic first-order helium
 *    integral (5/8 Hartree at a = a0; any quantum-chemistry text);
 *  - Gaussian of width σ: U = e²/(4πε0 εr)/(σ√π) (standard result for Gaussian charges);
 *  - anisotropic 1s (radii a, a, b): the hydrogenic result stretched, (5/8)·G(a/b)/b
 *    (geometry/density stretchFactor, checked there by numerical quadrature);
 *  e²/4πε0 = 1.439964547 eV·nm (CODATA 2018, geometry/units.ts).
 * Boundary: multipole up to order 4 on a box of half-width 16× the largest orbital radius, so
 * the boundary error (below 1e-12 relative here) leaves only the discretisation.
 */
import { describe, expect, it } from 'vitest';
import { meshDesign } from '../../../geometry/mesh/index';
import { energiesOnMesh } from '../../../geometry/fem/coulomb';
import { selfEnergy } from '../../../geometry/density';
import { farFieldCheck } from '../../../geometry/farfield';
import { COULOMB_EV_NM } from '../../../geometry/units';
import type { Orbital } from '../../../geometry/design/types';
import { oneSite } from './coulomb-fixtures';

const models: { name: string; orbital: Orbital; largest: number }[] = [
  { name: 'hydrogenic 1s', orbital: { model: 'hydrogenic-1s', radiusNm: 2.5 }, largest: 2.5 },
  { name: 'Gaussian', orbital: { model: 'gaussian', sigmaNm: 1 }, largest: 2 },
  { name: 'anisotropic 1s', orbital: { model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 1.4 }, largest: 2.5 },
];

describe('automatic core size: default graded meshes meet targetRelError', () => {
  for (const [order, tol] of [[1, 1e-2], [2, 1e-3]] as const) {
    for (const m of models) {
      it(`${m.name}, P${order}, targetRelError ${tol}: true relative error of U below the target`, () => {
        const d = oneSite(m.orbital, { half: 16 * m.largest, order, tol, boundary: { kind: 'multipole', order: 4 } });
        const far = farFieldCheck(d).sites[0];
        expect(far.uRelBound! + 2 * far.chargeOutside).toBeLessThan(1e-3 * tol); // only discretisation counts
        const { mesh } = meshDesign(d);
        const e = energiesOnMesh(d, mesh, order);
        const exact = (COULOMB_EV_NM * selfEnergy(m.orbital)) / d.host.epsilonR;
        const rel = Math.abs(e.uEv[0] - exact) / exact;
        expect(rel).toBeLessThan(tol);
      }, 120_000);
    }
  }
});
