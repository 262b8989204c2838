/**
 * What the canvas draws of a device (issue 11), as plain data: the host layers as slabs and the
 * electrodes as boxes, each clipped to the domain box (the solvers work inside it; an unbounded
 * layer ends at the box), and the merged vertex buffers that draw all slabs in one call, all
 * electrode boxes in one call and every outline in one call each (the canvas' draw-call budget).
 * No three.js here, so tests run it in Node.
 */
import type { DesignDocument } from '@contracts/design';

export type Vec3 = [number, number, number];

export interface Slab {
  /** index in `host.layers` (bottom to top) */
  index: number;
  name: string;
  epsilonR: number;
  lo: Vec3;
  hi: Vec3;
}

export interface MetalBox {
  index: number;
  name: string;
  voltageV: number;
  lo: Vec3;
  hi: Vec3;
}

function domainBounds(doc: DesignDocument): { lo: Vec3; hi: Vec3 } {
  const { center: c, halfExtentsNm: h } = doc.domain;
  return { lo: [c[0] - h[0], c[1] - h[1], c[2] - h[2]], hi: [c[0] + h[0], c[1] + h[1], c[2] + h[2]] };
}

/** The layers' parts inside the domain box (layers wholly outside it are left out). */
export function layerSlabs(doc: DesignDocument): Slab[] {
  const layers = doc.host.layers;
  if (!layers) return [];
  const { lo, hi } = domainBounds(doc);
  const out: Slab[] = [];
  layers.forEach((l, index) => {
    const z0 = Math.max(lo[2], l.zMinNm ?? -Infinity);
    const z1 = Math.min(hi[2], l.zMaxNm ?? Infinity);
    if (!(z1 > z0)) return;
    out.push({ index, name: l.name, epsilonR: l.epsilonR, lo: [lo[0], lo[1], z0], hi: [hi[0], hi[1], z1] });
  });
  return out;
}

/** The electrodes' parts inside the domain box (electrodes wholly outside it are left out). */
export function electrodeBoxes(doc: DesignDocument): MetalBox[] {
  const list = doc.electrodes;
  if (!list) return [];
  const { lo, hi } = domainBounds(doc);
  const out: MetalBox[] = [];
  list.forEach((e, index) => {
    const a: Vec3 = [0, 0, 0], b: Vec3 = [0, 0, 0];
    for (let k = 0; k < 3; k++) {
      a[k] = Math.max(lo[k], e.minNm[k]);
      b[k] = Math.min(hi[k], e.maxNm[k]);
      if (!(b[k] > a[k])) return;
    }
    out.push({ index, name: e.name, voltageV: e.voltageV, lo: a, hi: b });
  });
  return out;
}

// corner c of a box: bit 0 → x, bit 1 → y, bit 2 → z (0 = lo, 1 = hi)
const corner = (lo: Vec3, hi: Vec3, c: number): Vec3 => [c & 1 ? hi[0] : lo[0], c & 2 ? hi[1] : lo[1], c & 4 ? hi[2] : lo[2]];
/** the six faces as corner quads, counter-clockwise seen from outside */
const FACES = [
  [0, 2, 3, 1], // −z
  [4, 5, 7, 6], // +z
  [0, 1, 5, 4], // −y
  [2, 6, 7, 3], // +y
  [0, 4, 6, 2], // −x
  [1, 3, 7, 5], // +x
];
/** the twelve edges as corner pairs */
const EDGES = [
  [0, 1], [2, 3], [4, 5], [6, 7],
  [0, 2], [1, 3], [4, 6], [5, 7],
  [0, 4], [1, 5], [2, 6], [3, 7],
];

/** Triangles of all boxes in one buffer (36 vertices a box), with an RGB colour per vertex. */
export function boxTriangles(boxes: readonly { lo: Vec3; hi: Vec3 }[], rgb: (k: number) => [number, number, number]): { positions: Float32Array; colors: Float32Array } {
  const positions = new Float32Array(boxes.length * 36 * 3);
  const colors = new Float32Array(boxes.length * 36 * 3);
  let v = 0;
  boxes.forEach((b, k) => {
    const col = rgb(k);
    for (const f of FACES)
      for (const c of [f[0], f[1], f[2], f[0], f[2], f[3]]) {
        positions.set(corner(b.lo, b.hi, c), 3 * v);
        colors.set(col, 3 * v);
        v++;
      }
  });
  return { positions, colors };
}

/** Outline segments of all boxes in one buffer (24 vertices a box). */
export function boxEdges(boxes: readonly { lo: Vec3; hi: Vec3 }[]): Float32Array {
  const out = new Float32Array(boxes.length * 24 * 3);
  let v = 0;
  for (const b of boxes)
    for (const [p, q] of EDGES) {
      out.set(corner(b.lo, b.hi, p), 3 * v++);
      out.set(corner(b.lo, b.hi, q), 3 * v++);
    }
  return out;
}

/** "+0.5 V", "−0.25 V", "0 V" (a true minus sign). */
export function voltText(v: number): string {
  const t = `${+Math.abs(v).toPrecision(4)} V`;
  return v > 0 ? `+${t}` : v < 0 ? `−${t}` : t;
}
