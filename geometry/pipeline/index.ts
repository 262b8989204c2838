/**
 * Public API of the pipeline (geometry/pipeline): design → size field → mesh → (solve) → encode,
 * as plain functions that return data. The command line (server/cli/) and the job worker
 * (server/jobs/pipeline.ts) are two thin callers of these, so a revision holds exactly what the
 * CLI prints and writes.
 *
 *   buildMeshArtifact(design, { order, solve }) → MeshArtifact   mesh, size field, quality, summary
 *   encodeMesh(artifact, 'vtu' | 'vtk' | 'binary') → Uint8Array  deterministic bytes
 *   coulombResults(design, options)             → { result, hasNumbers, json, table }
 *   convergenceResults(design, options)         → { result, json, table }
 *
 * Progress is data (geometry/progress.ts); refusals are CoreError (geometry/errors.ts).
 */
export { buildMeshArtifact, encodeMesh, sitesOutsideDomain } from './mesh';
export type { MeshArtifact, MeshArtifactOptions, MeshFormat, MeshSummary } from './mesh';
export { coulombResults, convergenceResults, coulombJson, convergenceJson } from './results';
export type { CoulombResults, ConvergenceResults, CoulombJson, ConvergenceJson, ResultTable } from './results';
export type { CoreProgress, CorePhase } from '../progress';
export { CoreError, CoreAbortError } from '../errors';
export type { CoreErrorCode, CoreErrorDetails } from '../errors';
