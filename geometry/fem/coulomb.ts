/**
 * The Coulomb problem of a design: on-site U_i and inter-site V_ij with labelled error bars.
 *
 * For every site i with electrons (its unit density ρ_i from the orbital model) we solve
 *
 *     −∇·(εr ∇φ_i) = 4π ρ_i  in the domain,   φ_i = boundary values (boundary.ts) on it,
 *
 * and, in the convention of geometry/units.ts,
 *
 *     U_i  = COULOMB_EV_NM · ∫ ρ_i φ_i
 *     V_ij = COULOMB_EV_NM · ½ (∫ ρ_j φ_i + ∫ ρ_i φ_j)
 *
 * (with a grounded box the two halves of V agree to solver tolerance, the discrete Green's
 * operator being symmetric; with multipole boundaries each carries its own boundary error and
 * the mean is the better value). All integrals are load·φ: ∫ρ_j φ_h = Σ_k f_j[k] φ_h[k].
 *
 * The pieces, one job per file:
 *   coulomb-types.ts    options, results, CoulombError, the assumptions
 *   coulomb-plan.ts     sites, pairs, far-field bounds, irreducible error, the graded mesh family
 *   coulomb-level.ts    one mesh: space, stiffness, preconditioner, loads, boundary values, PCG
 *   coulomb-budget.ts   error budgets from the values on nested meshes
 *   coulomb-drivers.ts  the graded and the adaptive drivers
 *   errorbars.ts        the discretisation error rule (Richardson + Roache's GCI), stated once
 *
 * Error bar of each number: discretisation (errorbars.ts, on the nested meshes of the driver) +
 * the boundary bound of the far-field check (geometry/farfield, maximum principle) + the density
 * cut by the box (coulomb-budget.ts). The reported value is that of the finest mesh.
 */
import type { Design } from '../design/types';
import { COULOMB_EV_NM } from '../units';
import type { CoreProgress } from '../progress';
import { MeshError } from '../mesh/index';
import type { TetMesh } from '../mesh/types';
import { COULOMB_ASSUMPTIONS, type CoulombOptions, type CoulombResult } from './coulomb-types';
import { solveLevel } from './coulomb-level';
import { activeSites, plan } from './coulomb-plan';
import { runGraded, runAdaptiveDriver } from './coulomb-drivers';

export { CoulombError, COULOMB_ASSUMPTIONS } from './coulomb-types';
export type { CoulombOptions, CoulombResult, ErrorBudget, SiteEnergy, PairEnergy, LevelSummary, Progress } from './coulomb-types';
export { CHARGE_TOLERANCE, type LevelSolution } from './coulomb-level';
export { gradedFamily, irreducibleRelError } from './coulomb-plan';
export { richardson, observedRate, GCI_SAFETY_OBSERVED, GCI_SAFETY_THEORETICAL, type RichardsonResult } from './errorbars';

/**
 * U_i and V_ij of a design with error bars: the graded mode (default) or the adaptive mode
 * (opts.adaptive), see coulomb-drivers.ts.
 */
export function solveCoulomb(design: Design, opts: CoulombOptions = {}): CoulombResult {
  const t0 = performance.now();
  const order = opts.order ?? design.refinement.order;
  const pl = plan(design, opts);
  const tol = design.refinement.targetRelError;
  const report = (p: CoreProgress): void => opts.onProgress?.({ ...p, fraction: Math.min(1, Math.max(0, p.fraction)) });
  const mode: CoulombResult['mode'] = opts.adaptive ? 'adaptive' : 'graded';
  const out = opts.adaptive ? runAdaptiveDriver(design, pl, order, opts, report) : runGraded(design, pl, order, opts, report);
  const { sites, pairs, finest: sol, finestMesh: mesh, history: h } = out;
  const notes = [...out.notes];
  sites.forEach((s, k) => (s.charge = sol.charges[k]));
  notes.push(...sol.notes);
  for (const s of sites) {
    if (s.budget.rateSource === 'theoretical' && h.s.length >= 3) {
      notes.push(`U of ${s.id}: the observed convergence rate was not reliable, so the theoretical rate was used for its error estimate.`);
    }
  }
  const skipped = design.sites.filter((s) => !(s.electrons > 0)).map((s) => s.id);
  if (skipped.length > 0 && !opts.siteIds) notes.push(`Sites without electrons have no density and are left out: ${skipped.join(', ')}.`);
  report({ phase: 'done', fraction: 1 });
  return {
    order,
    elements: mesh.tets.length / 4,
    dofs: sol.space.nDofs,
    iterations: sol.iterations,
    sites,
    pairs,
    seconds: (performance.now() - t0) / 1000,
    meetsTarget: out.meets,
    estimatedRelError: out.rel,
    targetRelError: tol,
    mode,
    method: pl.method,
    levels: h.levels,
    notes,
    assumptions: COULOMB_ASSUMPTIONS,
  };
}

/**
 * U of every site with electrons on one given mesh (eV), for convergence sweeps that build their own meshes.
 */
export function energiesOnMesh(
  design: Design,
  mesh: TetMesh,
  order: 1 | 2,
  opts: Pick<CoulombOptions, 'solverTol' | 'signal' | 'onProgress' | 'siteIds'> = {},
): { siteIds: string[]; uEv: number[]; dofs: number; elements: number; iterations: number; charges: number[] } {
  const sites = activeSites(design, opts.siteIds);
  const sol = solveLevel(design, mesh, order, sites, new Int32Array(0), opts, (phase, site, f) => opts.onProgress?.({ phase, site, fraction: f }));
  return {
    siteIds: sites.map((s) => s.id),
    uEv: Array.from(sol.self, (x) => x * COULOMB_EV_NM),
    dofs: sol.space.nDofs,
    elements: mesh.tets.length / 4,
    iterations: sol.iterations,
    charges: sol.charges,
  };
}

/**
 * Nodal potentials of every site with electrons on a given mesh (for writing into a .vtu):
 * one Float64Array per site holding φ_i at the mesh vertices (nm⁻¹, εr included; multiply by
 * COULOMB_EV_NM for volts per elementary charge… i.e. eV per unit test charge).
 * `nodal` holds every degree of freedom of the space instead: the vertices, then for P2 the edge
 * midpoints in the numbering of geometry/mesh/p2.ts, which is the node order of a quadratic .vtu.
 */
export function solveSitePotentials(
  design: Design,
  mesh: TetMesh,
  order: 1 | 2 = design.refinement.order,
  opts: Pick<CoulombOptions, 'solverTol' | 'signal' | 'onProgress' | 'siteIds'> = {},
): { siteIds: string[]; potentials: Float64Array[]; nodal: Float64Array[]; dofs: number; iterations: number } {
  const sites = activeSites(design, opts.siteIds);
  const nV = mesh.coords.length / 3;
  const sol = solveLevel(design, mesh, order, sites, new Int32Array(0), opts, (phase, site, f) => opts.onProgress?.({ phase, site, fraction: f }));
  return {
    siteIds: sites.map((s) => s.id),
    potentials: sol.phis.map((p) => p.slice(0, nV)),
    nodal: sol.phis.map((p) => p.slice(0, sol.space.nDofs)),
    dofs: sol.space.nDofs,
    iterations: sol.iterations,
  };
}

export { MeshError };
