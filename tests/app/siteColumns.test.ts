/**
 * Derived columns of the workspace's site table, against outside facts:
 * - diamond lattice of Si with a = 0.5431020511 nm (CODATA 2018), sites at (i, j, k)·a/4 with the
 *   FCC + basis (1,1,1)/4 rule (Kittel, Introduction to Solid State Physics, ch. 1);
 * - the bond length a·√3/4 (same source) as the nearest-site distance of a basis pair;
 * - nearest distances compared with a brute-force O(n²) search (plain Euclidean geometry).
 */
import { describe, expect, it } from 'vitest';
import { describeOrbital, flatPositions, hashGrid, latticePlacement, nearestDistances, siteRows } from '../../app/src/features/studio/siteColumns';
import { editSite } from '../../app/src/features/studio/SiteTable';
import { mulberry32 } from '../../geometry/arrays';

const A = 0.5431020511;

function brute(p: Float64Array): Float64Array {
  const n = p.length / 3;
  const out = new Float64Array(n).fill(Infinity);
  for (let i = 0; i < n; i++)
    for (let j = 0; j < n; j++)
      if (i !== j) out[i] = Math.min(out[i], Math.hypot(p[3 * i] - p[3 * j], p[3 * i + 1] - p[3 * j + 1], p[3 * i + 2] - p[3 * j + 2]));
  return out;
}

describe('lattice indices', () => {
  it('gives the a/4 indices of diamond sites and zero offset on the lattice', () => {
    // (1,1,1): the basis atom of the diamond structure; (4,0,0): one cube edge along [100]
    for (const idx of [[0, 0, 0], [1, 1, 1], [4, 0, 0], [2, 2, 0], [-1, -1, 1], [5, 3, 3]] as const) {
      const l = latticePlacement([(idx[0] * A) / 4, (idx[1] * A) / 4, (idx[2] * A) / 4], A);
      expect(l.index).toEqual([...idx]);
      expect(l.offsetNm).toBeLessThan(1e-12);
    }
  });
  it('reports how far an off-lattice position is from its nearest site', () => {
    const l = latticePlacement([0.05, 0, 0], A);
    expect(l.index).toEqual([0, 0, 0]);
    expect(l.offsetNm).toBeCloseTo(0.05, 12);
  });
});

describe('nearest-site distance', () => {
  it('is the Si bond length for a basis pair', () => {
    const d = nearestDistances(new Float64Array([0, 0, 0, A / 4, A / 4, A / 4]));
    expect(d[0]).toBeCloseTo((A * Math.sqrt(3)) / 4, 12);
    expect(d[1]).toBeCloseTo((A * Math.sqrt(3)) / 4, 12);
  });
  it('is Infinity for a lone site', () => {
    expect(nearestDistances(new Float64Array([1, 2, 3]))[0]).toBe(Infinity);
  });
  it('keeps the hash grid small for a flat layer off z = 0 (rounding does not make a third dimension)', () => {
    // two donors 8a apart, 16a deep: lo is shifted by 1e-9 nm, so z spans 1e-9 nm plus rounding
    const z = -16 * A;
    const lo = [-1e-9, -1e-9, z - 1e-9], hi = [8 * A, 0, z];
    const { dims } = hashGrid(lo, hi, 2);
    // one occupied dimension of 2 sites: a cell of about the spacing, so a grid of a couple of cells (plain counting)
    expect(dims[0]).toBeLessThanOrEqual(3);
    expect(dims[1] * dims[2]).toBe(1);
    expect(nearestDistances(new Float64Array([0, 0, z, 8 * A, 0, z]))[0]).toBeCloseTo(8 * A, 12);
  });
  it('equals a brute-force search for scattered, planar, collinear and clumped sites', () => {
    const rnd = mulberry32(7);
    const cases: Float64Array[] = [];
    cases.push(Float64Array.from({ length: 3 * 400 }, () => rnd() * 30 - 15));
    cases.push(Float64Array.from({ length: 3 * 300 }, (_, t) => (t % 3 === 2 ? 0 : rnd() * 50)));
    cases.push(Float64Array.from({ length: 3 * 200 }, (_, t) => (t % 3 === 0 ? rnd() * 100 : 0)));
    // a dense clump and a far outlier: cells sized for the average spacing must still be exact
    const clump = Array.from({ length: 3 * 150 }, () => rnd() * 0.5);
    cases.push(Float64Array.from([...clump, 500, 500, 500]));
    for (const p of cases) {
      const fast = nearestDistances(p), slow = brute(p);
      for (let i = 0; i < slow.length; i++) expect(fast[i]).toBeCloseTo(slow[i], 12);
    }
  });
});

describe('rows and in-place edits', () => {
  it('marks preset and own orbitals and describes them with units', () => {
    const rows = siteRows(
      [
        { id: 'a', species: 'P', position: [0, 0, 0], electrons: 1 },
        { id: 'b', species: 'B', position: [2 * A, 0, 0], electrons: 1, orbital: { model: 'gaussian', sigmaNm: 1.2 } },
      ],
      A,
    );
    expect(rows[0].orbitalIsPreset).toBe(true);
    expect(rows[0].orbitalText).toMatch(/nm$/);
    expect(rows[1].orbitalIsPreset).toBe(false);
    expect(rows[1].orbitalText).toBe(describeOrbital({ model: 'gaussian', sigmaNm: 1.2 }));
    expect(rows[0].nearestNm).toBeCloseTo(2 * A, 12);
    expect(flatPositions(rows.map((r) => r.site))[3]).toBeCloseTo(2 * A, 15);
  });
  it('accepts a valid edit and refuses bad input with a plain message', () => {
    const site = { id: 'a', species: 'P' as const, position: [0, 0, 0] as [number, number, number], electrons: 1 };
    expect(editSite(site, 'x', '1.5', new Set())).toEqual({ site: { ...site, position: [1.5, 0, 0] } });
    expect(editSite(site, 'species', 'as', new Set())).toEqual({ site: { ...site, species: 'As' } });
    expect(editSite(site, 'electrons', '3', new Set())).toEqual({ error: 'Electrons must be 0, 1 or 2.' });
    expect(editSite(site, 'electrons', 'one', new Set())).toHaveProperty('error');
    expect(editSite(site, 'x', 'abc', new Set())).toHaveProperty('error');
    expect(editSite(site, 'species', 'Ge', new Set())).toHaveProperty('error');
    expect(editSite(site, 'id', 'b', new Set(['b']))).toEqual({ error: 'Another site is already called b.' });
  });
});
