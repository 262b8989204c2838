/**
 * The elements a cutting plane passes through, as flat triangle buffers for three.js (4 faces × 3 vertices per
 * element), each element coloured by a value on our own colour ramp. Pure: no three.js, so tests run it in Node.
 */
import type { TetMesh } from '../../../../geometry/mesh/types';

/** a blue → teal → yellow ramp (t in [0, 1]); our own stops */
export function ramp(t: number): [number, number, number] {
  const stops: [number, number, number][] = [[0.17, 0.2, 0.55], [0.1, 0.55, 0.55], [0.55, 0.75, 0.3], [0.98, 0.85, 0.2]];
  const x = Math.min(1, Math.max(0, t)) * (stops.length - 1);
  const i = Math.min(stops.length - 2, Math.floor(x));
  const f = x - i;
  return [0, 1, 2].map((k) => stops[i][k] + f * (stops[i + 1][k] - stops[i][k])) as [number, number, number];
}
export const rampCss = `linear-gradient(to right, ${[0, 0.33, 0.67, 1].map((t) => `rgb(${ramp(t).map((c) => Math.round(c * 255)).join(',')})`).join(', ')})`;

const FACES = [[1, 2, 3], [0, 3, 2], [0, 1, 3], [0, 2, 1]] as const;

/** the faces of every element the plane axis = c passes through, as flat triangle buffers */
export function cutElements(mesh: Pick<TetMesh, 'coords' | 'tets'>, axis: number, c: number, value: Float64Array, lo: number, hi: number) {
  const { coords, tets } = mesh;
  const m = tets.length >> 2;
  let n = 0;
  const cut = new Uint8Array(m);
  for (let t = 0; t < m; t++) {
    let a = Infinity, b = -Infinity;
    for (let i = 0; i < 4; i++) {
      const v = coords[3 * tets[4 * t + i] + axis];
      if (v < a) a = v;
      if (v > b) b = v;
    }
    if (a <= c && c <= b) {
      cut[t] = 1;
      n++;
    }
  }
  const pos = new Float32Array(n * 36);
  const col = new Float32Array(n * 36);
  let o = 0;
  for (let t = 0; t < m; t++) {
    if (!cut[t]) continue;
    const rgb = ramp(hi > lo ? (value[t] - lo) / (hi - lo) : 0);
    for (const f of FACES)
      for (const i of f) {
        const v = 3 * tets[4 * t + i];
        pos[o] = coords[v];
        pos[o + 1] = coords[v + 1];
        pos[o + 2] = coords[v + 2];
        col[o] = rgb[0];
        col[o + 1] = rgb[1];
        col[o + 2] = rgb[2];
        o += 3;
      }
  }
  return { positions: pos, colours: col, count: n, cut };
}

