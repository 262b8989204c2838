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
import { jacobi, type Preconditioner } from './pcg';
import { blockPcg, BLOCK_WIDTH } from './block-pcg';
import type { Csr } from './csr';
import { densityLoad } from './load';
import { boundaryValues, layeredBoundaryValues } from './boundary';
import { hasDevice, NO_ELECTRODE } from '../mesh/device';
import { deviceMesh, deviceStack, epsByRegion, epsilonAt } from './device';
import { electrodeDofs } from './electrodes';
import { freeSelfEnergy, pairClosedForm, reactionRhsBatch, singularPotential } from './split';
import { locatePoints, valuesAtPoints } from './locate';
import { meanValueSites } from './mean-value';
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
  /** 1 where U_i used a centre value (mean-value.ts): its error converges at the point-value rate */
  pointSelf: Uint8Array;
  /** 1 where V of a pair used a centre value for either cross term */
  pointPair: Uint8Array;
  /** the lifted stiffness matrix (for indicators and reuse) */
  A: Csr;
  /** warnings about this mesh's solution (e.g. a discrete charge off the charge in the box) */
  notes: string[];
}

/**
 * PCG relative residual of the split's remainders (default; the full solve keeps 1e-10). The
 * remainder is a small, smooth part of each potential and the residual is relative to a
 * right-hand side dominated by the wall values, so the algebraic error stays far below any
 * discretisation bar. Rule (common practice): the algebraic error may take at most 1e-4 of each
 * bar (tests/geometry/fem/mean-value.test.ts checks it against PCG to 1e-10). Measured on the
 * bench's 3×3 array under oxide with two gates (issue 11, "Speed"): against PCG to 1e-10, U and V
 * moved by at most 1.5e-8 of their bars at 1e-8, 3.1e-6 at 1e-6 (the default since), 7.8e-5 at
 * 1e-5; iterations per level 14/13 → 10/9, CPU −18 %. (At 1e-8 earlier, on the 4×4 array: U moved
 * by 2e-12 eV against a bar of 1e-4 eV, 27 % less CPU than 1e-10.)
 */
export const SPLIT_SOLVER_TOL = 1e-6;

/** Sites solved together by block PCG (block-pcg.ts); bounds the memory to this many extra vectors. */
export const SOLVE_BLOCK = BLOCK_WIDTH;

/** Sites per pass of the batched reaction right-hand side (bounds its memory to this many vectors). */
export const REACTION_BATCH = 16;

/** The discrete charge must match the charge inside the box to this (absolute; issue 5). */
export const CHARGE_TOLERANCE = 1e-6;

/** How a level computes each site: the full solve, or closed form + smooth remainder (split.ts). */
export type SolveMethod = 'full' | 'split';

/**
 * Solve every active site's potential on one mesh and form the energies (in nm⁻¹; multiply by
 * COULOMB_EV_NM for eV). With layers or electrodes the mesh must conform (device.ts; refused
 * otherwise), εr is per region, electrode dofs are Dirichlet 0 and a multipole box takes the
 * layered far field (boundary.ts layeredBoundaryValues). With method 'split' `phis` hold the
 * remainders φ_r and `self`/`pair` the closed forms plus the remainders (split.ts).
 */
export function solveLevel(
  design: Design,
  meshIn: TetMesh,
  order: 1 | 2,
  sites: ActiveSite[],
  pairIdx: Int32Array,
  opts: CoulombOptions,
  report: LevelReport,
  method: SolveMethod = 'full',
  previous: LevelSolution | null = null,
): LevelSolution {
  const device = hasDevice(design);
  const mesh = device ? deviceMesh(design, meshIn) : meshIn;
  const space0 = buildSpace(mesh, order);
  // Dirichlet dofs: the walls, and with electrodes every dof in or on one (at 0 V here)
  const elec = device ? electrodeDofs(space0, design).electrodeOfDof : null;
  let space = space0;
  if (elec) {
    const mask = Uint8Array.from(space0.boundaryDof);
    for (let k = 0; k < mask.length; k++) if (elec[k] !== NO_ELECTRODE) mask[k] = 1;
    space = { ...space0, boundaryDof: mask };
  }
  const eps = epsByRegion(design);
  const K = assembleStiffness(space, eps);
  const n = space.nDofs;
  const phis: Float64Array[] = [];
  const loads: Float64Array[] = [];
  const charges: number[] = [];
  const notes: string[] = [];
  const closedSelf = new Float64Array(sites.length);
  const epsSite = sites.map((st) => epsilonAt(design, st.position[2]));
  const layeredWalls = device && design.domain.boundary.kind === 'multipole';
  const stack = layeredWalls ? deviceStack(design) : null;
  let A: Csr | null = null;
  let M: Preconditioner | null = null;
  let iterations = 0;
  const ns = sites.length;
  // The split's remainder φ_r,i is harmonic wherever ε = ε_i: site j reads it at its centre when
  // its harmonic ball lies in a layer of that permittivity and holds all but a negligible tail of
  // ρ_j (mean-value.ts); otherwise ∫ρ_j φ_r,i goes through ρ_j's density load.
  const mv = method === 'split' ? meanValueSites(design, sites) : null;
  const atCentre = (i: number, j: number): boolean => mv !== null && mv.ok[j] === 1 && epsSite[j] === epsSite[i];
  const needsLoad = new Uint8Array(ns);
  for (let j = 0; j < ns; j++) for (let i = 0; i < ns && !needsLoad[j]; i++) if (!atCentre(i, j)) needsLoad[j] = 1;
  // initial guesses: the previous (coarser) level's potential of the same site, interpolated at this
  // mesh's dofs (locate.ts); the meshes of a family cover the same domain. Only the start of PCG
  // changes: it stops at the same relative residual.
  const guessAt = previous && previous.phis.length === ns ? locatePoints(previous.space.mesh, space.dofCoords) : null;
  // the reaction right-hand sides of the split, a batch of sites per pass over the elements
  let rhsBatch: Float64Array[] = [];
  let batchStart = 0;
  let pendingRhs: Float64Array[] = [];
  let pendingX0: (Float64Array | null)[] = [];
  for (let s = 0; s < ns; s++) {
    const site = sites[s];
    throwIfAborted(opts.signal);
    // progress: a block's share of the sites, a tenth for its loads and nine tenths for its solve
    const blockFirst = s - (s % SOLVE_BLOCK);
    const blockWidth = Math.min(SOLVE_BLOCK, ns - blockFirst);
    report('load', site.id, (blockFirst + 0.1 * (s - blockFirst)) / ns);
    if (method === 'split' && device && s >= batchStart + rhsBatch.length) {
      batchStart = s;
      const end = Math.min(ns, s + REACTION_BATCH);
      rhsBatch = reactionRhsBatch(space, mesh, eps, sites.slice(s, end).map((st, k) => ({ orbital: st.orbital, center: st.position, epsSite: epsSite[s + k] })));
    }
    const inside = 1 - chargeOutsideBox(site.orbital, site.position, design.domain.center, design.domain.halfExtentsNm);
    const L = needsLoad[s] ? densityLoad(space, site.orbital, site.position, opts.load) : { load: new Float64Array(0), charge: inside };
    if (!(Math.abs(L.charge - inside) <= CHARGE_TOLERANCE)) {
      notes.push(
        `Site ${site.id}: the discrete charge ${L.charge.toFixed(9)} differs from the charge inside the box ${inside.toFixed(9)} by ${Math.abs(L.charge - inside).toExponential(2)} (more than ${CHARGE_TOLERANCE}): the density is under-resolved by the quadrature, so U and V carry an extra error of about that relative size.`,
      );
    }
    // wall values of the whole potential: the homogeneous multipole, or the layered far field
    let g: Float64Array;
    if (stack) {
      const walls = Uint8Array.from(space0.boundaryDof);
      if (elec) for (let k = 0; k < walls.length; k++) if (elec[k] !== NO_ELECTRODE) walls[k] = 0;
      const lb = layeredBoundaryValues(stack, site.position, space.dofCoords, walls, { orbital: site.orbital, boundary: design.domain.boundary });
      if (lb.g === null) {
        throw new CoulombError('no-layered-far-field', `the layered host has no far-field series for site ${site.id} (${lb.code}): use a grounded box`, { siteId: site.id, code: lb.code });
      }
      g = lb.g;
    } else {
      g = boundaryValues(design.domain.boundary, site.orbital, site.position, design.host.epsilonR, space.dofCoords, space0.boundaryDof);
    }
    let b: Float64Array;
    if (method === 'split') {
      // remainder: wall values g − φ_s, electrode values −φ_s (elec dofs have g = 0), rhs where ε ≠ ε_i
      const mask = space.boundaryDof;
      for (let k = 0; k < n; k++) {
        if (!mask[k]) continue;
        g[k] -= singularPotential(site.orbital, site.position, epsSite[s], space.dofCoords[3 * k], space.dofCoords[3 * k + 1], space.dofCoords[3 * k + 2]);
      }
      b = device ? rhsBatch[s - batchStart] : new Float64Array(n);
      closedSelf[s] = freeSelfEnergy(site.orbital) / epsSite[s];
    } else {
      b = new Float64Array(n);
      for (let k = 0; k < n; k++) b[k] = 4 * Math.PI * L.load[k];
    }
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
    let x0: Float64Array | null = null;
    if (guessAt) {
      x0 = valuesAtPoints(previous!.space, guessAt, previous!.phis[s]);
      for (let k = 0; k < n; k++) if (space.boundaryDof[k] || !Number.isFinite(x0[k])) x0[k] = space.boundaryDof[k] ? g[k] : 0;
    }
    pendingRhs.push(rhs);
    pendingX0.push(x0);
    loads.push(L.load);
    charges.push(L.charge);
    // a block of right-hand sides is solved together (block-pcg.ts: the same numbers as one by one)
    if (pendingRhs.length === SOLVE_BLOCK || s === ns - 1) {
      const width = pendingRhs.length;
      const first = s + 1 - width;
      const ids = `${sites[first].id}…${site.id}`;
      const results = blockPcg(A!, pendingRhs, pendingX0, {
        preconditioner: M!,
        tol: opts.solverTol ?? (method === 'split' ? SPLIT_SOLVER_TOL : 1e-10),
        maxIter: 5000,
        signal: opts.signal,
        stage: `solve ${ids}`,
        onProgress: (_stage, f) => report('solve', site.id, (blockFirst + blockWidth * (0.1 + 0.9 * f)) / ns),
      });
      results.forEach((res, c) => {
        const id = sites[first + c].id;
        if (!res.converged) {
          throw new CoulombError('solver-failed', `the solver did not reach its tolerance for site ${id} (relative residual ${res.relResidual.toExponential(2)} after ${res.iterations} iterations)`, {
            siteId: id,
            relResidual: res.relResidual,
            iterations: res.iterations,
          });
        }
        iterations = Math.max(iterations, res.iterations);
        phis.push(res.x);
      });
      pendingRhs = [];
      pendingX0 = [];
    }
  }
  // ∫ρ_j φ_i: the load dot the potential, or the remainder at site j's centre (located once)
  let centre: Float64Array[] = [];
  if (mv && mv.ok.some((x) => x === 1)) {
    const pts = new Float64Array(3 * ns);
    sites.forEach((st, k) => pts.set(st.position, 3 * k));
    const located = locatePoints(space.mesh, pts);
    centre = phis.map((phi) => valuesAtPoints(space, located, phi));
  }
  const cross = (i: number, j: number): number => (atCentre(i, j) ? centre[i][j] : dotv(loads[j], phis[i]));
  const self = new Float64Array(ns);
  const pointSelf = new Uint8Array(ns);
  for (let s = 0; s < ns; s++) {
    self[s] = closedSelf[s] + cross(s, s);
    pointSelf[s] = atCentre(s, s) ? 1 : 0;
  }
  const np = pairIdx.length / 2;
  const pair = new Float64Array(np);
  const pointPair = new Uint8Array(np);
  for (let p = 0; p < np; p++) {
    const i = pairIdx[2 * p], j = pairIdx[2 * p + 1];
    pointPair[p] = atCentre(i, j) || atCentre(j, i) ? 1 : 0;
    let closed = 0;
    if (method === 'split') {
      const a = sites[i].position, c = sites[j].position;
      const P = pairClosedForm(sites[i].orbital, sites[j].orbital, Math.hypot(a[0] - c[0], a[1] - c[1], a[2] - c[2]));
      if (P === null) throw new CoulombError('split-unavailable', `no closed-form interaction for the pair ${sites[i].id}–${sites[j].id}`, { a: sites[i].id, b: sites[j].id });
      closed = 0.5 * (P / epsSite[i] + P / epsSite[j]);
    }
    pair[p] = closed + 0.5 * (cross(i, j) + cross(j, i));
  }
  return { space, phis, loads, charges, self, pair, pointSelf, pointPair, iterations, A: A ?? K, notes };
}

export function dotv(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let k = 0; k < a.length; k++) s += a[k] * b[k];
  return s;
}

