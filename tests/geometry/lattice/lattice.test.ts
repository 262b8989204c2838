import { describe, expect, it } from 'vitest';
import {
  isLatticeSite,
  latticeOffsetNm,
  nearestNeighbourDistance,
  nearestSites,
  NEAREST_A,
  sitesInRegion,
  sitesInSphere,
  siteToNm,
  snapToLattice,
  sublattice,
} from '../../../geometry/lattice/diamond';
import { mulberry32 } from '../../../geometry/arrays/prng';
import { SI_LATTICE_CONSTANT_NM } from '../../../geometry/units';
import type { Vec3 } from '../../../geometry/design/types';

// Silicon lattice constant, CODATA 2018: 0.5431020511 nm.
const a = SI_LATTICE_CONSTANT_NM;

function distancesFrom(origin: [number, number, number], radius: number): number[] {
  const p = siteToNm(origin, a);
  const s = sitesInSphere(p, radius, a);
  const d: number[] = [];
  for (let t = 0; t < s.length / 3; t++) {
    const q = siteToNm([s[3 * t], s[3 * t + 1], s[3 * t + 2]], a);
    const r = Math.hypot(q[0] - p[0], q[1] - p[1], q[2] - p[2]);
    if (r > 0) d.push(r);
  }
  return d;
}

describe('diamond lattice (published facts about silicon)', () => {
  it('nearest-neighbour distance is a√3/4 ≈ 0.2352 nm with 4 neighbours (Kittel, Introduction to Solid State Physics, ch. 1)', () => {
    for (const origin of [
      [0, 0, 0],
      [1, 1, 1],
      [4, -4, 8],
    ] as [number, number, number][]) {
      const d = distancesFrom(origin, a);
      const dmin = Math.min(...d);
      expect(dmin).toBeCloseTo((a * Math.sqrt(3)) / 4, 12);
      expect(nearestNeighbourDistance(a)).toBeCloseTo(dmin, 12);
      expect(d.filter((r) => Math.abs(r - dmin) < 1e-9).length).toBe(4);
      // 12 second neighbours at a/√2 (the FCC nearest-neighbour distance), Kittel ch. 1
      const second = d.filter((r) => r > dmin + 1e-9);
      const d2 = Math.min(...second);
      expect(d2).toBeCloseTo(a / Math.SQRT2, 12);
      expect(second.filter((r) => Math.abs(r - d2) < 1e-9).length).toBe(12);
    }
  });
  it('8 atoms per conventional cell: 8/a³ ≈ 5.0×10²² cm⁻³ (atomic density of Si, handbook value)', () => {
    // count sites in the half-open cell [0, a)³ by index range [0, 4)³
    let n = 0;
    for (let k = 0; k < 4; k++) for (let j = 0; j < 4; j++) for (let i = 0; i < 4; i++) if (isLatticeSite(i, j, k)) n++;
    expect(n).toBe(8);
    const perCm3 = n / (a * 1e-7) ** 3;
    expect(perCm3 / 5.0e22).toBeGreaterThan(0.99);
    expect(perCm3 / 5.0e22).toBeLessThan(1.01);
    // a 3×3×3 block of cells: 216 sites in [0, 3a)³
    const block = sitesInRegion([0, 0, 0], [3 * a * (1 - 1e-9), 3 * a * (1 - 1e-9), 3 * a * (1 - 1e-9)], a);
    expect(block.length / 3).toBe(216);
  });
  it('sublattices: A at the origin, B at (1,1,1); bond vectors join A to B', () => {
    expect(sublattice(0, 0, 0)).toBe(0);
    expect(sublattice(1, 1, 1)).toBe(1);
    expect(sublattice(1, 1, 0)).toBe(-1);
    expect(sublattice(2, 0, 0)).toBe(-1);
    for (const v of NEAREST_A) expect(sublattice(v[0], v[1], v[2])).toBe(1);
  });
});

describe('snap to the nearest site', () => {
  it('returns a lattice site no further than any site in the neighbourhood (brute force, 2000 seeded points)', () => {
    const rnd = mulberry32(20261201);
    for (let n = 0; n < 2000; n++) {
      const p: Vec3 = [(rnd() - 0.5) * 6, (rnd() - 0.5) * 6, (rnd() - 0.5) * 6];
      const s = snapToLattice(p, a);
      expect(isLatticeSite(...s)).toBe(true);
      const q = siteToNm(s, a);
      const d = Math.hypot(q[0] - p[0], q[1] - p[1], q[2] - p[2]);
      const around = sitesInSphere(p, a, a);
      for (let t = 0; t < around.length / 3; t++) {
        const r = siteToNm([around[3 * t], around[3 * t + 1], around[3 * t + 2]], a);
        expect(Math.hypot(r[0] - p[0], r[1] - p[1], r[2] - p[2])).toBeGreaterThanOrEqual(d - 1e-12);
      }
    }
  });
  it('latticeOffsetNm is the distance to the nearest site (brute force over the neighbourhood, 2000 seeded points) and the same double as |snapped − p|', () => {
    const rnd = mulberry32(20261202);
    for (let n = 0; n < 2000; n++) {
      // on-lattice points with a little noise as well as arbitrary ones, and coordinates up to 10⁴ nm
      const scale = n % 3 === 0 ? 1e4 : 6;
      const p: Vec3 = [(rnd() - 0.5) * scale, (rnd() - 0.5) * scale, (rnd() - 0.5) * scale];
      if (n % 2) {
        const q = siteToNm(snapToLattice(p, a), a);
        for (let k = 0; k < 3; k++) p[k] = q[k] + (rnd() - 0.5) * 1e-6;
      }
      const d = latticeOffsetNm(p, a);
      const q = siteToNm(snapToLattice(p, a), a);
      const dx = q[0] - p[0], dy = q[1] - p[1], dz = q[2] - p[2];
      expect(d).toBe(Math.sqrt(dx * dx + dy * dy + dz * dz));
      const around = sitesInSphere(p, a, a);
      let nearest = Infinity;
      for (let t = 0; t < around.length / 3; t++) {
        const r = siteToNm([around[3 * t], around[3 * t + 1], around[3 * t + 2]], a);
        nearest = Math.min(nearest, Math.hypot(r[0] - p[0], r[1] - p[1], r[2] - p[2]));
      }
      expect(Math.abs(d - nearest)).toBeLessThanOrEqual(1e-12 * Math.max(1, scale));
    }
  });
  it('a site snaps to itself exactly, and snapping is deterministic on exact ties', () => {
    for (const s of [
      [0, 0, 0],
      [1, 1, 1],
      [-3, 5, 1],
      [12, -8, 4],
    ] as [number, number, number][]) {
      expect(isLatticeSite(...s)).toBe(true);
      expect(snapToLattice(siteToNm(s, a), a)).toEqual(s);
    }
    // midpoint of a bond is equidistant from an A and a B site: same answer every time, sublattice A
    const mid = siteToNm([0.5, 0.5, 0.5] as unknown as [number, number, number], a);
    const first = snapToLattice(mid, a);
    expect(snapToLattice(mid, a)).toEqual(first);
    expect(sublattice(...first)).toBe(0);
  });
  it('nearestSites lists the site and its 4 bonded neighbours first', () => {
    const s = nearestSites(siteToNm([4, 4, 0], a), 5, a);
    expect(s[0]).toEqual([4, 4, 0]);
    for (const t of s.slice(1)) {
      const d = Math.hypot(t[0] - 4, t[1] - 4, t[2]) * (a / 4);
      expect(d).toBeCloseTo((a * Math.sqrt(3)) / 4, 12);
    }
  });
});
