/**
 * The job side of the pipeline: what a job of each kind computes, and the files and summary it
 * leaves. The computing is geometry/pipeline's, the same functions the command line calls with the
 * same options, so a revision's mesh.vtu is byte for byte the file `npm run cli -- mesh <doc> --out
 * x.vtu --order N` writes, and its results.json is what `npm run cli -- coulomb <doc> --order N
 * --json` prints. This file only packs files (papaparse for the CSV) and maps refusals.
 *
 * Runs inside a worker thread (server/jobs/task.worker.ts). Refusals of the numerical core
 * (CoreError) come back as `JobRefusal` in the words of server/coreErrors.ts; a cancel is an
 * AbortError; anything else is a fault (retried by the queue).
 */
import Papa from 'papaparse';
import type { JobKind, JobOptions, JobProgress } from '@contracts/api';
import type { Design } from '../../geometry/design/types';
import { asRefusal, describeRefusal, isCoreAbort } from '../coreErrors';
import { buildMeshArtifact, encodeMesh, coulombResults, convergenceResults, type ResultTable, type CoreProgress } from '../../geometry/pipeline/index';
import { meshDesign } from '../../geometry/mesh/index';
import { encodeMeshBinary } from '../../geometry/mesh/export/index';
import { solveSitePotentials } from '../../geometry/fem/index';
import { COULOMB_EV_NM } from '../../geometry/units';

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
const csvFile = (table: ResultTable): Uint8Array => utf8(`${Papa.unparse({ fields: table.fields, data: table.rows }, { newline: '\n' })}\n`);
/** the CLI prints with console.log: the JSON text and a newline */
const jsonFile = (value: unknown): Uint8Array => utf8(`${JSON.stringify(value, null, 2)}\n`);

function checkAbort(signal?: AbortSignal): void {
  if (signal?.aborted) throw new DOMException('The job was cancelled.', 'AbortError');
}

/** The core's progress as the job stores it: a fraction below 1 until the files are stored. */
function jobProgress(hooks: PipelineHooks, scale: (f: number) => number) {
  return (p: CoreProgress) => hooks.onProgress?.({ ...p, fraction: Math.min(0.95, scale(p.fraction)) });
}

function runMesh(design: Design, order: 1 | 2, hooks: PipelineHooks): PipelineOutput {
  const t0 = performance.now();
  const artifact = buildMeshArtifact(design, { order, signal: hooks.signal, onProgress: jobProgress(hooks, (f) => 0.05 + 0.5 * f) });
  checkAbort(hooks.signal);
  hooks.onProgress?.({ phase: 'encode', fraction: 0.6 });
  const summary = artifact.summary;
  return {
    summary: { ...summary },
    computeSeconds: (performance.now() - t0) / 1000,
    files: [
      { name: 'mesh.vtu', bytes: encodeMesh(artifact, 'vtu') },
      { name: 'mesh.vtk', bytes: encodeMesh(artifact, 'vtk') },
      { name: 'mesh.twmesh', bytes: encodeMesh(artifact, 'binary') },
      { name: 'results.json', bytes: jsonFile(summary) },
      { name: 'results.csv', bytes: csvFile({ fields: ['level', 'tets'], rows: summary.levels.map((n, k) => [k, n]) }) },
    ],
  };
}

function runCoulomb(design: Design, order: 1 | 2, adaptive: boolean, hooks: PipelineHooks): PipelineOutput {
  const t0 = performance.now();
  const out = coulombResults(design, { order, adaptive, pairs: 'auto', signal: hooks.signal, onProgress: jobProgress(hooks, (f) => 0.9 * f) });
  checkAbort(hooks.signal);
  if (!out.hasNumbers) {
    // the CLI prints no numbers then (exit code 3): neither do we
    throw new JobRefusal(`no result: ${out.result.notes[0] ?? 'the adaptive refinement did not reach the target'}`);
  }
  const { seconds: _seconds, ...summary } = out.json;
  const output = resultsOutput(summary, out.json, out.table, t0);
  output.files.unshift(...potentialFiles(design, order, hooks));
  return output;
}

/**
 * For the mesh viewer after a solve: the design's own graded mesh (the finest level of the graded solve) as
 * mesh.twmesh and the potential at its vertices as potential.f64 (Float64, little-endian, one per vertex, volts):
 * the sum over the sites of the potential of each site's density taken as a charge of +e (COULOMB_EV_NM·φ_i, CODATA
 * e²/(4πε₀) in eV·nm; geometry/units.ts). One more solve on that mesh; the summary and results files do not change.
 */
function potentialFiles(design: Design, order: 1 | 2, hooks: PipelineHooks): PipelineFile[] {
  // the extra solve below takes the last stretch of the bar; the bar stays under 0.95 until the files are stored
  hooks.onProgress?.({ phase: 'potential', fraction: 0.92 });
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
  const out = convergenceResults(design, { kind: sweep, order, signal: hooks.signal, onProgress: jobProgress(hooks, (f) => f) });
  checkAbort(hooks.signal);
  const { seconds: _seconds, ...summary } = out.json;
  return resultsOutput(summary, out.json, out.table, t0);
}

export function runPipeline(kind: JobKind, design: Design, options: JobOptions, hooks: PipelineHooks = {}): PipelineOutput {
  const order = options.order ?? design.refinement.order;
  try {
    if (kind === 'mesh') return runMesh(design, order, hooks);
    if (kind === 'coulomb') return runCoulomb(design, order, options.adaptive ?? false, hooks);
    return runConvergence(design, order, options.sweep ?? 'refinement', hooks);
  } catch (e) {
    if (isCoreAbort(e) || (hooks.signal?.aborted && asRefusal(e))) throw new DOMException('The job was cancelled.', 'AbortError');
    const refusal = asRefusal(e);
    if (refusal) throw new JobRefusal(describeRefusal(refusal));
    throw e;
  }
}

/** A solve's or sweep's output: the CLI's --json summary (timings left out) with results.json and results.csv. */
function resultsOutput(summary: Record<string, unknown>, json: unknown, table: ResultTable, t0: number): PipelineOutput {
  return {
    summary,
    computeSeconds: (performance.now() - t0) / 1000,
    files: [
      { name: 'results.json', bytes: jsonFile(json) },
      { name: 'results.csv', bytes: csvFile(table) },
    ],
  };
}
