/**
 * A design's device (issue 11) as the finite elements see it: εr per region of a layered host,
 * the region of each tetrahedron, and the check that a mesh conforms to every layer interface and
 * electrode face (no element straddles one). The design's geometry (ELECTRODE_REGION, hasDevice,
 * the clipped electrodes, the layer holding a height) is geometry/mesh/device.ts's; the
 * electrodes' Dirichlet dofs are electrodes.ts's.
 *
 * Regions follow the common data shape of issue 11: `tetRegion` = index of the layer the element
 * lies in (0 without layers), ELECTRODE_REGION (255) inside an electrode. Electrode elements stay
 * in the mesh for the bisection hierarchy; all their dofs are Dirichlet, so they carry no energy
 * and their εr (METAL_EPSILON) never enters a result.
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
import { ELECTRODE_REGION, clippedElectrodes, layerIndexAt, type ClippedElectrode } from '../mesh/device';
import { CoulombError } from './coulomb-types';
import { hostStack } from '../host/planes';
import type { PlanarStack } from '../host/types';

/** Vertices this close to an interface or a box face count as on it (nm; common practice). */
export const LAYER_SNAP_NM = 1e-7;
/** εr of the metal region: any positive value serves (its dofs are all fixed). */
export const METAL_EPSILON = 1;

/**
 * εr per region id (256 entries, indexed by TetMesh.tetRegion): layer k → layers[k].epsilonR
 * (host.epsilonR everywhere without layers), ELECTRODE_REGION → METAL_EPSILON.
 */
export function epsByRegion(design: Design): Float64Array {
  const eps = new Float64Array(256).fill(design.host.epsilonR);
  const layers = design.host.layers ?? [];
  layers.forEach((l, k) => (eps[k] = l.epsilonR));
  eps[ELECTRODE_REGION] = METAL_EPSILON;
  return eps;
}

/** εr of the medium at height z (a site's: sites lie inside a layer, never on an interface). */
export function epsilonAt(design: Design, z: number): number {
  return epsByRegion(design)[layerIndexAt(design, z)];
}

function inClosedBox(e: ClippedElectrode, x: number, y: number, z: number): boolean {
  return x >= e.min[0] - LAYER_SNAP_NM && y >= e.min[1] - LAYER_SNAP_NM && z >= e.min[2] - LAYER_SNAP_NM &&
    x <= e.max[0] + LAYER_SNAP_NM && y <= e.max[1] + LAYER_SNAP_NM && z <= e.max[2] + LAYER_SNAP_NM;
}

function inOpenBox(e: ClippedElectrode, x: number, y: number, z: number): boolean {
  return x > e.min[0] + LAYER_SNAP_NM && y > e.min[1] + LAYER_SNAP_NM && z > e.min[2] + LAYER_SNAP_NM &&
    x < e.max[0] - LAYER_SNAP_NM && y < e.max[1] - LAYER_SNAP_NM && z < e.max[2] - LAYER_SNAP_NM;
}

/**
 * The mesh with `tetRegion` set from the design (layer index, or ELECTRODE_REGION), after
 * checking that it conforms; throws CoulombError 'mesh-not-conforming' otherwise. Only
 * `tetRegion` is new; the other arrays are shared with the input. Electrodes with no volume
 * inside the domain are left out (clippedElectrodes): they hold no element.
 */
export function deviceMesh(design: Design, mesh: TetMesh): TetMesh {
  const layers = design.host.layers ?? [];
  const electrodes = clippedElectrodes(design);
  const nE = electrodes.length;
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
      const k = layerIndexAt(design, cz);
      const lo = layers[k].zMinNm, hi = layers[k].zMaxNm;
      if ((k > 0 && lo !== null && zLo < lo - LAYER_SNAP_NM) || (k < layers.length - 1 && hi !== null && zHi > hi + LAYER_SNAP_NM)) {
        refuse(`an interface of layer "${layers[k].name}"`, t, { layer: k });
      }
      region[t] = k;
    }
    for (let e = 0; e < nE; e++) {
      const box = electrodes[e];
      const centroidIn = inOpenBox(box, cx, cy, cz);
      let allIn = true, someStrict = false;
      for (let v = 0; v < 4; v++) {
        const i = tets[4 * t + v];
        const x = coords[3 * i], y = coords[3 * i + 1], z = coords[3 * i + 2];
        if (!inClosedBox(box, x, y, z)) allIn = false;
        if (inOpenBox(box, x, y, z)) someStrict = true;
      }
      if ((centroidIn && !allIn) || (!centroidIn && someStrict)) {
        refuse(`a face of electrode "${design.electrodes![box.index].name}"`, t, { electrode: box.index });
      }
      if (centroidIn) {
        region[t] = ELECTRODE_REGION;
        tagged[e] += tetVolume(coords, tets, t);
      }
    }
  }
  for (let e = 0; e < nE; e++) {
    const { min, max, index } = electrodes[e];
    const vol = (max[0] - min[0]) * (max[1] - min[1]) * (max[2] - min[2]);
    if (Math.abs(tagged[e] - vol) > 1e-9 * Math.max(vol, 1)) {
      const name = design.electrodes![index].name;
      throw new CoulombError(
        'mesh-not-conforming',
        `the mesh does not follow electrode "${name}": its elements fill ${tagged[e].toPrecision(6)} nm³ of its ${vol.toPrecision(6)} nm³.`,
        { electrode: index, taggedNm3: tagged[e], boxNm3: vol },
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

/**
 * The planar stack of the design for the layered far field of the walls (geometry/host hostStack:
 * its layers, closed by the electrodes that span the domain's cross-section as metal planes);
 * null when the host gives none.
 */
export function deviceStack(design: Design): PlanarStack | null {
  const siteZ = design.sites.map((s) => s.position[2]);
  return hostStack({ epsilonR: design.host.epsilonR, layers: design.host.layers, electrodes: design.electrodes, domain: design.domain }, siteZ).stack;
}
