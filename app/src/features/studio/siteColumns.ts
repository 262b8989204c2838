/**
 * Derived columns of the site table: lattice indices in a/4 units, whether the position sits on a
 * lattice site, the nearest-site distance (for every site, through a uniform grid so 10,000 sites
 * cost milliseconds, not n²), and a plain description of the orbital in use.
 */
import { snapToLattice, siteToNm, type LatticeIndex } from '../../../../geometry/lattice';
import { resolveOrbital } from '../../../../geometry/design/presets';
import type { Orbital, Site } from '../../../../geometry/design/types';

export interface LatticePlacement {
  /** indices (i, j, k) of the nearest lattice site, in units of a/4 */
  index: LatticeIndex;
  /** distance (nm) from the position to that lattice site; ~0 for a site placed on the lattice */
  offsetNm: number;
}

/** Positions within this distance of a lattice site count as on it (1 pm; common practice for float round-off). */
export const ON_LATTICE_TOLERANCE_NM = 1e-3;

export function latticePlacement(position: readonly [number, number, number], a: number): LatticePlacement {
  const index = snapToLattice([position[0], position[1], position[2]], a);
  const q = siteToNm(index, a);
  return { index, offsetNm: Math.hypot(position[0] - q[0], position[1] - q[1], position[2] - q[2]) };
}

/**
 * Cell side h (nm) and cell counts of the nearest-site hash grid over the box lo..hi holding n
 * sites: a cell holds about 2 sites, h from the occupied dimensions' volume (or area, or length).
 * A dimension counts as occupied only when its extent exceeds FLAT_NM: the sites of a flat layer
 * off z = 0 differ in z only by rounding (about 1e-15 relative), and counting that sliver made h
 * tiny and the grid 1024 cells long, so the shell search ran for minutes (a planar array 8.7 nm
 * deep froze the studio).
 */
const FLAT_NM = 1e-6; // far below the smallest lattice step a/4 ≈ 0.136 nm (common practice)
export function hashGrid(lo: readonly number[], hi: readonly number[], n: number): { h: number; dims: number[] } {
  const ext = [0, 1, 2].map((k) => hi[k] - lo[k]);
  const used = ext.filter((e) => e > FLAT_NM);
  const measure = used.reduce((p, e) => p * e, 1);
  const h = used.length === 0 ? 1 : Math.max(Math.pow((2 * measure) / n, 1 / used.length), 1e-6);
  const dims = ext.map((e) => Math.max(1, Math.min(1024, Math.floor(e / h) + 1)));
  return { h, dims };
}

/**
 * Distance (nm) from each site to its nearest other site; Infinity for a lone site.
 * Grid hashing: cells of side h (the mean spacing estimate from the bounding box), searched in
 * growing shells until the best distance found is certainly the nearest (it is ≤ the shell's
 * inner radius). Exact, and O(n) for evenly spread arrays.
 */
export function nearestDistances(positions: Float64Array): Float64Array {
  const n = positions.length / 3;
  const out = new Float64Array(n).fill(Infinity);
  if (n < 2) return out;
  let lo = [Infinity, Infinity, Infinity];
  const hi = [-Infinity, -Infinity, -Infinity];
  for (let i = 0; i < n; i++)
    for (let k = 0; k < 3; k++) {
      lo[k] = Math.min(lo[k], positions[3 * i + k]);
      hi[k] = Math.max(hi[k], positions[3 * i + k]);
    }
  lo = lo.map((v) => v - 1e-9);
  const { h, dims } = hashGrid(lo, hi, n);
  const cellOf = (v: number, k: number) => Math.min(dims[k] - 1, Math.floor((v - lo[k]) / h));
  const cells = new Map<number, number[]>();
  const key = (cx: number, cy: number, cz: number) => (cz * dims[1] + cy) * dims[0] + cx;
  const cellIdx = new Int32Array(3 * n);
  for (let i = 0; i < n; i++) {
    const c = [0, 1, 2].map((k) => cellOf(positions[3 * i + k], k));
    cellIdx.set(c, 3 * i);
    const kk = key(c[0], c[1], c[2]);
    const list = cells.get(kk);
    if (list) list.push(i);
    else cells.set(kk, [i]);
  }
  const maxShell = Math.max(dims[0], dims[1], dims[2]);
  for (let i = 0; i < n; i++) {
    const x = positions[3 * i], y = positions[3 * i + 1], z = positions[3 * i + 2];
    const cx = cellIdx[3 * i], cy = cellIdx[3 * i + 1], cz = cellIdx[3 * i + 2];
    let best = Infinity;
    for (let r = 0; r <= maxShell; r++) {
      // every point outside shells 0..r-1 is at least (r-1)·h away, so stop once best is below that
      if (r > 0 && Math.sqrt(best) <= (r - 1) * h) break;
      for (let dz = -r; dz <= r; dz++)
        for (let dy = -r; dy <= r; dy++)
          for (let dx = -r; dx <= r; dx++) {
            if (Math.max(Math.abs(dx), Math.abs(dy), Math.abs(dz)) !== r) continue; // shell surface only
            const ax = cx + dx, ay = cy + dy, az = cz + dz;
            if (ax < 0 || ay < 0 || az < 0 || ax >= dims[0] || ay >= dims[1] || az >= dims[2]) continue;
            const list = cells.get(key(ax, ay, az));
            if (!list) continue;
            for (const j of list) {
              if (j === i) continue;
              const d2 = (positions[3 * j] - x) ** 2 + (positions[3 * j + 1] - y) ** 2 + (positions[3 * j + 2] - z) ** 2;
              if (d2 < best) best = d2;
            }
          }
    }
    out[i] = Math.sqrt(best);
  }
  return out;
}

/** The positions of sites as a flat array (3 per site, nm). */
export function flatPositions(sites: readonly Pick<Site, 'position'>[]): Float64Array {
  const out = new Float64Array(3 * sites.length);
  sites.forEach((s, i) => out.set(s.position, 3 * i));
  return out;
}

export function describeOrbital(o: Orbital): string {
  switch (o.model) {
    case 'hydrogenic-1s':
      return `hydrogenic 1s, a = ${o.radiusNm.toFixed(2)} nm`;
    case 'anisotropic-1s':
      return `anisotropic 1s, a = ${o.radiusNm.toFixed(2)} nm, b = ${o.radiusZNm.toFixed(2)} nm`;
    case 'gaussian':
      return `Gaussian, σ = ${o.sigmaNm.toFixed(2)} nm`;
  }
}

export interface SiteRow {
  /** position of the site in the document (stable key for edits) */
  index: number;
  site: Site;
  lattice: LatticePlacement;
  nearestNm: number;
  orbitalText: string;
  orbitalIsPreset: boolean;
}

/** All derived rows of the table for a document's sites. */
export function siteRows(sites: readonly Site[], latticeConstantNm: number): SiteRow[] {
  const nn = nearestDistances(flatPositions(sites));
  return sites.map((site, index) => ({
    index,
    site,
    lattice: latticePlacement(site.position, latticeConstantNm),
    nearestNm: nn[index],
    orbitalText: describeOrbital(resolveOrbital(site)),
    orbitalIsPreset: !site.orbital,
  }));
}
