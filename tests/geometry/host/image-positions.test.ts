/**
 * Where the images of geometry/host/images.ts sit (`imageZ`) and which are mirrored (`mirror`),
 * the data the layered multipole walls use (geometry/fem/boundary.ts). Checked against what an
 * image is: a point whose distance from the observation height is the series' own height h_k
 * (Jackson, Classical Electrodynamics 3rd ed., §4.4: images on the vertical through the source),
 * that stays put when only the observation point moves within its region, and that moves with
 * the source (a copy) or against it (a mirror image) when the source moves. A mirror image is
 * one that took an odd number of reflections, so a single interface's reflected image is one
 * (its position 2a − z₀, Jackson §4.4) and the direct and transmitted terms are not.
 */
import { describe, expect, it } from 'vitest';
import { imageSeries, planarStack, type PlanarStack } from '../../../geometry/host';
import { siliconOxideVacuum } from '../../fixtures/stacks';

const slab = planarStack(siliconOxideVacuum(5)).stack!;
const half = planarStack([
  { name: 'silicon', epsilonR: 11.7, zMinNm: null, zMaxNm: 0 },
  { name: 'vacuum', epsilonR: 1, zMinNm: 0, zMaxNm: null },
]).stack!;
const plates = planarStack(
  [{ name: 'oxide', epsilonR: 3.9, zMinNm: null, zMaxNm: null }],
  [
    { name: 'back', side: 'below', zNm: 0 },
    { name: 'top', side: 'above', zNm: 6 },
  ],
).stack!;

/** (source, observation) heights covering every region pair of each stack. */
const CASES: { name: string; stack: PlanarStack; pairs: [number, number][] }[] = [
  { name: 'two half-spaces', stack: half, pairs: [[-3, -1], [-3, 2], [2, -4], [1.5, 3]] },
  { name: 'slab', stack: slab, pairs: [[-3, -1], [-3, 2], [-3, 7], [2, 3], [2, -1], [2, 8], [7, 9], [7, 1], [7, -2], [-1, -1]] },
  { name: 'plates', stack: plates, pairs: [[2, 4], [3.5, 1]] },
];

describe('image positions and mirror flags', () => {
  for (const c of CASES)
    it(c.name, () => {
      const dz = 0.05;
      for (const [z0, z] of c.pairs) {
        const opts = { maxRoundTrips: 40 };
        const s = imageSeries(c.stack, z0, z, opts).series!;
        const moved = imageSeries(c.stack, z0, z + dz, opts).series!; // observation moved
        const src = imageSeries(c.stack, z0 + dz, z, opts).series!; // source moved
        expect(s.count).toBeGreaterThan(0);
        expect(moved.count).toBe(s.count);
        expect(src.count).toBe(s.count);
        for (let k = 0; k < s.count; k++) {
          expect(Math.abs(z - s.imageZ[k])).toBeCloseTo(s.height[k], 12);
          expect(moved.imageZ[k]).toBeCloseTo(s.imageZ[k], 12);
          expect(src.imageZ[k] - s.imageZ[k]).toBeCloseTo(s.mirror[k] ? -dz : dz, 12);
        }
        if (s.direct >= 0) expect(s.mirror[s.direct]).toBe(0);
      }
    });

  it('one interface: the reflected image sits at 2a − z₀ and is mirrored; the transmitted one sits at the source', () => {
    const same = imageSeries(half, -3, -1).series!;
    expect(same.count).toBe(2);
    expect(same.imageZ[1]).toBeCloseTo(3, 12);
    expect(same.mirror[1]).toBe(1);
    const across = imageSeries(half, -3, 2).series!;
    expect(across.count).toBe(1);
    expect(across.imageZ[0]).toBeCloseTo(-3, 12);
    expect(across.mirror[0]).toBe(0);
  });
});
