/**
 * The silicon diamond lattice with the crystal axes along the box axes (z along [001], the
 * growth direction). Sites are addressed by integer indices (i, j, k) in units of a/4:
 *
 *   sublattice A (FCC):          i, j, k all even and i + j + k ≡ 0 (mod 4)
 *   sublattice B (A + (1,1,1)):  i, j, k all odd  and i + j + k ≡ 3 (mod 4)
 *
 *        z [001]
 *        |   B at (1,1,1) sits in the tetrahedron of A sites
 *        |   (0,0,0), (2,2,0), (2,0,2), (0,2,2):
 *        |        (0,2,2)------(2,2,... )
 *        |       /   \  B  /
 *        +----- (0,0,0)--(2,0,2) --> x [100]
 *
 * Each A site has its 4 nearest neighbours at (±1,±1,±1) with an even number of minus signs
 * (B sites: the negatives), at distance a√3/4; the 12 second neighbours are the FCC vectors
 * (±2,±2,0) and permutations, at distance a/√2.
 *
 * Snapping uses the nearest-point algorithm for the lattice D3 = {integer vectors with even sum}
 * (Conway & Sloane, "Fast quantizing and decoding algorithms for lattice quantizers", 1982):
 * FCC-A = 2·D3 and FCC-B = 2·D3 + (1,1,1), so we snap to each exactly and keep the nearer.
 * Ties (measure-zero) are broken deterministically: halves round downwards, the D3 parity fix
 * picks the lowest axis among equal errors, and sublattice A wins an exact tie between A and B.
 */
import type { Vec3 } from '../design/types';

export type LatticeIndex = [number, number, number];

/** Nearest-neighbour bond vectors of an A site, in units of a/4 (negate for B). */
export const NEAREST_A: readonly LatticeIndex[] = [
  [1, 1, 1],
  [1, -1, -1],
  [-1, 1, -1],
  [-1, -1, 1],
];

/** True when (i, j, k) (units of a/4) is a diamond-lattice site. */
export function isLatticeSite(i: number, j: number, k: number): boolean {
  if (!Number.isInteger(i) || !Number.isInteger(j) || !Number.isInteger(k)) return false;
  const s = (((i + j + k) % 4) + 4) % 4;
  const ei = (i & 1) === 0;
  if (ei && (j & 1) === 0 && (k & 1) === 0) return s === 0;
  if (!ei && (j & 1) === 1 && (k & 1) === 1) return s === 3;
  return false;
}

/** 0 for sublattice A, 1 for B; −1 when (i, j, k) is not a site. */
export function sublattice(i: number, j: number, k: number): 0 | 1 | -1 {
  if (!isLatticeSite(i, j, k)) return -1;
  return (i & 1) === 0 ? 0 : 1;
}

/** Position in nm of site (i, j, k). */
export function siteToNm(index: LatticeIndex, a: number): Vec3 {
  const q = a / 4;
  return [index[0] * q, index[1] * q, index[2] * q];
}

/** Round half downwards: deterministic on exact halves. */
function roundHalfDown(x: number): number {
  return Math.ceil(x - 0.5);
}

/**
 * Nearest point of D3 (integer vectors with even coordinate sum) to (x, y, z), written to
 * out[o], out[o + 1], out[o + 2] (no array made: the far-field check snaps every site).
 */
function nearestD3Into(x: number, y: number, z: number, out: Float64Array, o: number): void {
  const f0 = roundHalfDown(x) + 0; // + 0 turns −0 into 0
  const f1 = roundHalfDown(y) + 0;
  const f2 = roundHalfDown(z) + 0;
  out[o] = f0;
  out[o + 1] = f1;
  out[o + 2] = f2;
  if ((((f0 + f1 + f2) % 2) + 2) % 2 === 0) return;
  // parity is odd: re-round the coordinate that was furthest from its integer the other way
  // (the lowest axis among equal errors)
  const e0 = Math.abs(x - f0), e1 = Math.abs(y - f1), e2 = Math.abs(z - f2);
  let worst = 0;
  let worstErr = e0;
  if (e1 > worstErr) {
    worst = 1;
    worstErr = e1;
  }
  if (e2 > worstErr) worst = 2;
  const v = worst === 0 ? x : worst === 1 ? y : z;
  out[o + worst] += v >= out[o + worst] ? 1 : -1;
}

const snapScratch = new Float64Array(6);

/** snapToLattice into out[0..2] (out may be reused); returns out. */
function snapInto(p: readonly number[], a: number, out: Float64Array): Float64Array {
  const s = 4 / a;
  const x = p[0] * s;
  const y = p[1] * s;
  const z = p[2] * s;
  nearestD3Into(x / 2, y / 2, z / 2, out, 0);
  const A0 = 2 * out[0], A1 = 2 * out[1], A2 = 2 * out[2];
  nearestD3Into((x - 1) / 2, (y - 1) / 2, (z - 1) / 2, out, 3);
  const B0 = 2 * out[3] + 1, B1 = 2 * out[4] + 1, B2 = 2 * out[5] + 1;
  const dA = (x - A0) ** 2 + (y - A1) ** 2 + (z - A2) ** 2;
  const dB = (x - B0) ** 2 + (y - B1) ** 2 + (z - B2) ** 2;
  if (dB < dA) {
    out[0] = B0;
    out[1] = B1;
    out[2] = B2;
  } else {
    out[0] = A0;
    out[1] = A1;
    out[2] = A2;
  }
  return out;
}

/** The lattice site nearest to point p (nm), as integer indices in units of a/4. */
export function snapToLattice(p: Vec3, a: number): LatticeIndex {
  const f = snapInto(p, a, snapScratch);
  return [f[0], f[1], f[2]];
}

/**
 * Distance (nm) from p to the nearest lattice site: the same number as
 * |siteToNm(snapToLattice(p, a), a) − p|, without making arrays.
 */
export function latticeOffsetNm(p: readonly number[], a: number): number {
  const f = snapInto(p, a, snapScratch);
  const q = a / 4;
  const dx = f[0] * q - p[0], dy = f[1] * q - p[1], dz = f[2] * q - p[2];
  return Math.sqrt(dx * dx + dy * dy + dz * dz);
}

/** Hard cap on the number of sites a region query may return (memory guard). */
export const MAX_REGION_SITES = 5_000_000;

/**
 * All lattice sites with lo ≤ position ≤ hi (nm, inclusive), as a flat Int32Array of indices
 * (3 per site), ordered by k, then j, then i (deterministic). Throws a RangeError above
 * MAX_REGION_SITES. Sized exactly by a counting pass before filling.
 */
export function sitesInRegion(lo: Vec3, hi: Vec3, a: number): Int32Array {
  const s = 4 / a;
  const eps = 1e-9;
  const imin = Math.ceil(lo[0] * s - eps), imax = Math.floor(hi[0] * s + eps);
  const jmin = Math.ceil(lo[1] * s - eps), jmax = Math.floor(hi[1] * s + eps);
  const kmin = Math.ceil(lo[2] * s - eps), kmax = Math.floor(hi[2] * s + eps);
  if (imax < imin || jmax < jmin || kmax < kmin) return new Int32Array(0);
  // diamond holds 8 sites per 64 index cells: the count is bounded by the box volume / 8 + surface terms
  const cells = (imax - imin + 1) * (jmax - jmin + 1) * (kmax - kmin + 1);
  if (cells / 8 > MAX_REGION_SITES) throw new RangeError(`region holds about ${Math.round(cells / 8)} lattice sites; the limit is ${MAX_REGION_SITES}`);
  let count = 0;
  for (let k = kmin; k <= kmax; k++) for (let j = jmin; j <= jmax; j++) for (let i = imin; i <= imax; i++) if (isLatticeSite(i, j, k)) count++;
  const out = new Int32Array(3 * count);
  let n = 0;
  for (let k = kmin; k <= kmax; k++)
    for (let j = jmin; j <= jmax; j++)
      for (let i = imin; i <= imax; i++)
        if (isLatticeSite(i, j, k)) {
          out[n++] = i;
          out[n++] = j;
          out[n++] = k;
        }
  return out;
}

/**
 * Lattice sites within `radius` nm of `center` (nm), sorted by distance, ties by (k, j, i):
 * a flat Int32Array of indices. Used by the placement-disorder ensemble and cluster builder.
 */
export function sitesInSphere(center: Vec3, radius: number, a: number): Int32Array {
  const lo: Vec3 = [center[0] - radius, center[1] - radius, center[2] - radius];
  const hi: Vec3 = [center[0] + radius, center[1] + radius, center[2] + radius];
  const box = sitesInRegion(lo, hi, a);
  const q = a / 4;
  const n = box.length / 3;
  const keep: number[] = [];
  const d2 = new Float64Array(n);
  for (let t = 0; t < n; t++) {
    const dx = box[3 * t] * q - center[0], dy = box[3 * t + 1] * q - center[1], dz = box[3 * t + 2] * q - center[2];
    d2[t] = dx * dx + dy * dy + dz * dz;
    if (d2[t] <= radius * radius * (1 + 1e-12)) keep.push(t);
  }
  // region order is already (k, j, i); a stable sort on distance keeps it as the tie-break
  keep.sort((u, v) => d2[u] - d2[v] || u - v);
  const out = new Int32Array(3 * keep.length);
  keep.forEach((t, m) => {
    out[3 * m] = box[3 * t];
    out[3 * m + 1] = box[3 * t + 1];
    out[3 * m + 2] = box[3 * t + 2];
  });
  return out;
}

/** The k lattice sites nearest to point p (nm), nearest first (ties by (k, j, i) order). */
export function nearestSites(p: Vec3, count: number, a: number): LatticeIndex[] {
  // the 4 nearest always lie within 2 nearest-neighbour distances of the snapped site
  let radius = a * 0.75;
  for (;;) {
    const s = sitesInSphere(p, radius, a);
    if (s.length / 3 >= count) {
      const out: LatticeIndex[] = [];
      for (let m = 0; m < count; m++) out.push([s[3 * m], s[3 * m + 1], s[3 * m + 2]]);
      return out;
    }
    radius *= 2;
  }
}

/** Nearest-neighbour distance a√3/4. */
export function nearestNeighbourDistance(a: number): number {
  return (a * Math.sqrt(3)) / 4;
}
