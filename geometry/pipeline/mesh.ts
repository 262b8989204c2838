/**
 * Design → size field → graded mesh → (potentials) → bytes: the mesh half of the pipeline that
 * `npm run cli -- mesh` and a `mesh` job both run (server/cli/mesh.ts, server/jobs/pipeline.ts).
 *
 *   const artifact = buildMeshArtifact(design, { order });   // data only: mesh, size field, summary
 *   const bytes = encodeMesh(artifact, 'vtu');                // deterministic bytes of one format
 *
 * Both callers encode the same artifact with the same options, which is why a revision's mesh.vtu
 * is byte for byte the CLI's file. Words (warnings, the readable report) are the callers' job:
 * this returns figures and ids.
 */
import type { Design } from '../design/types';
import { resolveOrbital } from '../design/presets';
import { COULOMB_EV_NM } from '../units';
import { meshDesign, SizeField, sizeFieldFromDesign, orbitalLength, type MeshDesignResult, type TetMesh } from '../mesh/index';
import { writeVtu, writeVtkLegacy, encodeMeshBinary } from '../mesh/export/index';
import { qualityReport, type QualityReport, type ReportSite } from '../mesh/quality';
import { solveSitePotentials } from '../fem/coulomb';
import type { CoreProgress } from '../progress';

export type MeshFormat = 'vtu' | 'vtk' | 'binary';

/** The keys `mesh --json` prints before its timings, and exactly a mesh revision's summary. */
export interface MeshSummary {
  vertices: number;
  tets: number;
  p2Nodes: number;
  minDihedralDeg: number;
  maxDihedralDeg: number;
  volumeNm3: number;
  levels: number[];
}

export interface MeshArtifact {
  order: 1 | 2;
  mesh: TetMesh;
  /** what the mesher reports: the size-field rule, the estimate made before meshing, statistics */
  meshed: MeshDesignResult;
  /** the size field at the mesh vertices (nm), written as point data (the writers extend it to P2 nodes) */
  sizeField: Float64Array;
  /** with `solve`: φ of every site with electrons in V per elementary charge, on all nodes of the order */
  pointData: { name: string; values: Float64Array }[];
  /** sites outside the domain: allowed (a design may be mid-edit), but the mesh is not graded around them */
  outsideSiteIds: string[];
  quality: QualityReport;
  summary: MeshSummary;
}

export interface MeshArtifactOptions {
  /** element order (default design.refinement.order): 4- or 10-node cells and the grading exponent */
  order?: 1 | 2;
  /** also solve every site's potential on this mesh (point data "Potential_<id>") */
  solve?: boolean;
  /** per-site figures in `quality.sites` (element size at and near each site); costs a pass per site */
  siteReport?: boolean;
  onProgress?: (p: CoreProgress) => void;
  signal?: { readonly aborted: boolean };
}

export function meshSummary(q: QualityReport): MeshSummary {
  return {
    vertices: q.vertices,
    tets: q.tets,
    p2Nodes: q.p2Nodes,
    minDihedralDeg: q.minDihedralDeg,
    maxDihedralDeg: q.maxDihedralDeg,
    volumeNm3: q.volumeNm3,
    levels: q.levels,
  };
}

/** Ids of the sites not strictly inside the domain. */
export function sitesOutsideDomain(design: Design): string[] {
  const { center, halfExtentsNm } = design.domain;
  return design.sites.filter((s) => s.position.some((x, k) => Math.abs(x - center[k]) >= halfExtentsNm[k])).map((s) => s.id);
}

export function buildMeshArtifact(design: Design, options: MeshArtifactOptions = {}): MeshArtifact {
  const order = options.order ?? design.refinement.order;
  options.onProgress?.({ phase: 'mesh', fraction: 0 });
  const meshed = meshDesign(design, { order });
  const mesh = meshed.mesh;

  const field = new SizeField(sizeFieldFromDesign(design, { order }).spec);
  const nV = mesh.coords.length / 3;
  const sizeField = new Float64Array(nV);
  for (let v = 0; v < nV; v++) sizeField[v] = field.valueAt(mesh.coords[3 * v], mesh.coords[3 * v + 1], mesh.coords[3 * v + 2]);

  const pointData: MeshArtifact['pointData'] = [];
  if (options.solve) {
    const solved = solveSitePotentials(design, mesh, order, {
      signal: options.signal,
      onProgress: options.onProgress && ((p) => options.onProgress!({ ...p, fraction: 0.1 + 0.8 * p.fraction })),
    });
    solved.siteIds.forEach((id, i) => {
      const phi = solved.nodal[i];
      const volts = new Float64Array(phi.length);
      for (let k = 0; k < phi.length; k++) volts[k] = phi[k] * COULOMB_EV_NM;
      pointData.push({ name: `Potential_${id}`, values: volts });
    });
  }

  options.onProgress?.({ phase: 'quality', fraction: 0.9 });
  const sites: ReportSite[] = options.siteReport
    ? design.sites.map((s) => ({ id: s.id, position: s.position, radiusNm: orbitalLength(resolveOrbital(s)) }))
    : [];
  const quality = qualityReport(mesh, sites);
  return { order, mesh, meshed, sizeField, pointData, outsideSiteIds: sitesOutsideDomain(design), quality, summary: meshSummary(quality) };
}

/** The artifact's bytes in one format. TWMESH holds the mesh alone (no point data). */
export function encodeMesh(artifact: MeshArtifact, format: MeshFormat): Uint8Array {
  const { mesh, order, sizeField, pointData } = artifact;
  if (format === 'vtu') return writeVtu(mesh, { order, sizeField, pointData });
  if (format === 'vtk') return writeVtkLegacy(mesh, { order, sizeField, pointData });
  return encodeMeshBinary(mesh);
}
