/**
 * Per-element values the mesh viewer colours by and plots, from the mesh's typed arrays. Pure (no three.js, no
 * React), so tests run it in Node.
 *
 *   size       longest edge of each element, nm (the element size the size field prescribes; geometry/mesh/quality)
 *   quality    mean ratio η (Liu & Joe, BIT 34 (1994) 268–287): 1 for the regular tetrahedron, → 0 for a flat one
 *   potential  mean of the element's four vertex potentials, V
 *   distance   from the element's centroid to the nearest site, nm
 */
import type { TetMesh } from '../../../../geometry/mesh/types';

/** the mean of the four vertex values of each element */
export function elementMean(mesh: Pick<TetMesh, 'tets'>, vertexValues: Float64Array): Float64Array {
  const m = mesh.tets.length >> 2;
  const out = new Float64Array(m);
  for (let t = 0; t < m; t++) {
    let s = 0;
    for (let i = 0; i < 4; i++) s += vertexValues[mesh.tets[4 * t + i]];
    out[t] = s / 4;
  }
  return out;
}

/** counts of `values` in `bins` equal bins over [lo, hi]; values outside go to the end bins */
export function histogram(values: ArrayLike<number>, lo: number, hi: number, bins: number): number[] {
  const out = new Array<number>(bins).fill(0);
  const w = (hi - lo) / bins;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (!Number.isFinite(v)) continue;
    out[Math.min(bins - 1, Math.max(0, Math.floor((v - lo) / w)))]++;
  }
  return out;
}

export function range(values: ArrayLike<number>): [number, number] {
  let lo = Infinity, hi = -Infinity;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  return [lo, hi];
}

/**
 * Element size against the distance from the element's centroid to the nearest site, for at most `maxPoints`
 * elements (every k-th element, k = ceil(m / maxPoints): deterministic, and it keeps the plot light). Brute force over
 * the sites for each sampled element: maxPoints × sites distance evaluations.
 */
export function sizeAgainstDistance(
  mesh: Pick<TetMesh, 'coords' | 'tets'>,
  size: Float64Array,
  sites: readonly (readonly [number, number, number])[],
  maxPoints = 1500,
): { distanceNm: number; sizeNm: number }[] {
  const m = mesh.tets.length >> 2;
  if (sites.length === 0 || m === 0) return [];
  const stride = Math.max(1, Math.ceil(m / maxPoints));
  const out: { distanceNm: number; sizeNm: number }[] = [];
  for (let t = 0; t < m; t += stride) {
    let cx = 0, cy = 0, cz = 0;
    for (let i = 0; i < 4; i++) {
      const v = 3 * mesh.tets[4 * t + i];
      cx += mesh.coords[v];
      cy += mesh.coords[v + 1];
      cz += mesh.coords[v + 2];
    }
    cx /= 4;
    cy /= 4;
    cz /= 4;
    let best = Infinity;
    for (const p of sites) {
      const d2 = (cx - p[0]) ** 2 + (cy - p[1]) ** 2 + (cz - p[2]) ** 2;
      if (d2 < best) best = d2;
    }
    out.push({ distanceNm: Math.sqrt(best), sizeNm: size[t] });
  }
  return out;
}

/** the vertex potentials of potential.f64 (Float64, little-endian, one per vertex), checked against the mesh */
export function decodePotential(bytes: Uint8Array, vertices: number): Float64Array {
  if (bytes.length !== 8 * vertices) throw new Error(`the potential file holds ${Math.floor(bytes.length / 8)} values for a mesh of ${vertices} vertices`);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const out = new Float64Array(vertices);
  for (let v = 0; v < vertices; v++) out[v] = view.getFloat64(8 * v, true);
  return out;
}
