/**
 * Pairs of sites closer than one lattice constant (the overlap warning) or at one position (the
 * coincide warning), over all pairs, not only the checked ones. One implementation for the full
 * check (check.ts) and the resident session (session.ts), so both list ids in the same order.
 *
 * Sites are binned into strips of a × a cross-section along x (keyed by their y and z cells) and
 * sorted by x within a strip; each site looks at the nine strips around its own, from x − a to
 * x + a. A plain sweep along x degrades on lattice arrays, where whole planes of sites share one x
 * (N = 10⁵ in a plane: ~8·10⁶ comparisons instead of ~10⁶).
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

/** Appends ids pairwise (lower index first) to `coincide` and `overlap`; ids may repeat. */
export function closeSitePairs(sites: readonly PlacedSite[], a: number, coincide: string[], overlap: string[]): void {
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
          const R = dist(pi, pj);
          if (R < 1e-6) {
            coincide.push(sites[i].id, sites[j].id); // uniq() below removes repeats
          } else if (R < a && !(sites[i].cluster !== undefined && sites[i].cluster === sites[j].cluster)) overlap.push(sites[i].id, sites[j].id);
        }
      }
    }
  }
}
