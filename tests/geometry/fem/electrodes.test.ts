/**
 * The electrodes' Dirichlet dofs (geometry/fem/electrodes.ts electrodeDofs), the one function of the
 * Coulomb solve and the lever arms. The reference is the definition of the Dirichlet set of a metal
 * held at a fixed voltage (every point in or on the metal; Jackson, Classical Electrodynamics 3rd
 * ed., §1.9, the Dirichlet boundary condition; from memory): each node of the space, P2 edge
 * midpoints included, is tested here against the boxes by plain coordinates, independently of the
 * mesh's vertex tags.
 */
import { describe, expect, it } from 'vitest';
import type { Design, Electrode } from '../../../geometry/design/types';
import { meshDesign, NO_ELECTRODE } from '../../../geometry/mesh/index';
import { deviceMesh } from '../../../geometry/fem/device';
import { electrodeDofs } from '../../../geometry/fem/electrodes';
import { buildSpace } from '../../../geometry/fem/space';

/** Two gates touching along x = 0 (an invented split gate: one metal in two parts at two voltages). */
function touchingGates(): Design {
  return {
    format: 'tetrawell-design',
    version: 2,
    name: 'Split gate on a cap (invented)',
    host: { material: 'Si', epsilonR: 11.7, latticeConstantNm: 0.5431020511 },
    sites: [{ id: 'd1', species: 'P', position: [0.5, 0, -3], electrons: 1, orbital: { model: 'gaussian', sigmaNm: 0.8 } }],
    domain: { center: [0, 0, 0], halfExtentsNm: [6, 6, 6], boundary: { kind: 'grounded' }, electrodeWalls: 'zero-normal-field' },
    electrodes: [
      { name: 'left', minNm: [-4, -2, 1], maxNm: [0, 2, 2], voltageV: 0.1 },
      { name: 'right', minNm: [0, -2, 1], maxNm: [4, 2, 2], voltageV: -0.1 },
    ],
    refinement: { order: 2, targetRelError: 0.3, maxElements: 400_000 },
  };
}

const inBox = (e: Electrode, x: number, y: number, z: number): boolean =>
  x >= e.minNm[0] && x <= e.maxNm[0] && y >= e.minNm[1] && y <= e.maxNm[1] && z >= e.minNm[2] && z <= e.maxNm[2];
const strictlyIn = (e: Electrode, x: number, y: number, z: number): boolean =>
  x > e.minNm[0] && x < e.maxNm[0] && y > e.minNm[1] && y < e.maxNm[1] && z > e.minNm[2] && z < e.maxNm[2];

describe('electrodeDofs', () => {
  for (const order of [1, 2] as const) {
    it(`P${order}: a node is an electrode's exactly when it lies in or on a box; a node strictly inside a box belongs to that electrode, also beside a touching one`, () => {
      const d = touchingGates();
      const space = buildSpace(deviceMesh(d, meshDesign(d, { order }).mesh), order);
      const dofs = electrodeDofs(space, d);
      const els = d.electrodes!;
      let strict = 0;
      for (let i = 0; i < space.nDofs; i++) {
        const x = space.dofCoords[3 * i], y = space.dofCoords[3 * i + 1], z = space.dofCoords[3 * i + 2];
        const g = dofs.electrodeOfDof[i];
        const holder = els.findIndex((e) => inBox(e, x, y, z));
        expect(g === NO_ELECTRODE ? -1 : g).toBe(holder);
        // a node inside the right gate is the right gate's, never left free (the old P2 edge rule
        // left the midpoints of edges from the shared face into the right gate free)
        els.forEach((e, k) => {
          if (strictlyIn(e, x, y, z)) {
            strict++;
            expect(g).toBe(k);
          }
        });
        expect(dofs.fixed[i]).toBe(g === NO_ELECTRODE ? 0 : 1); // zero-normal-field walls: only the metal is fixed
      }
      expect(strict).toBeGreaterThan(0);
      expect(dofs.perElectrode.every((n) => n > 0)).toBe(true);
    });
  }
});
