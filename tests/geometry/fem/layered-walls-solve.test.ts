/**
 * A full solve of the anisotropic envelope (no closed form; its quadrupole and hexadecapole do not
 * vanish) in two dielectric half-spaces (silicon under vacuum, Jackson, Classical Electrodynamics
 * 3rd ed., §4.4) with a small multipole box: the layered wall values of order L (geometry/fem/
 * boundary.ts) leave out the orders above L, and U must move towards a large-box reference as L
 * rises, every error bar covering the reference. The reference is the same solver in a box whose
 * walls sit 10 nm or more from the site (its boundary bound is ~4e-8 eV, printed in its budget).
 * Only the boundary order changes between the small-box solves, so their meshes are the same.
 */
import { describe, expect, it } from 'vitest';
import type { Boundary, Design, Orbital, Vec3 } from '../../../geometry/design/types';
import { solveCoulomb } from '../../../geometry/fem/coulomb';
import { siliconDesign } from '../design-fixtures';
import { siliconOxideVacuum } from '../../fixtures/stacks';

const ORB: Orbital = { model: 'anisotropic-1s', radiusNm: 1.0, radiusZNm: 0.6 }; // invented, compact
const SITE: Vec3 = [0.2, -0.1, -4];
const [SILICON, , VACUUM] = siliconOxideVacuum();

function design(half: number, boundary: Boundary): Design {
  const d = siliconDesign({
    name: 'Invented donor 4 nm under a bare silicon surface',
    host: { epsilonR: SILICON.epsilonR },
    sites: [{ id: 's', species: 'P', position: SITE, electrons: 1, orbital: ORB }],
    domain: { center: [0, 0, -2], halfExtentsNm: [half, half, half], boundary },
    refinement: { order: 2, targetRelError: 1e-3, maxElements: 2_000_000 },
  });
  d.host.layers = [
    { ...SILICON, zMaxNm: 0 },
    { ...VACUUM, zMinNm: 0 },
  ];
  return d;
}

describe('layered multipole walls: raising the order lowers the wall error of a small box', () => {
  const ref = solveCoulomb(design(14, { kind: 'multipole', order: 4 }), { method: 'full' }).sites[0];
  const small = [0, 2, 4].map((order) => ({ order, r: solveCoulomb(design(5, { kind: 'multipole', order }), { method: 'full' }) }));

  it('the reference box is large enough that its walls do not matter at this precision', () => {
    expect(ref.budget.boundaryEv).toBeLessThan(1e-6);
  });

  it('every error bar covers the large-box reference', () => {
    for (const { r } of small) expect(Math.abs(r.sites[0].uEv - ref.uEv)).toBeLessThanOrEqual(r.sites[0].uErrorEv + ref.uErrorEv);
  });

  it('the wall error |U_L − U_ref| falls with the order, by more than the discretisation bars', () => {
    const err = small.map(({ r }) => Math.abs(r.sites[0].uEv - ref.uEv));
    const disc = Math.max(...small.map(({ r }) => r.sites[0].budget.discretisationEv)) + ref.budget.discretisationEv;
    // same mesh for every order: only the wall values differ
    expect(new Set(small.map(({ r }) => r.elements)).size).toBe(1);
    expect(err[0] - err[1]).toBeGreaterThan(disc);
    expect(err[1]).toBeLessThan(err[0] / 3);
    expect(err[2]).toBeLessThan(err[0] / 3);
  });
});
