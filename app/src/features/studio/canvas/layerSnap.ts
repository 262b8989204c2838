/**
 * Snapping inside one (001) atomic layer: the layer k (z = k·a/4) holds the diamond sites (i, j, k)
 * with isLatticeSite true, a square net of spacing a/√2 turned 45° (the FCC face net of sublattice
 * A for even k, of B for odd k). The nearest of them to (x, y) lies within one net spacing of the
 * rounded index, so a 5 × 5 search around it is exact.
 */
import { isLatticeSite } from '../../../../../geometry/lattice';

export function snapInLayer(x: number, y: number, k: number, a: number): [number, number, number] {
  const s = 4 / a;
  const i0 = Math.round(x * s), j0 = Math.round(y * s);
  let best: [number, number, number] = [i0, j0, k];
  let bestD = Infinity;
  for (let dj = -2; dj <= 2; dj++)
    for (let di = -2; di <= 2; di++) {
      const i = i0 + di, j = j0 + dj;
      if (!isLatticeSite(i, j, k)) continue;
      const d = (i - x * s) ** 2 + (j - y * s) ** 2;
      // ties: lowest j, then lowest i (deterministic)
      if (d < bestD - 1e-12) {
        bestD = d;
        best = [i, j, k];
      }
    }
  return best;
}

/** Lattice sites of layer k within `radius` nm of (x, y): flat xyz in nm, for the guide dots. */
export function layerPointsNear(x: number, y: number, k: number, a: number, radius: number): Float32Array {
  const s = 4 / a;
  const r = Math.ceil(radius * s);
  const i0 = Math.round(x * s), j0 = Math.round(y * s);
  const out: number[] = [];
  for (let j = j0 - r; j <= j0 + r; j++)
    for (let i = i0 - r; i <= i0 + r; i++) {
      if (!isLatticeSite(i, j, k)) continue;
      const px = i / s, py = j / s;
      if ((px - x) ** 2 + (py - y) ** 2 <= radius * radius) out.push(px, py, k / s);
    }
  return new Float32Array(out);
}
