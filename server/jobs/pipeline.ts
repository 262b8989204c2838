/**
 * The one adapter between jobs and the numerical core: what a job of each kind computes, and the
 * files and summary it leaves. It calls what the command line calls, with the same options, so a
 * revision's mesh.vtu is byte for byte the file `npm run cli -- mesh <doc> --out x.vtu --order N`
 * writes, and its results.json is what `npm run cli -- coulomb <doc> --order N --json` prints.
 *
 * Runs inside a worker thread (server/jobs/task.worker.ts). Refusals of the numerical core
 * (MeshError, CoulombError) come back as `JobRefusal` with their words; anything else is a fault
 * (retried by the queue).
 */
import Papa from 'papaparse';
import type { JobKind, JobOptions, JobProgress } from '@contracts/api';
import type { Design } from '../../geometry/design/types';
import { MeshError, meshDesign, SizeField, sizeFieldFromDesign } from '../../geometry/mesh/index';
import { writeVtu, writeVtkLegacy, encodeMeshBinary } from '../../geometry/mesh/export/index';
import { qualityReport } from '../../geometry/mesh/quality';
import { solveCoulomb, solveSitePotentials, CoulombError } from '../../geometry/fem/coulomb';
import { COULOMB_EV_NM } from '../../geometry/units';
import { runConvergence as runConvergenceSweep, type RefinementRow, type BoxRow } from '../../geometry/fem/convergence';
import { toCoulombJson } from '../cli/coulomb';
import { toConvergenceJson } from '../cli/convergence';
import { meshSummary } from '../cli/mesh';

export interface PipelineFile {
  name: 'mesh.vtu' | 'mesh.vtk' | 'mesh.twmesh' | 'results.json' | 'results.csv' | 'potential.f64';
  bytes: Uint8Array;
}

export interface PipelineOutput {
  /** exactly the keys the CLI's --json prints for the same command, timings left out */
  summary: Record<string, unknown>;
  computeSeconds: number;
  files: PipelineFile[];
}

export interface PipelineHooks {
  onProgress?: (p: JobProgress) => void;
  signal?: AbortSignal;
}

/** A refusal of the numerical core: the job fails with these words and is not retried. */
export class JobRefusal extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'JobRefusal';
  }
}

const utf8 = (s: string) => new TextEncoder().encode(s);
/** RFC 4180 quoting by papaparse, with \n line ends like every other text file we write */
const csvText = (table: { fields: string[]; data: unknown[][] }): string => Papa.unparse(table, { newline: '\n' });
/** the CLI prints with console.log: the JSON text and a newline */
const jsonFile = (value: unknown): Uint8Array => utf8(`${JSON.stringify(value, null, 2)}\n`);

function checkAbort(signal?: AbortSignal): void {
  if (signal?.aborted) throw new DOMException('The job was cancelled.', 'AbortError');
}

function runMesh(design: Design, order: 1 | 2, hooks: PipelineHooks): PipelineOutput {
  const t0 = performance.now();
  hooks.onProgress?.({ phase: 'mesh', fraction: 0.05 });
  // as server/cli/mesh.ts does: the mesh, then the size field at its vertices as point data
  const mesh = meshDesign(design, { order }).mesh;
  checkAbort(hooks.signal);
  hooks.onProgress?.({ phase: 'encode', fraction: 0.6 });
  const field = new SizeField(sizeFieldFromDesign(design, { order }).spec);
  const nV = mesh.coords.length / 3;
  const sizeField = new Float64Array(nV);
  for (let v = 0; v < nV; v++) sizeField[v] = field.valueAt(mesh.coords[3 * v], mesh.coords[3 * v + 1], mesh.coords[3 * v + 2]);
  const vtu = writeVtu(mesh, { order, sizeField, pointData: [] });
  const vtk = writeVtkLegacy(mesh, { order, sizeField, pointData: [] });
  const twmesh = encodeMeshBinary(mesh);
  const q = qualityReport(mesh, []);
  const summary = meshSummary(q);
  const csv = csvText({ fields: ['level', 'tets'], data: q.levels.map((n, k) => [k, n]) });
  return {
    summary,
    computeSeconds: (performance.now() - t0) / 1000,
    files: [
      { name: 'mesh.vtu', bytes: vtu },
      { name: 'mesh.vtk', bytes: vtk },
      { name: 'mesh.twmesh', bytes: twmesh },
      { name: 'results.json', bytes: jsonFile(summary) },
      { name: 'results.csv', bytes: utf8(`${csv}\n`) },
    ],
  };
}

function runCoulomb(design: Design, order: 1 | 2, adaptive: boolean, hooks: PipelineHooks): PipelineOutput {
  const t0 = performance.now();
  const result = solveCoulomb(design, {
    order,
    adaptive,
    pairs: 'auto',
    signal: hooks.signal,
    onProgress: (p) => hooks.onProgress?.({ phase: p.stage, fraction: Math.min(0.95, p.fraction) }),
  });
  checkAbort(hooks.signal);
  if (result.mode === 'adaptive' && !result.meetsTarget) {
    // the CLI prints no numbers then (exit code 3): neither do we
    throw new JobRefusal(`no result: ${result.notes[0] ?? 'the adaptive refinement did not reach the target'}`);
  }
  const json = toCoulombJson(result);
  const { seconds: _seconds, ...summary } = json;
  const csv = csvText({
    fields: ['quantity', 'site', 'other_site', 'distance_nm', 'value_ev', 'error_ev'],
    data: [
      ...json.sites.map((s) => ['U', s.id, '', '', s.uEv, s.uErrorEv]),
      ...json.pairs.map((p) => ['V', p.a, p.b, p.distanceNm, p.vEv, p.vErrorEv]),
    ],
  });
  const out = resultsOutput(summary, json, csv, t0);
  out.files.unshift(...potentialFiles(design, order, hooks));
  return out;
}

/**
 * For the mesh viewer after a solve: the design's own graded mesh (the finest level of the graded solve) as
 * mesh.twmesh and the potential at its vertices as potential.f64 (Float64, little-endian, one per vertex, volts):
 * the sum over the sites of the potential of each site's density taken as a charge of +e (COULOMB_EV_NM·φ_i, CODATA
 * e²/(4πε₀) in eV·nm; geometry/units.ts). One more solve on that mesh; the summary and results files do not change.
 */
function potentialFiles(design: Design, order: 1 | 2, hooks: PipelineHooks): PipelineFile[] {
  hooks.onProgress?.({ phase: 'potential', fraction: 0.96 });
  const mesh = meshDesign(design, { order }).mesh;
  checkAbort(hooks.signal);
  const sol = solveSitePotentials(design, mesh, order, { signal: hooks.signal });
  const nV = mesh.coords.length / 3;
  const total = new Float64Array(nV);
  for (const phi of sol.potentials) for (let v = 0; v < nV; v++) total[v] += COULOMB_EV_NM * phi[v];
  const bytes = new Uint8Array(8 * nV);
  const view = new DataView(bytes.buffer);
  for (let v = 0; v < nV; v++) view.setFloat64(8 * v, total[v], true);
  return [
    { name: 'mesh.twmesh', bytes: encodeMeshBinary(mesh) },
    { name: 'potential.f64', bytes },
  ];
}

function runConvergence(design: Design, order: 1 | 2, sweep: 'refinement' | 'box', hooks: PipelineHooks): PipelineOutput {
  const t0 = performance.now();
  const result = runConvergenceSweep(design, {
    kind: sweep,
    order,
    signal: hooks.signal,
    onProgress: (p) => hooks.onProgress?.({ phase: p.stage, fraction: Math.min(0.95, p.fraction) }),
  });
  checkAbort(hooks.signal);
  const json = toConvergenceJson(result);
  const { seconds: _seconds, ...summary } = json;
  let csv: string;
  if (result.kind === 'refinement') {
    const rows = result.rows as RefinementRow[];
    csv = csvText({
      fields: ['level', 'bisections', 'tetrahedra', 'unknowns', 'pcg_iterations', ...result.siteIds.map((id) => `u_${id}_ev`), 'delta_ev'],
      data: rows.map((r) => [r.level, r.bisections, r.elements, r.dofs, r.iterations, ...r.uEv, r.deltaEv ?? '']),
    });
  } else {
    const rows = result.rows as BoxRow[];
    csv = csvText({
      fields: ['boundary', 'half_width_nm', 'unknowns', ...result.siteIds.flatMap((id) => [`u_${id}_ev`, `u_${id}_error_ev`, `u_${id}_boundary_bound_ev`])],
      data: rows.map((r) => [r.boundary, r.halfWidthNm, r.dofs, ...r.uEv.flatMap((u, k) => [u, r.uErrorEv[k], r.boundaryBoundEv[k]])]),
    });
  }
  return resultsOutput(summary, json, csv, t0);
}

export function runPipeline(kind: JobKind, design: Design, options: JobOptions, hooks: PipelineHooks = {}): PipelineOutput {
  const order = options.order ?? design.refinement.order;
  try {
    if (kind === 'mesh') return runMesh(design, order, hooks);
    if (kind === 'coulomb') return runCoulomb(design, order, options.adaptive ?? false, hooks);
    return runConvergence(design, order, options.sweep ?? 'refinement', hooks);
  } catch (e) {
    if (e instanceof MeshError || e instanceof CoulombError) {
      if (hooks.signal?.aborted) throw new DOMException('The job was cancelled.', 'AbortError');
      throw new JobRefusal(e.message);
    }
    throw e;
  }
}

/** A solve's or sweep's output: the CLI's --json summary (timings left out) with results.json and results.csv. */
function resultsOutput(summary: Record<string, unknown>, json: unknown, csv: string, t0: number): PipelineOutput {
  return {
    summary,
    computeSeconds: (performance.now() - t0) / 1000,
    files: [
      { name: 'results.json', bytes: jsonFile(json) },
      { name: 'results.csv', bytes: utf8(`${csv}\n`) },
    ],
  };
}
