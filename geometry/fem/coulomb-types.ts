/**
 * Types of the Coulomb layer (coulomb.ts and its pieces): options, results, the refusal type and
 * the assumptions every readable output repeats.
 */
import type { CoreProgress } from '../progress';
import { CoreError, type CoreErrorDetails } from '../errors';
import type { DensityLoadOptions } from './load';
import type { MeshDesignOptions } from '../mesh/index';

/** A refusal of the Coulomb layer: a CoreError (geometry/errors.ts) with a stable code and details. */
export class CoulombError extends CoreError<'no-electrons' | 'no-sites' | 'unknown-site' | 'site-outside' | 'sites-coincide' | 'not-converged' | 'solver-failed' | 'mesh-not-conforming' | 'split-unavailable' | 'no-layered-far-field'> {
  constructor(code: CoulombError['code'], message: string, details: CoreErrorDetails = {}) {
    super(code, message, details);
    this.name = 'CoulombError';
  }
}

/** Progress as data (phase, level, site, fraction): see geometry/progress.ts. */
export type Progress = CoreProgress;
/** What one level's solve reports: the caller adds the level and rescales the fraction. */
export type LevelReport = (phase: 'load' | 'solve', site: string, fraction: number) => void;

export interface CoulombOptions {
  /** element order (default design.refinement.order) */
  order?: 1 | 2;
  /** adaptive refinement from a coarse graded mesh (default false: a priori graded meshes) */
  adaptive?: boolean;
  /** Dörfler θ for the adaptive mode (default DEFAULT_THETA = 0.7) */
  theta?: number;
  /** adaptive mode: the starting mesh is graded for startFactor × targetRelError (default 4) */
  startFactor?: number;
  /** sites asked for U (ids); default every site with electrons. A site without electrons here is an error. */
  siteIds?: string[];
  /**
   * which pairs get V: 'auto' (default) all pairs up to 64 sites, bond-graph neighbours above
   * (the far-field check's rule); 'all'; 'bond-graph' (nearest-neighbour bonds in the (001)
   * plane, geometry/arrays); or 'none'
   */
  pairs?: 'auto' | 'all' | 'bond-graph' | 'none';
  /** number of nested a priori meshes (h0, 2h0, 4h0, …) for the discretisation estimate (default 3, at least 2) */
  levels?: number;
  /** extra options for the a priori mesh (e.g. h0Factor) */
  mesh?: MeshDesignOptions;
  /**
   * 'split' (closed form in the site's layer + a smooth remainder on coarse meshes, split.ts),
   * 'full' (the whole potential on graded meshes), or 'auto' (default): split when every site has
   * a closed-form potential and every pair a closed-form interaction and the mode is graded, else
   * full. Asking for 'split' where it is unavailable is refused ('split-unavailable').
   */
  method?: 'auto' | 'split' | 'full';
  /** PCG relative residual (default 1e-10; the split's remainders 1e-6, coulomb-level.ts SPLIT_SOLVER_TOL) */
  solverTol?: number;
  preconditioner?: 'multigrid' | 'jacobi';
  /** quadrature options of the density loads (default: load.ts's; for convergence sweeps and tests) */
  load?: DensityLoadOptions;
  onProgress?: (p: Progress) => void;
  signal?: AbortSignal | { readonly aborted: boolean };
}

/** One number with its labelled error budget, all in eV. */
export interface ErrorBudget {
  /** grid-convergence-index bar F_s·|E − E_extrapolated| on the nested meshes */
  discretisationEv: number;
  /** maximum-principle bound of the boundary condition (far-field check) */
  boundaryEv: number;
  /** first-order effect of the density outside the box */
  densityCutEv: number;
  /** rate q used for Richardson (in the mesh-size parameter) and where it came from */
  rate: number;
  rateSource: 'observed' | 'theoretical';
  /** grid-convergence-index safety factor F_s (the rule: errorbars.ts) */
  safetyFactor: number;
  /** Richardson-extrapolated value (eV) */
  extrapolatedEv: number;
}

export interface SiteEnergy {
  id: string;
  /** how this number was computed (split.ts / the full solve) */
  method: 'split' | 'full';
  uEv: number;
  uErrorEv: number;
  budget: ErrorBudget;
  /** discrete charge ∫_Ω ρ_i on the finest mesh */
  charge: number;
}

export interface PairEnergy {
  a: string;
  method: 'split' | 'full';
  b: string;
  distanceNm: number;
  vEv: number;
  vErrorEv: number;
  budget: ErrorBudget;
}

export interface LevelSummary {
  elements: number;
  dofs: number;
  iterations: number;
  /** mesh-size parameter s = N^(−1/3) */
  s: number;
  uEv: number[];
}

export interface CoulombResult {
  order: 1 | 2;
  elements: number;
  dofs: number;
  /** largest PCG iteration count on the finest mesh */
  iterations: number;
  sites: SiteEnergy[];
  pairs: PairEnergy[];
  seconds: number;
  /** the estimated relative error (largest over the numbers) meets design.refinement.targetRelError */
  meetsTarget: boolean;
  estimatedRelError: number;
  targetRelError: number;
  mode: 'graded' | 'adaptive';
  /** the method of every number of this result (split.ts, or the full solve) */
  method: 'split' | 'full';
  levels: LevelSummary[];
  notes: string[];
  assumptions: string[];
}

/** What the readable outputs say about the model (the far-field check's list plus ours). */
export const COULOMB_ASSUMPTIONS = [
  'The host is the design\'s: one relative permittivity, or the planar stack of its layers (one εr per layer, sharp interfaces); electrodes are perfect conductors (a heavily doped lead is modelled as a metal) at 0 V for U and V; no screening by free carriers.',
  'Method "split": the closed-form potential of the density in an infinite host of its own layer plus a finite-element remainder (interfaces, electrodes, box walls); method "full": the whole potential by finite elements. Each number says which.',
  'Each site is a fixed, unit-normalised model density (hydrogenic, anisotropic single-valley or Gaussian envelope); U and V are the classical Coulomb integrals of these densities, without exchange or correlation.',
  'Error bars combine discretisation (Richardson on nested meshes), the boundary bound (maximum principle) and the density cut by the box; they are estimates, not guarantees.',
  'Every site carries a like unit charge: for a boron acceptor (a hole) the sign of V with a donor electron is reversed, and its envelope is the donor one, a placeholder.',
  'All figures are estimates to be confirmed by your group\'s own validated methods before any fabrication or design decision.',
];

