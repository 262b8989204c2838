/**
 * Public API of the finite-element core (geometry/fem).
 *
 *   const space = buildSpace(mesh, 2);                       // P1 or P2 dofs on a TetMesh
 *   const { A, b } = assembleSystem(space, eps, { load });   // ∫ε∇φi·∇φj and ∫f φi, one pass
 *   const sys = applyDirichlet(A, b, space.boundaryDof, g);  // symmetric lifting
 *   const M = multigridPreconditioner(space, sys.A, { epsByRegion: eps });  // or jacobi(sys.A)
 *   const { x, iterations } = pcg(sys.A, sys.b, g, { preconditioner: M, tol: 1e-10, onProgress, signal });
 *
 * Starting PCG from x0 = g keeps the boundary values bit-exact (their rows are identity rows).
 * multigridPreconditioner needs the bisection hierarchy of the mesh (parents, vertexLevel,
 * tetLevel from geometry/mesh) and throws HierarchyError when it is inconsistent; jacobi works on
 * any mesh. Build the preconditioner once per matrix and reuse it for every right-hand side.
 *
 * Units are those of geometry/units.ts. Everything is deterministic and uses flat typed arrays.
 * Other modules of this folder append their exports below the solver core's.
 */
export type { FeSpace } from './space';
export { buildSpace } from './space';
export type { Csr } from './csr';
export { spmv } from './csr';
export type { PreparedSpmv } from './spmv-wasm';
export { prepareSpmv, wasmSpmvAvailable, releaseSpmvMemory, spmvArenaBytes, SPMV_KEEP_BYTES } from './spmv-wasm';
export type { PointFunction, SystemOptions } from './assemble';
export {
  assembleStiffness, assembleSystem, assembleLoad, assembleMass, applyDirichlet, applyDirichletRhs, integrate, feIntegrate,
  interpolate,
} from './assemble';
export type { Preconditioner, PcgOptions, PcgResult } from './pcg';
export { pcg, jacobi } from './pcg';
export type { MultigridOptions, MultigridStats } from './multigrid';
export { multigridPreconditioner, HierarchyError } from './multigrid';
export type { TetRule } from './reference';
export {
  tetQuadrature, conicalRule, grundmannMollerRule, p1Basis, p2Basis, p2RefGradients, tetGeometry, GEOM_SIZE, P2_REF_NODES,
} from './reference';

// The Coulomb problem layer: densities, boundary values, U and V with error bars, adaptivity,
// convergence sweeps. Worker threads are the server's (server/workers/coulombPool.ts): geometry/ runs in the browser too.
export { densityLoad } from './load';
export type { DensityLoad, DensityLoadOptions } from './load';
export { boundaryValues } from './boundary';
export { solveCoulomb, solveSitePotentials, energiesOnMesh, CoulombError, COULOMB_ASSUMPTIONS } from './coulomb';
export { richardson, observedRate } from './errorbars';
export type { RichardsonResult } from './errorbars';
export type { CoulombOptions, CoulombResult, SiteEnergy, PairEnergy, ErrorBudget } from './coulomb';
export { residualIndicator, dorflerMark } from './adaptive';
export { runConvergence, fitLogLog } from './convergence';
export type { ConvergenceOptions, ConvergenceResult, ConvergencePlot, RefinementRow, BoxRow } from './convergence';

// Layers and electrodes (issue 11): εr per region, the electrodes' Dirichlet dofs, gate lever arms.
export { epsByRegion, METAL_EPSILON } from './device';
export { electrodeDofs, electrodeValues } from './electrodes';
export type { ElectrodeDofs } from './electrodes';
export { solveLeverArms, leverArmsOnMesh, leverFamily, leverSites, LEVER_ARM_ASSUMPTIONS } from './lever';
export type { LeverArm, LeverArmOptions, LeverArmResult, LeverSiteEnergy, LeverLevel, LeverOnMesh } from './lever';
