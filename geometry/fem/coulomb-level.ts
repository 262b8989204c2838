/**
 * One level of the Coulomb problem: every active site's potential on one mesh and the energies
 * ∫ρ_i φ_i, ½(∫ρ_j φ_i + ∫ρ_i φ_j) in nm⁻¹ (× COULOMB_EV_NM for eV).
 *
 * Pipeline on one mesh:  space → stiffness (εr per region) → one multigrid preconditioner →
 * per site: load (load.ts), boundary values (boundary.ts), symmetric lifting, PCG → energies.
 */
import type { Design, Orbital, Vec3 } from '../design/types';
import { throwIfAborted } from '../errors';
import { chargeOutsideBox } from '../density';
import type { TetMesh } from '../mesh/types';
import { buildSpace, type FeSpace } from './space';
import { assembleStiffness, applyDirichlet, applyDirichletRhs } from './assemble';
import { multigridPreconditioner } from './multigrid';
import { pcg, jacobi, type Preconditioner } from './pcg';
import type { Csr } from './csr';
import { densityLoad } from './load';
import { boundaryValues } from './boundary';
import { CoulombError, type CoulombOptions, type LevelReport } from './coulomb-types';

export interface ActiveSite {
  index: number;
  id: string;
  orbital: Orbital;
  position: Vec3;
}

export interface LevelSolution {
  space: FeSpace;
  /** nodal potentials φ_i, one per active site (nm⁻¹, εr included) */
  phis: Float64Array[];
  /** loads f_i = ∫ρ_i v_k */
  loads: Float64Array[];
  charges: number[];
  /** ∫ρ_i φ_i (nm⁻¹) */
  self: Float64Array;
  /** ½(∫ρ_j φ_i + ∫ρ_i φ_j) for the requested pairs (nm⁻¹) */
  pair: Float64Array;
  iterations: number;
  /** the lifted stiffness matrix (for indicators and reuse) */
  A: Csr;
  /** warnings about this mesh's solution (e.g. a discrete charge off the charge in the box) */
  notes: string[];
}

/** The discrete charge must match the charge inside the box to this (absolute; issue 5). */
export const CHARGE_TOLERANCE = 1e-6;

export function epsArray(design: Design): Float64Array {
  // homogeneous host now: every region id gets the host's εr (layers would fill this per region)
  return new Float64Array(256).fill(design.host.epsilonR);
}

/**
 * Solve every active site's potential on one mesh and form the energies (in nm⁻¹; multiply by
 * COULOMB_EV_NM for eV).
 */
export function solveLevel(
  design: Design,
  mesh: TetMesh,
  order: 1 | 2,
  sites: ActiveSite[],
  pairIdx: Int32Array,
  opts: CoulombOptions,
  report: LevelReport,
): LevelSolution {
  const space = buildSpace(mesh, order);
  const eps = epsArray(design);
  const K = assembleStiffness(space, eps);
  const n = space.nDofs;
  const phis: Float64Array[] = [];
  const loads: Float64Array[] = [];
  const charges: number[] = [];
  const notes: string[] = [];
  let A: Csr | null = null;
  let M: Preconditioner | null = null;
  let iterations = 0;
  const ns = sites.length;
  for (let s = 0; s < ns; s++) {
    const site = sites[s];
    throwIfAborted(opts.signal);
    report('load', site.id, s / ns);
    const L = densityLoad(space, site.orbital, site.position, opts.load);
    const inside = 1 - chargeOutsideBox(site.orbital, site.position, design.domain.center, design.domain.halfExtentsNm);
    if (!(Math.abs(L.charge - inside) <= CHARGE_TOLERANCE)) {
      notes.push(
        `Site ${site.id}: the discrete charge ${L.charge.toFixed(9)} differs from the charge inside the box ${inside.toFixed(9)} by ${Math.abs(L.charge - inside).toExponential(2)} (more than ${CHARGE_TOLERANCE}): the density is under-resolved by the quadrature, so U and V carry an extra error of about that relative size.`,
      );
    }
    const b = new Float64Array(n);
    for (let k = 0; k < n; k++) b[k] = 4 * Math.PI * L.load[k];
    const g = boundaryValues(design.domain.boundary, site.orbital, site.position, design.host.epsilonR, space.dofCoords, space.boundaryDof);
    // the lifted matrix is the same for every site: lift it once, then only the right-hand side
    let rhs: Float64Array;
    if (!A) {
      const sys = applyDirichlet(K, b, space.boundaryDof, g);
      A = sys.A;
      rhs = sys.b;
      M = opts.preconditioner === 'jacobi' ? jacobi(A) : multigridPreconditioner(space, A, { epsByRegion: eps });
    } else {
      rhs = applyDirichletRhs(K, b, space.boundaryDof, g);
    }
    const res = pcg(A, rhs, null, {
      preconditioner: M!,
      tol: opts.solverTol ?? 1e-10,
      maxIter: 5000,
      signal: opts.signal,
      stage: `solve ${site.id}`,
      onProgress: (_stage, f) => report('solve', site.id, (s + 0.1 + 0.9 * f) / ns),
    });
    if (!res.converged) {
      throw new CoulombError('solver-failed', `the solver did not reach its tolerance for site ${site.id} (relative residual ${res.relResidual.toExponential(2)} after ${res.iterations} iterations)`, {
        siteId: site.id,
        relResidual: res.relResidual,
        iterations: res.iterations,
      });
    }
    iterations = Math.max(iterations, res.iterations);
    phis.push(res.x);
    loads.push(L.load);
    charges.push(L.charge);
  }
  const self = new Float64Array(ns);
  for (let s = 0; s < ns; s++) self[s] = dotv(loads[s], phis[s]);
  const np = pairIdx.length / 2;
  const pair = new Float64Array(np);
  for (let p = 0; p < np; p++) {
    const i = pairIdx[2 * p], j = pairIdx[2 * p + 1];
    pair[p] = 0.5 * (dotv(loads[j], phis[i]) + dotv(loads[i], phis[j]));
  }
  return { space, phis, loads, charges, self, pair, iterations, A: A ?? K, notes };
}

export function dotv(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let k = 0; k < a.length; k++) s += a[k] * b[k];
  return s;
}

