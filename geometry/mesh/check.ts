/**
 * Mesh invariants, checked in one pass and reported as a plain object (never thrown), so that
 * tests across the project and the command line can say exactly what is wrong:
 *
 *  - orientation: every tet has det[v1−v0, v2−v0, v3−v0] > 0 (types.ts);
 *  - conformity: every face is met by one or two tets; a face met by two is interior and the two
 *    tets see it with opposite orientations; a face met by one lies on the domain (the box);
 *  - volume: the compensated (Neumaier) sum of tet volumes against the box volume;
 *  - topology: Euler characteristic V − E + F − T, which is 1 for any triangulated ball
 *    (Euler–Poincaré formula), plus unused vertices and boundary-flag consistency.
 */
import type { TetMesh } from './types';
import { buildEdges, buildFaces, NO_TET, type EdgeTable, type FaceTable } from './edges';
import { TET_FACES } from '../fem/reference';

export interface Box {
  min: [number, number, number];
  max: [number, number, number];
}

export interface CheckOptions {
  /** The domain; defaults to the bounding box of the vertices. */
  box?: Box;
  /** Tolerance for "on the box", relative to the box diagonal (default 1e-9: common practice). */
  relTol?: number;
  /** Precomputed tables for this mesh (skips rebuilding them). */
  edgeTable?: EdgeTable;
  faceTable?: FaceTable;
}

export interface CheckResult {
  ok: boolean;
  /** plain-words description of each failed invariant (empty when ok) */
  problems: string[];
  vertices: number;
  edges: number;
  faces: number;
  tets: number;
  interiorFaces: number;
  boundaryFaces: number;
  /** boundary faces whose three vertices do not lie on one side of the box */
  boundaryFacesOffDomain: number;
  /** faces met by more than two tets */
  overSharedFaces: number;
  /** interior faces whose two tets see them with the same orientation (folded mesh) */
  orientationMismatches: number;
  /** tets with det ≤ 0 */
  nonPositiveTets: number;
  /** smallest det / (longest edge)³ over all tets: 0.0 … 0.707 (regular tet), scale-free */
  minScaledDet: number;
  /** Neumaier-compensated sum of tet volumes */
  volume: number;
  boxVolume: number;
  /** |volume − boxVolume| / boxVolume */
  volumeRelError: number;
  /** V − E + F − T (1 for a triangulated ball) */
  euler: number;
  /** vertices referenced by no tet */
  unusedVertices: number;
  /** vertices whose boundaryVertex flag disagrees with "lies on a boundary face" */
  boundaryFlagMismatches: number;
}

/**
 * Neumaier's improvement of Kahan summation (Neumaier 1974, Z. Angew. Math. Mech. 54):
 * the error of a sum of n terms is bounded by ~2u·Σ|x_i| independent of n, so a volume sum over
 * millions of tets stays at round-off level (relative 1e-12 is then a meaningful test).
 */
export class NeumaierSum {
  private s = 0;
  private c = 0;
  add(x: number): void {
    const t = this.s + x;
    if (Math.abs(this.s) >= Math.abs(x)) this.c += this.s - t + x;
    else this.c += x - t + this.s;
    this.s = t;
  }
  get value(): number {
    return this.s + this.c;
  }
}

/** Six times the signed volume of tet t: det[v1 − v0, v2 − v0, v3 − v0]. */
export function tetDet(coords: Float64Array, tets: Uint32Array, t: number): number {
  const a = 3 * tets[4 * t];
  const b = 3 * tets[4 * t + 1];
  const c = 3 * tets[4 * t + 2];
  const d = 3 * tets[4 * t + 3];
  const x0 = coords[a], y0 = coords[a + 1], z0 = coords[a + 2];
  const ux = coords[b] - x0, uy = coords[b + 1] - y0, uz = coords[b + 2] - z0;
  const vx = coords[c] - x0, vy = coords[c + 1] - y0, vz = coords[c + 2] - z0;
  const wx = coords[d] - x0, wy = coords[d + 1] - y0, wz = coords[d + 2] - z0;
  return ux * (vy * wz - vz * wy) - uy * (vx * wz - vz * wx) + uz * (vx * wy - vy * wx);
}

/** Compensated total volume of the mesh (sum of det/6). */
export function meshVolume(mesh: Pick<TetMesh, 'coords' | 'tets'>): number {
  const sum = new NeumaierSum();
  const m = mesh.tets.length >> 2;
  for (let t = 0; t < m; t++) sum.add(tetDet(mesh.coords, mesh.tets, t) / 6);
  return sum.value;
}

/** Axis-aligned bounding box of the vertices. */
export function boundingBox(coords: Float64Array): Box {
  const min: [number, number, number] = [Infinity, Infinity, Infinity];
  const max: [number, number, number] = [-Infinity, -Infinity, -Infinity];
  for (let i = 0; i < coords.length; i += 3) {
    for (let k = 0; k < 3; k++) {
      const v = coords[i + k];
      if (v < min[k]) min[k] = v;
      if (v > max[k]) max[k] = v;
    }
  }
  return { min, max };
}

/** Is the cyclic triple (p,q,r) the same cycle as (a,b,c)? (all six entries distinct per triple) */
function sameCycle(p: number, q: number, r: number, a: number, b: number, c: number): boolean {
  return (p === a && q === b && r === c) || (p === b && q === c && r === a) || (p === c && q === a && r === b);
}

export function checkMesh(mesh: TetMesh, options: CheckOptions = {}): CheckResult {
  const { coords, tets } = mesh;
  const nV = coords.length / 3;
  const m = tets.length >> 2;
  const problems: string[] = [];
  const box = options.box ?? boundingBox(coords);
  const diag = Math.hypot(box.max[0] - box.min[0], box.max[1] - box.min[1], box.max[2] - box.min[2]);
  const tol = (options.relTol ?? 1e-9) * diag;
  const boxVolume = (box.max[0] - box.min[0]) * (box.max[1] - box.min[1]) * (box.max[2] - box.min[2]);

  // malformed arrays: report and stop (the tables below need valid indices)
  let badIndex = -1;
  for (let i = 0; i < tets.length && badIndex < 0; i++) if (tets[i] >= nV) badIndex = i;
  if (coords.length % 3 !== 0 || tets.length % 4 !== 0 || badIndex >= 0) {
    if (coords.length % 3 !== 0) problems.push(`coords length ${coords.length} is not a multiple of 3`);
    if (tets.length % 4 !== 0) problems.push(`tets length ${tets.length} is not a multiple of 4`);
    if (badIndex >= 0) problems.push(`tet ${badIndex >> 2} refers to vertex ${tets[badIndex]}, but there are ${Math.floor(nV)} vertices`);
    return {
      ok: false,
      problems,
      vertices: Math.floor(nV),
      edges: 0,
      faces: 0,
      tets: m,
      interiorFaces: 0,
      boundaryFaces: 0,
      boundaryFacesOffDomain: 0,
      overSharedFaces: 0,
      orientationMismatches: 0,
      nonPositiveTets: 0,
      minScaledDet: NaN,
      volume: NaN,
      boxVolume,
      volumeRelError: NaN,
      euler: NaN,
      unusedVertices: 0,
      boundaryFlagMismatches: 0,
    };
  }

  // orientation and volume
  const vol = new NeumaierSum();
  let nonPositiveTets = 0;
  let minScaledDet = Infinity;
  for (let t = 0; t < m; t++) {
    const det = tetDet(coords, tets, t);
    if (!(det > 0)) nonPositiveTets++;
    vol.add(det / 6);
    let lmax2 = 0;
    for (let i = 0; i < 4; i++) {
      for (let j = i + 1; j < 4; j++) {
        const a = 3 * tets[4 * t + i];
        const b = 3 * tets[4 * t + j];
        const l2 = (coords[a] - coords[b]) ** 2 + (coords[a + 1] - coords[b + 1]) ** 2 + (coords[a + 2] - coords[b + 2]) ** 2;
        if (l2 > lmax2) lmax2 = l2;
      }
    }
    const scaled = det / (lmax2 * Math.sqrt(lmax2));
    if (scaled < minScaledDet) minScaledDet = scaled;
  }
  if (m === 0) minScaledDet = 0;
  const volume = vol.value;
  const volumeRelError = boxVolume > 0 ? Math.abs(volume - boxVolume) / boxVolume : NaN;

  const et = options.edgeTable ?? buildEdges(tets, nV);
  const ft = options.faceTable ?? buildFaces(tets, nV);
  const nE = et.edges.length / 2;
  const nF = ft.faces.length / 3;

  // faces: interior/boundary, orientation of shared faces, boundary faces on the box
  let interiorFaces = 0;
  let boundaryFaces = 0;
  let boundaryFacesOffDomain = 0;
  let orientationMismatches = 0;
  const onBoundaryFace = new Uint8Array(nV);
  const onPlane = (v: number, axis: number, value: number) => Math.abs(coords[3 * v + axis] - value) <= tol;
  for (let f = 0; f < nF; f++) {
    const a = ft.faces[3 * f];
    const b = ft.faces[3 * f + 1];
    const c = ft.faces[3 * f + 2];
    const t2 = ft.faceTets[2 * f + 1];
    if (t2 !== NO_TET) {
      interiorFaces++;
      // the second tet must see the face as (a, c, b): opposite orientation
      const o = 4 * t2;
      let li = 0;
      while (li < 3 && ft.tetFaces[o + li] !== f) li++;
      const lf = TET_FACES[li];
      const p = tets[o + lf[0]];
      const q = tets[o + lf[1]];
      const r = tets[o + lf[2]];
      if (!sameCycle(p, q, r, a, c, b)) orientationMismatches++;
    } else {
      boundaryFaces++;
      onBoundaryFace[a] = onBoundaryFace[b] = onBoundaryFace[c] = 1;
      let onSide = false;
      for (let axis = 0; axis < 3 && !onSide; axis++) {
        const lo = box.min[axis];
        const hi = box.max[axis];
        onSide =
          (onPlane(a, axis, lo) && onPlane(b, axis, lo) && onPlane(c, axis, lo)) ||
          (onPlane(a, axis, hi) && onPlane(b, axis, hi) && onPlane(c, axis, hi));
      }
      if (!onSide) boundaryFacesOffDomain++;
    }
  }

  // vertices: unused, boundary flags
  const used = new Uint8Array(nV);
  for (let i = 0; i < tets.length; i++) used[tets[i]] = 1;
  let unusedVertices = 0;
  let boundaryFlagMismatches = 0;
  const flags = mesh.boundaryVertex;
  for (let v = 0; v < nV; v++) {
    if (!used[v]) unusedVertices++;
    if (flags && flags.length === nV && (flags[v] ? 1 : 0) !== onBoundaryFace[v]) boundaryFlagMismatches++;
  }
  if (flags && flags.length !== nV) problems.push(`boundaryVertex has ${flags.length} entries for ${nV} vertices`);

  const euler = nV - nE + nF - m;
  if (nonPositiveTets) problems.push(`${nonPositiveTets} tetrahedra are not positively oriented (det ≤ 0)`);
  if (ft.overSharedFaces) problems.push(`${ft.overSharedFaces} faces are met by more than two tetrahedra`);
  if (orientationMismatches) problems.push(`${orientationMismatches} interior faces are seen with the same orientation by both tetrahedra`);
  if (boundaryFacesOffDomain)
    problems.push(`${boundaryFacesOffDomain} faces with a single tetrahedron are not on the domain (hanging nodes or holes)`);
  if (!(volumeRelError <= 1e-12)) problems.push(`volume ${volume} differs from the box volume ${boxVolume} (relative ${volumeRelError})`);
  if (euler !== 1) problems.push(`Euler characteristic V − E + F − T = ${euler}, expected 1 for a ball`);
  if (unusedVertices) problems.push(`${unusedVertices} vertices belong to no tetrahedron`);
  if (boundaryFlagMismatches) problems.push(`${boundaryFlagMismatches} vertices have a boundaryVertex flag that disagrees with the boundary faces`);

  return {
    ok: problems.length === 0,
    problems,
    vertices: nV,
    edges: nE,
    faces: nF,
    tets: m,
    interiorFaces,
    boundaryFaces,
    boundaryFacesOffDomain,
    overSharedFaces: ft.overSharedFaces,
    orientationMismatches,
    nonPositiveTets,
    minScaledDet,
    volume,
    boxVolume,
    volumeRelError,
    euler,
    unusedVertices,
    boundaryFlagMismatches,
  };
}
