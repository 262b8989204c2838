/**
 * Nearest-site distances in the design summary, checked on the diamond lattice of silicon:
 * - nearest-neighbour (bond) distance a·√3/4 (Kittel, Introduction to Solid State Physics, ch. 1);
 * - a = 0.5431020511 nm (CODATA 2018);
 * - sites along [110] at k·a·(1,1,0) are k·a·√2 apart (plain Euclidean geometry).
 */
import { describe, expect, it } from 'vitest';
import { countBySpecies, nearestNeighbourDistances, smallestSeparation, type SiteLike } from '../../app/src/features/design/siteSummary';

const A = 0.5431020511;

describe('nearestNeighbourDistances', () => {
  it('gives the Si bond length for two atoms of the diamond basis', () => {
    const sites: SiteLike[] = [
      { id: 'a', species: 'P', position: [0, 0, 0] },
      { id: 'b', species: 'P', position: [A / 4, A / 4, A / 4] },
    ];
    const d = nearestNeighbourDistances(sites);
    const bond = (A * Math.sqrt(3)) / 4;
    expect(d[0]).toBeCloseTo(bond, 12);
    expect(d[1]).toBeCloseTo(bond, 12);
    // Handbook Si–Si bond length 0.235 nm (Kittel; from memory): the formula and the handbook agree.
    expect(bond).toBeCloseTo(0.235, 3);
  });

  it('finds the closer neighbour in an uneven [110] chain', () => {
    const steps = [-9, -3, 2, 9];
    const sites: SiteLike[] = steps.map((k, i) => ({ id: `P${i}`, species: 'P', position: [k * A, k * A, 0] }));
    const d = nearestNeighbourDistances(sites);
    const expected = steps.map((k, i) => Math.min(...steps.filter((_, j) => j !== i).map((m) => Math.abs(k - m) * A * Math.SQRT2)));
    for (let i = 0; i < steps.length; i++) expect(d[i]).toBeCloseTo(expected[i], 12);
    expect(smallestSeparation(d)).toBeCloseTo(5 * A * Math.SQRT2, 12);
  });

  it('measures only the first `limit` rows, but against every site', () => {
    const sites: SiteLike[] = [
      { id: 'far', species: 'P', position: [0, 0, 0] },
      { id: 'x', species: 'As', position: [100, 0, 0] },
      { id: 'near', species: 'Sb', position: [0, 0, 3 * A] },
    ];
    const d = nearestNeighbourDistances(sites, 1);
    expect(d.length).toBe(1);
    expect(d[0]).toBeCloseTo(3 * A, 12);
  });

  it('reports a lone site as having no neighbour (Infinity)', () => {
    const d = nearestNeighbourDistances([{ id: 'solo', species: 'Bi', position: [1, 2, 3] }]);
    expect(d[0]).toBe(Infinity);
    expect(smallestSeparation(d)).toBe(Infinity);
  });
});

describe('countBySpecies', () => {
  it('counts each species once, in the fixed order P, As, Sb, Bi, B', () => {
    const sp = ['B', 'P', 'As', 'P', 'B', 'B'] as const;
    const sites: SiteLike[] = sp.map((s, i) => ({ id: String(i), species: s, position: [i, 0, 0] }));
    expect(countBySpecies(sites)).toEqual([
      { species: 'P', count: sp.filter((s) => s === 'P').length },
      { species: 'As', count: sp.filter((s) => s === 'As').length },
      { species: 'B', count: sp.filter((s) => s === 'B').length },
    ]);
  });
});
