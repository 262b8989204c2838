/**
 * The device part of a design for the mesher: the planes the mesh must conform to (layer
 * interfaces, electrode faces), the tensor grid of the initial Kuhn cells, and the tags of the
 * finished mesh (region per tet, electrode per vertex).
 *
 * Why conformity costs nothing after the initial grid: a child of a bisection is a subset of its
 * parent (both are convex), so a tet that lies on one side of a plane has children on that side.
 * When every required plane is a grid plane of the initial tensor grid, each initial Kuhn tet lies
 * in one cell, hence on one side of every required plane, and so does every tet the bisection
 * makes. No tet straddles a layer interface or an electrode face; tests check it on the result.
 *
 *     z ▲  ┌──┬──┬──┬──┐ ← box max
 *       │  ├──┼──┼──┼──┤ ← electrode face (required line, snapped)
 *       │  ├──┼──┼──┼──┤ ← layer interface (required line)
 *       │  │  │  │  │  │    between required lines: round(L / s) equal cells, s the near-cubic
 *       │  └──┴──┴──┴──┘ ← box min                   spacing of the plain box
 *
 * A thin interval (an oxide of 1 nm in a 40 nm box) gets one flat layer of cells. Kuhn tets of a
 * box cell are path simplices with three mutually orthogonal edges, which satisfy the maximum
 * angle condition however flat the cell (Křížek, SIAM J. Numer. Anal. 29 (1992) 513–520), so the
 * interpolation error stays bounded without near-cubic cells there (Apel, Anisotropic Finite
 * Elements, Teubner 1999, ch. 2; from memory).
 */
import type { Design, Vec3 } from '../design/types';

/** Region id of tets inside an electrode (kept for the bisection hierarchy; all their dofs are Dirichlet). */
export const ELECTRODE_REGION = 255;
/** vertexElectrode value of a vertex in or on no electrode. */
export const NO_ELECTRODE = 0xff;

/** Required planes closer than this fraction of the box extent are one plane (rounding of inputs). */
const MERGE_FRACTION = 1e-9;

export interface ClippedElectrode {
  /** index in design.electrodes */
  index: number;
  min: Vec3;
  max: Vec3;
}

/** True when the design has layers or electrodes (the device path of the mesher). */
export function hasDevice(design: Design): boolean {
  return (design.host.layers?.length ?? 0) > 0 || (design.electrodes?.length ?? 0) > 0;
}

function boxOf(design: Design): { lo: Vec3; hi: Vec3 } {
  const { center, halfExtentsNm } = design.domain;
  return {
    lo: [center[0] - halfExtentsNm[0], center[1] - halfExtentsNm[1], center[2] - halfExtentsNm[2]],
    hi: [center[0] + halfExtentsNm[0], center[1] + halfExtentsNm[1], center[2] + halfExtentsNm[2]],
  };
}

/** The electrodes clipped to the domain box; those with no volume inside it are left out. */
export function clippedElectrodes(design: Design): ClippedElectrode[] {
  const { lo, hi } = boxOf(design);
  const out: ClippedElectrode[] = [];
  (design.electrodes ?? []).forEach((e, index) => {
    const min: Vec3 = [0, 0, 0];
    const max: Vec3 = [0, 0, 0];
    for (let a = 0; a < 3; a++) {
      min[a] = Math.max(lo[a], e.minNm[a]);
      max[a] = Math.min(hi[a], e.maxNm[a]);
    }
    if (min[0] < max[0] && min[1] < max[1] && min[2] < max[2]) out.push({ index, min, max });
  });
  return out;
}

/** Layer interfaces (z, nm) strictly inside the domain, bottom to top. */
export function interfacesInside(design: Design): number[] {
  const layers = design.host.layers ?? [];
  const { lo, hi } = boxOf(design);
  const out: number[] = [];
  for (let k = 1; k < layers.length; k++) {
    const z = layers[k].zMinNm ?? layers[k - 1].zMaxNm;
    if (z !== null && z > lo[2] && z < hi[2]) out.push(z);
  }
  return out;
}

/** Required grid coordinates per axis (box ends included, sorted, near-duplicates merged). */
export function requiredLines(design: Design): [number[], number[], number[]] {
  const { lo, hi } = boxOf(design);
  const raw: number[][] = [[lo[0], hi[0]], [lo[1], hi[1]], [lo[2], hi[2], ...interfacesInside(design)]];
  for (const e of clippedElectrodes(design)) {
    for (let a = 0; a < 3; a++) raw[a].push(e.min[a], e.max[a]);
  }
  return raw.map((vals, a) => {
    const tol = MERGE_FRACTION * (hi[a] - lo[a]);
    const sorted = vals.filter((v) => v >= lo[a] && v <= hi[a]).sort((x, y) => x - y);
    const out: number[] = [];
    for (const v of sorted) {
      if (out.length > 0 && v - out[out.length - 1] <= tol) continue;
      out.push(v);
    }
    // the box ends themselves, exactly (a merged near-end line must not move the box)
    out[0] = lo[a];
    if (hi[a] - out[out.length - 1] <= tol) out[out.length - 1] = hi[a];
    else out.push(hi[a]);
    return out;
  }) as [number[], number[], number[]];
}

export interface DeviceGrid {
  /** grid coordinates per axis, box ends included */
  lines: [Float64Array, Float64Array, Float64Array];
  /** per axis, the indices into `lines` of the required lines: the grid is uniform between two of them */
  pieces: [number[], number[], number[]];
}

/**
 * Grid lines per axis: between consecutive required lines, round(L/s) equal cells (at least one),
 * s the near-cubic spacing of the plain box (chooseInitialCells). Equal cells inside an interval
 * are the uniform lines snapped to the required ones: no cell thinner than 2/3 of the spacing
 * unless the interval itself is thinner. Returns null when no plane lies strictly inside the box
 * (then the plain uniform grid applies, byte for byte as before).
 */
export function deviceGrid(design: Design, cells: readonly [number, number, number]): DeviceGrid | null {
  const req = requiredLines(design);
  if (req.every((r) => r.length === 2)) return null;
  const { lo, hi } = boxOf(design);
  const lines: Float64Array[] = [];
  const pieces: number[][] = [];
  for (let a = 0; a < 3; a++) {
    const r = req[a];
    const s = (hi[a] - lo[a]) / cells[a];
    const out: number[] = [r[0]];
    const idx: number[] = [0];
    for (let k = 0; k + 1 < r.length; k++) {
      const L = r[k + 1] - r[k];
      const m = Math.max(1, Math.round(L / s));
      for (let i = 1; i < m; i++) out.push(r[k] + (L * i) / m);
      out.push(r[k + 1]);
      idx.push(out.length - 1);
    }
    lines.push(Float64Array.from(out));
    pieces.push(idx);
  }
  return { lines: lines as DeviceGrid['lines'], pieces: pieces as DeviceGrid['pieces'] };
}

/**
 * Region of a point: the index of the layer holding height z (0 without layers). Layers are listed
 * bottom to top and touch, so it is the number of interfaces below z.
 */
export function layerIndexAt(design: Design, z: number): number {
  const layers = design.host.layers ?? [];
  let k = 0;
  for (let i = 1; i < layers.length; i++) {
    const zi = layers[i].zMinNm ?? layers[i - 1].zMaxNm;
    if (zi !== null && z > zi) k = i;
  }
  return k;
}

/**
 * Region per tet from its centroid (the tet lies wholly in one layer and wholly inside or outside
 * each electrode, so the centroid decides), and the electrode of each vertex lying in or on a
 * clipped electrode box (exact comparisons: grid planes sit exactly at the faces and a midpoint of
 * two points on a plane lies exactly on it).
 */
export function tagDevice(
  design: Design,
  coords: Float64Array,
  tets: Uint32Array,
  nVertices: number,
  nTets: number,
  tetRegion: Uint8Array,
): Uint8Array {
  const electrodes = clippedElectrodes(design);
  const hasLayers = (design.host.layers?.length ?? 0) > 0;
  for (let t = 0; t < nTets; t++) {
    let cx = 0, cy = 0, cz = 0;
    for (let i = 0; i < 4; i++) {
      const v = 3 * tets[4 * t + i];
      cx += coords[v];
      cy += coords[v + 1];
      cz += coords[v + 2];
    }
    cx /= 4;
    cy /= 4;
    cz /= 4;
    let region = hasLayers ? layerIndexAt(design, cz) : 0;
    for (const e of electrodes) {
      if (cx > e.min[0] && cx < e.max[0] && cy > e.min[1] && cy < e.max[1] && cz > e.min[2] && cz < e.max[2]) {
        region = ELECTRODE_REGION;
        break;
      }
    }
    tetRegion[t] = region;
  }
  return electrodeOfPoints(electrodes, coords.subarray(0, 3 * nVertices));
}

/**
 * The electrode of each point (3 numbers a point): the index in design.electrodes of the first
 * clipped electrode whose closed box, grown by `snapNm` on every side, holds it; NO_ELECTRODE
 * elsewhere. The mesher's own vertices lie exactly on the faces (snapNm 0); the finite elements
 * use a small snap for meshes made elsewhere (geometry/fem/device.ts LAYER_SNAP_NM).
 */
export function electrodeOfPoints(electrodes: readonly ClippedElectrode[], points: Float64Array, snapNm = 0): Uint8Array {
  const n = points.length / 3;
  const out = new Uint8Array(n).fill(NO_ELECTRODE);
  if (electrodes.length === 0) return out;
  for (let v = 0; v < n; v++) {
    const x = points[3 * v], y = points[3 * v + 1], z = points[3 * v + 2];
    for (const e of electrodes) {
      if (
        x >= e.min[0] - snapNm && x <= e.max[0] + snapNm &&
        y >= e.min[1] - snapNm && y <= e.max[1] + snapNm &&
        z >= e.min[2] - snapNm && z <= e.max[2] + snapNm
      ) {
        out[v] = e.index;
        break;
      }
    }
  }
  return out;
}

/**
 * The edges of the clipped electrode boxes that lie inside the domain (not on a wall): where the
 * field of the electrodes' problem is singular (a re-entrant edge of the metal). 6 numbers per
 * segment (two endpoints).
 */
export function electrodeEdgeSegments(design: Design): Float64Array {
  const { lo, hi } = boxOf(design);
  const out: number[] = [];
  for (const e of clippedElectrodes(design)) {
    const b = [e.min, e.max];
    // an edge along axis a at the (b, c) corners of the other two axes
    for (let a = 0; a < 3; a++) {
      const p = (a + 1) % 3, q = (a + 2) % 3;
      for (let i = 0; i < 2; i++) {
        for (let j = 0; j < 2; j++) {
          const vp = b[i][p], vq = b[j][q];
          // an edge on a domain wall is no edge of the metal inside the domain
          if (vp === lo[p] || vp === hi[p] || vq === lo[q] || vq === hi[q]) continue;
          const s: number[] = [0, 0, 0, 0, 0, 0];
          s[a] = e.min[a];
          s[3 + a] = e.max[a];
          s[p] = s[3 + p] = vp;
          s[q] = s[3 + q] = vq;
          out.push(...s);
        }
      }
    }
  }
  return Float64Array.from(out);
}
