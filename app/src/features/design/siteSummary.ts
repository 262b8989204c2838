/**
 * Plain figures about a design's sites for the read-only summary: counts per species and the
 * distance from each shown site to its nearest other site (the separation that sets V).
 */
import type { Species, Vec3 } from '../../../../geometry/design/types';

export interface SiteLike {
  id: string;
  species: Species;
  position: Vec3;
}

/** Sites per species, in the fixed order P, As, Sb, Bi, B, leaving out absent ones. */
export function countBySpecies(sites: readonly SiteLike[]): { species: Species; count: number }[] {
  const order: Species[] = ['P', 'As', 'Sb', 'Bi', 'B'];
  const counts = new Map<Species, number>();
  for (const s of sites) counts.set(s.species, (counts.get(s.species) ?? 0) + 1);
  return order.filter((sp) => counts.has(sp)).map((sp) => ({ species: sp, count: counts.get(sp)! }));
}

/**
 * Nearest-neighbour distance (nm) of sites[0..limit) against all sites; Infinity for a lone site.
 * Cost is limit × n, so the summary asks only for the rows it shows (≤ a few hundred) even when
 * a design holds 10⁵ sites.
 */
export function nearestNeighbourDistances(sites: readonly SiteLike[], limit = sites.length): Float64Array {
  const m = Math.min(limit, sites.length);
  const out = new Float64Array(m).fill(Infinity);
  for (let i = 0; i < m; i++) {
    const [xi, yi, zi] = sites[i].position;
    let best = Infinity;
    for (let j = 0; j < sites.length; j++) {
      if (j === i) continue;
      const [xj, yj, zj] = sites[j].position;
      const d2 = (xi - xj) ** 2 + (yi - yj) ** 2 + (zi - zj) ** 2;
      if (d2 < best) best = d2;
    }
    out[i] = Math.sqrt(best);
  }
  return out;
}

/** Smallest separation over the shown rows (a lower bound on spacing worth flagging). */
export function smallestSeparation(distances: Float64Array): number {
  let min = Infinity;
  for (const d of distances) if (d < min) min = d;
  return min;
}
