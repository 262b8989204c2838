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
 *   leverArmResults(design, options)            → { result, json, table }   gate lever arms, site energies
 *
 * Progress is data (geometry/progress.ts); refusals are CoreError (geometry/errors.ts).
 */
export { buildMeshArtifact, encodeMesh, sitesOutsideDomain } from './mesh';
export type { MeshArtifact, MeshArtifactOptions, MeshFormat, MeshSummary } from './mesh';
export {
  coulombResults, convergenceResults, coulombJson, convergenceJson, leverArmResults, leverArmsJson, leverJson, leverTable, coulombJsonWithLever,
} from './results';
export type { CoulombResults, ConvergenceResults, CoulombJson, ConvergenceJson, ResultTable, LeverArmResults, LeverArmsJson } from './results';
export { LEVER_ARM_ASSUMPTIONS } from '../fem/lever';
export type { LeverArmResult, LeverArm, LeverSiteEnergy } from '../fem/lever';
export type { CoreProgress, CorePhase } from '../progress';
export { CoreError, CoreAbortError } from '../errors';
export type { CoreErrorCode, CoreErrorDetails } from '../errors';
