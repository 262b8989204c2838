/**
 * Pairs of sites closer than one lattice constant (the overlap warning) or at one position (the
 * coincide warning), over all pairs, not only the checked ones. One implementation for the full
 * check (check.ts) and the resident session (session.ts), so both list ids in the same order:
 * pair by pair, by the lower site index, then by the higher one.
 *
 * Sites are binned into cubes of edge a (a spatial hash); a pair closer than a lies in the same
 * or in neighbouring cubes, so each site looks at 27 cubes: O(N) for arrays whose sites are not
 * piled up within a lattice constant. The session keeps the index and, when a site moves,
 * updates only that site's cube and its close partners (O(1) per move instead of a new scan).
 */
export interface PlacedSite {
  readonly id: string;
  readonly position: readonly number[];
  readonly cluster?: string;
}

function dist(p: readonly number[], q: readonly number[]): number {
  const dx = p[0] - q[0], dy = p[1] - q[1], dz = p[2] - q[2];
  return Math.sqrt(dx * dx + dy * dy + dz * dz);
}

/**
 * Key of the cube (cx, cy, cz): a 32-bit hash (the three multipliers are large primes, common
 * practice for spatial hashing). Two cubes may share a key; a shared list only adds candidates,
 * which the distance test then drops, so the result does not depend on the hash.
 */
const cubeKey = (cx: number, cy: number, cz: number) => (Math.imul(cx, 73856093) ^ Math.imul(cy, 19349663) ^ Math.imul(cz, 83492791)) & 0x3fffffff;

/** Close partners of every site (R < a, coinciding included), kept up to date as sites move. */
export class CloseSiteIndex {
  /** the cubes, built at the first move (a full check never needs them) */
  private cubes: Map<number, number[]> | null = null;
  /** per site: the other sites closer than a (both directions), or null when there are none */
  private readonly partners: (number[] | null)[];
  private closePairs = 0;

  constructor(
    private sites: readonly PlacedSite[],
    readonly latticeConstantNm: number,
  ) {
    const n = sites.length;
    this.partners = new Array<number[] | null>(n).fill(null);
    scanClosePairs(sites, latticeConstantNm, (i, j) => this.link(i, j));
  }

  /**
   * Site i now stands at sites[i].position (the caller has replaced the entry in the array it
   * gave); `before` is where it stood.
   */
  move(i: number, before: readonly number[], sites: readonly PlacedSite[]): void {
    const after = sites[i].position;
    this.sites = sites;
    if (!this.cubes) {
      this.cubes = new Map();
      for (let k = 0; k < sites.length; k++) this.addToCube(k, k === i ? before : sites[k].position);
    }
    const old = this.cubeOf(before), now = this.cubeOf(after);
    if (old !== now) {
      const list = this.cubes.get(old) as number[];
      list.splice(list.indexOf(i), 1);
      if (list.length === 0) this.cubes.delete(old);
      this.addToCube(i, after);
    }
    const mine = this.partners[i];
    if (mine) {
      for (const j of mine) this.unlinkOne(j, i);
      this.closePairs -= mine.length;
      this.partners[i] = null;
    }
    const near: number[] = [];
    this.near(i, after, near);
    for (const j of near) this.link(i, j);
  }

  /** Appends ids pairwise (lower index first, pairs ordered by lower then higher index) to `coincide` and `overlap`; ids may repeat. */
  emit(coincide: string[], overlap: string[]): void {
    if (this.closePairs === 0) return;
    const sites = this.sites;
    const a = this.latticeConstantNm;
    for (let i = 0; i < this.partners.length; i++) {
      const list = this.partners[i];
      if (!list) continue;
      const higher = list.filter((j) => j > i).sort((u, v) => u - v);
      for (const j of higher) {
        const R = dist(sites[i].position, sites[j].position);
        if (R < 1e-6) coincide.push(sites[i].id, sites[j].id);
        else if (R < a && !(sites[i].cluster !== undefined && sites[i].cluster === sites[j].cluster)) overlap.push(sites[i].id, sites[j].id);
      }
    }
  }

  private cubeOf(p: readonly number[]): number {
    const a = this.latticeConstantNm;
    return cubeKey(Math.floor(p[0] / a), Math.floor(p[1] / a), Math.floor(p[2] / a));
  }

  private addToCube(i: number, p: readonly number[]): void {
    const key = this.cubeOf(p);
    const cubes = this.cubes as Map<number, number[]>;
    const list = cubes.get(key);
    if (list) list.push(i);
    else cubes.set(key, [i]);
  }

  /** sites j ≠ i closer than a to p, each once */
  private near(i: number, p: readonly number[], out: number[]): void {
    const a = this.latticeConstantNm;
    const cx = Math.floor(p[0] / a), cy = Math.floor(p[1] / a), cz = Math.floor(p[2] / a);
    const seen: number[] = [];
    for (let dx = -1; dx <= 1; dx++) for (let dy = -1; dy <= 1; dy++) for (let dz = -1; dz <= 1; dz++) {
      const key = cubeKey(cx + dx, cy + dy, cz + dz);
      // two neighbouring cubes with one key share a list: visit it once
      if (seen.includes(key)) continue;
      seen.push(key);
      const list = (this.cubes as Map<number, number[]>).get(key);
      if (!list) continue;
      for (const j of list) if (j !== i && dist(p, this.sites[j].position) < a) out.push(j);
    }
  }

  private link(i: number, j: number): void {
    (this.partners[i] ??= []).push(j);
    (this.partners[j] ??= []).push(i);
    this.closePairs++;
  }

  private unlinkOne(j: number, i: number): void {
    const list = this.partners[j] as number[];
    list.splice(list.indexOf(i), 1);
    if (list.length === 0) this.partners[j] = null;
  }
}

/** Appends ids pairwise (lower index first) to `coincide` and `overlap`; ids may repeat. */
export function closeSitePairs(sites: readonly PlacedSite[], a: number, coincide: string[], overlap: string[]): void {
  new CloseSiteIndex(sites, a).emit(coincide, overlap);
}

/**
 * Calls visit(i, j), i < j, once for every pair closer than a (the full scan). Sites are binned
 * into strips of a × a cross-section along x (keyed by their y and z cells) and sorted by x within
 * a strip; each site looks at the nine strips around its own, from x − a to x + a. A plain sweep
 * along x degrades on lattice arrays, where whole planes of sites share one x (N = 10⁵ in a plane:
 * ~8·10⁶ comparisons instead of ~10⁶). O(N log N), and cheap: only nine lookups per site.
 */
function scanClosePairs(sites: readonly PlacedSite[], a: number, visit: (i: number, j: number) => void): void {
  const n = sites.length;
  const strips = new Map<number, number[]>(); // key → site indices; lookups only, never iterated for output order
  const cy = new Float64Array(n);
  const cz = new Float64Array(n);
  // cells counted from the smallest coordinate, so keys are small non-negative integers
  let y0 = Infinity, z0 = Infinity;
  for (let i = 0; i < n; i++) {
    y0 = Math.min(y0, sites[i].position[1]);
    z0 = Math.min(z0, sites[i].position[2]);
  }
  // |coordinates| ≤ 10⁶ nm and a ≥ ~0.1 nm in practice: cell indices stay below 2²⁵, keys below 2⁵³
  const STRIDE = 2 ** 26;
  for (let i = 0; i < n; i++) {
    cy[i] = Math.floor((sites[i].position[1] - y0) / a);
    cz[i] = Math.floor((sites[i].position[2] - z0) / a);
    const key = cy[i] * STRIDE + cz[i];
    const list = strips.get(key);
    if (list) list.push(i);
    else strips.set(key, [i]);
  }
  for (const list of strips.values()) list.sort((u, v) => sites[u].position[0] - sites[v].position[0] || u - v);
  for (let i = 0; i < n; i++) {
    const pi = sites[i].position;
    for (let dy = -1; dy <= 1; dy++) {
      for (let dz = -1; dz <= 1; dz++) {
        const list = strips.get((cy[i] + dy) * STRIDE + (cz[i] + dz));
        if (!list) continue;
        // first entry with x > x_i − a (binary search), then scan while x < x_i + a
        let lo = 0, hi = list.length;
        while (lo < hi) {
          const mid = (lo + hi) >> 1;
          if (sites[list[mid]].position[0] <= pi[0] - a) lo = mid + 1;
          else hi = mid;
        }
        for (let q = lo; q < list.length; q++) {
          const j = list[q];
          const pj = sites[j].position;
          if (pj[0] - pi[0] >= a) break;
          if (j <= i) continue; // each pair once, from its lower index
          if (dist(pi, pj) < a) visit(i, j);
        }
      }
    }
  }
}
