/**
 * A design's device (issue 11) as the finite elements see it: εr per region of a layered host,
 * the region of each tetrahedron, the dofs held by electrodes, and the check that a mesh conforms
 * to every layer interface and electrode face (no element straddles one).
 *
 * Regions follow the common data shape of issue 11: `tetRegion` = index of the layer the element
 * lies in (0 without layers), ELECTRODE_REGION (255) inside an electrode. Electrode elements stay
 * in the mesh for the bisection hierarchy; all their dofs are Dirichlet, so they carry no energy
 * and their εr (set to 1 here) never enters a result.
 *
 * For the charge problem every electrode is at 0 (its set voltage is the lever-arm problem's):
 * a metal at a fixed voltage takes whatever charge keeps it there, so a site's own potential
 * vanishes on it (Jackson, Classical Electrodynamics 3rd ed., §1.10, superposition of the
 * Dirichlet problem; from memory).
 *
 * The checks are exact, not sampled: a tetrahedron belongs to a layer when all four vertices lie
 * within LAYER_SNAP_NM of its slab; it belongs to an electrode when its centroid is inside the box
 * and then all its vertices must be in the closed box; a tetrahedron with a vertex strictly inside
 * a box and its centroid outside straddles a face; and the volume of the tetrahedra tagged to each
 * electrode must equal the box's (clipped) volume, which catches a box smaller than the elements.
 */
import type { Design } from '../design/types';
import type { TetMesh } from '../mesh/types';
import { CoulombError } from './coulomb-types';
import { hostStack } from '../host/planes';
import type { PlanarStack } from '../host/types';

/** Region id of the elements inside an electrode (the common shape of issue 11). */
export const ELECTRODE_REGION = 255;
/** Vertices this close to an interface or a box face count as on it (nm; common practice). */
export const LAYER_SNAP_NM = 1e-7;

/** True when the design has layers or electrodes, i.e. the homogeneous solver would be wrong. */
export function hasDevice(design: Design): boolean {
  return (design.host.layers?.length ?? 0) > 0 || (design.electrodes?.length ?? 0) > 0;
}

/** εr by region id: layer k → layers[k].epsilonR, else host.epsilonR; 255 → 1 (no energy there). */
export function epsByRegion(design: Design): Float64Array {
  const eps = new Float64Array(256).fill(design.host.epsilonR);
  const layers = design.host.layers ?? [];
  layers.forEach((l, k) => (eps[k] = l.epsilonR));
  if ((design.electrodes?.length ?? 0) > 0) eps[ELECTRODE_REGION] = 1;
  return eps;
}

/**
 * Index of the layer holding height z; the end layers extend to ±∞ (as geometry/host does with a
 * bounded end). Points within LAYER_SNAP_NM of an interface get the layer below.
 */
export function layerAt(design: Design, z: number): number {
  const layers = design.host.layers ?? [];
  for (let k = 0; k < layers.length - 1; k++) {
    const top = layers[k].zMaxNm;
    if (top !== null && z <= top + LAYER_SNAP_NM) return k;
  }
  return Math.max(0, layers.length - 1);
}

/** εr of the medium at a site (the layer holding it, or the host's). */
export function epsilonAt(design: Design, z: number): number {
  const layers = design.host.layers ?? [];
  return layers.length > 0 ? layers[layerAt(design, z)].epsilonR : design.host.epsilonR;
}

/** Electrode boxes clipped to the domain, 6 numbers each (min x y z, max x y z). */
export function electrodeBoxes(design: Design): Float64Array {
  const els = design.electrodes ?? [];
  const c = design.domain.center, h = design.domain.halfExtentsNm;
  const out = new Float64Array(6 * els.length);
  els.forEach((e, k) => {
    for (let a = 0; a < 3; a++) {
      out[6 * k + a] = Math.max(e.minNm[a], c[a] - h[a]);
      out[6 * k + 3 + a] = Math.min(e.maxNm[a], c[a] + h[a]);
    }
  });
  return out;
}

function inClosedBox(b: Float64Array, k: number, x: number, y: number, z: number): boolean {
  const o = 6 * k;
  return x >= b[o] - LAYER_SNAP_NM && y >= b[o + 1] - LAYER_SNAP_NM && z >= b[o + 2] - LAYER_SNAP_NM &&
    x <= b[o + 3] + LAYER_SNAP_NM && y <= b[o + 4] + LAYER_SNAP_NM && z <= b[o + 5] + LAYER_SNAP_NM;
}

function inOpenBox(b: Float64Array, k: number, x: number, y: number, z: number): boolean {
  const o = 6 * k;
  return x > b[o] + LAYER_SNAP_NM && y > b[o + 1] + LAYER_SNAP_NM && z > b[o + 2] + LAYER_SNAP_NM &&
    x < b[o + 3] - LAYER_SNAP_NM && y < b[o + 4] - LAYER_SNAP_NM && z < b[o + 5] - LAYER_SNAP_NM;
}

/**
 * The mesh with `tetRegion` set from the design (layer index, or ELECTRODE_REGION), after
 * checking that it conforms; throws CoulombError 'mesh-not-conforming' otherwise. Only
 * `tetRegion` is new; the other arrays are shared with the input.
 */
export function deviceMesh(design: Design, mesh: TetMesh): TetMesh {
  const layers = design.host.layers ?? [];
  const boxes = electrodeBoxes(design);
  const nE = boxes.length / 6;
  const { coords, tets } = mesh;
  const nT = tets.length / 4;
  const region = new Uint8Array(nT);
  const tagged = new Float64Array(nE);
  const refuse = (what: string, t: number, extra: Record<string, number | string>): never => {
    throw new CoulombError(
      'mesh-not-conforming',
      `the mesh does not follow the device: element ${t} straddles ${what}. The solver needs a mesh whose elements lie each in one layer and wholly inside or outside each electrode.`,
      { element: t, ...extra },
    );
  };
  for (let t = 0; t < nT; t++) {
    let zLo = Infinity, zHi = -Infinity, cx = 0, cy = 0, cz = 0;
    for (let v = 0; v < 4; v++) {
      const i = tets[4 * t + v];
      const z = coords[3 * i + 2];
      zLo = Math.min(zLo, z);
      zHi = Math.max(zHi, z);
      cx += 0.25 * coords[3 * i];
      cy += 0.25 * coords[3 * i + 1];
      cz += 0.25 * z;
    }
    if (layers.length > 1) {
      const k = layerAt(design, cz);
      const lo = layers[k].zMinNm, hi = layers[k].zMaxNm;
      if ((k > 0 && lo !== null && zLo < lo - LAYER_SNAP_NM) || (k < layers.length - 1 && hi !== null && zHi > hi + LAYER_SNAP_NM)) {
        refuse(`an interface of layer "${layers[k].name}"`, t, { layer: k });
      }
      region[t] = k;
    }
    for (let e = 0; e < nE; e++) {
      const centroidIn = inOpenBox(boxes, e, cx, cy, cz);
      let allIn = true, someStrict = false;
      for (let v = 0; v < 4; v++) {
        const i = tets[4 * t + v];
        const x = coords[3 * i], y = coords[3 * i + 1], z = coords[3 * i + 2];
        if (!inClosedBox(boxes, e, x, y, z)) allIn = false;
        if (inOpenBox(boxes, e, x, y, z)) someStrict = true;
      }
      if (centroidIn && !allIn) refuse(`a face of electrode "${design.electrodes![e].name}"`, t, { electrode: e });
      if (!centroidIn && someStrict) refuse(`a face of electrode "${design.electrodes![e].name}"`, t, { electrode: e });
      if (centroidIn) {
        region[t] = ELECTRODE_REGION;
        tagged[e] += tetVolume(coords, tets, t);
      }
    }
  }
  for (let e = 0; e < nE; e++) {
    const o = 6 * e;
    const vol = Math.max(0, boxes[o + 3] - boxes[o]) * Math.max(0, boxes[o + 4] - boxes[o + 1]) * Math.max(0, boxes[o + 5] - boxes[o + 2]);
    if (Math.abs(tagged[e] - vol) > 1e-9 * Math.max(vol, 1)) {
      throw new CoulombError(
        'mesh-not-conforming',
        `the mesh does not follow electrode "${design.electrodes![e].name}": its elements fill ${tagged[e].toPrecision(6)} nm³ of its ${vol.toPrecision(6)} nm³.`,
        { electrode: e, taggedNm3: tagged[e], boxNm3: vol },
      );
    }
  }
  return { ...mesh, tetRegion: region };
}

function tetVolume(coords: Float64Array, tets: Uint32Array, t: number): number {
  const a = tets[4 * t], b = tets[4 * t + 1], c = tets[4 * t + 2], d = tets[4 * t + 3];
  const ax = coords[3 * b] - coords[3 * a], ay = coords[3 * b + 1] - coords[3 * a + 1], az = coords[3 * b + 2] - coords[3 * a + 2];
  const bx = coords[3 * c] - coords[3 * a], by = coords[3 * c + 1] - coords[3 * a + 1], bz = coords[3 * c + 2] - coords[3 * a + 2];
  const cx = coords[3 * d] - coords[3 * a], cy = coords[3 * d + 1] - coords[3 * a + 1], cz = coords[3 * d + 2] - coords[3 * a + 2];
  return Math.abs(ax * (by * cz - bz * cy) - ay * (bx * cz - bz * cx) + az * (bx * cy - by * cx)) / 6;
}

/** 1 at every dof in or on an electrode (closed box), else 0. */
export function electrodeDofs(design: Design, dofCoords: Float64Array): Uint8Array {
  const boxes = electrodeBoxes(design);
  const nE = boxes.length / 6;
  const n = dofCoords.length / 3;
  const out = new Uint8Array(n);
  if (nE === 0) return out;
  for (let i = 0; i < n; i++) {
    const x = dofCoords[3 * i], y = dofCoords[3 * i + 1], z = dofCoords[3 * i + 2];
    for (let e = 0; e < nE; e++) {
      if (inClosedBox(boxes, e, x, y, z)) {
        out[i] = 1;
        break;
      }
    }
  }
  return out;
}

/**
 * The planar stack of the design for the layered far field of the walls (geometry/host hostStack:
 * its layers, closed by the electrodes that span the domain's cross-section as metal planes);
 * null when the host gives none.
 */
export function deviceStack(design: Design): PlanarStack | null {
  const siteZ = design.sites.map((s) => s.position[2]);
  return hostStack({ epsilonR: design.host.epsilonR, layers: design.host.layers, electrodes: design.electrodes, domain: design.domain }, siteZ).stack;
}
