/**
 * The two drivers of solveCoulomb: the graded mode (a fixed family of nested a priori graded
 * meshes) and the adaptive mode (residual-indicator refinement, adaptive.ts). Each solves levels
 * (coulomb-level.ts), keeps the history of values, and forms the error budgets (coulomb-budget.ts).
 */
import type { Design } from '../design/types';
import { COULOMB_EV_NM } from '../units';
import type { CoreProgress } from '../progress';
import { throwIfAborted } from '../errors';
import { densityAt } from '../density';
import { meshDesign, MeshError } from '../mesh/index';
import type { TetMesh } from '../mesh/types';
import { residualIndicator, runAdaptive, DEFAULT_THETA } from './adaptive';
import { CoulombError, type CoulombOptions, type PairEnergy, type SiteEnergy } from './coulomb-types';
import { solveLevel, type LevelSolution } from './coulomb-level';
import { epsByRegion } from './device';
import { gradedFamily, irreducibleRelError, splitFamily, type Plan } from './coulomb-plan';
import { budgetsFrom, type History } from './coulomb-budget';

export interface DriverOutcome {
  sites: SiteEnergy[];
  pairs: PairEnergy[];
  rel: number;
  meets: boolean;
  notes: string[];
  history: History;
  finest: LevelSolution;
  finestMesh: TetMesh;
}

type Report = (p: CoreProgress) => void;

function newHistory(): History {
  return { s: [], self: [], pair: [], levels: [], pointSelf: null, pointPair: null };
}

function record(h: History, sol: LevelSolution, mesh: TetMesh): void {
  const s = Math.pow(sol.space.nDofs, -1 / 3);
  h.s.push(s);
  h.self.push(Array.from(sol.self));
  h.pair.push(Array.from(sol.pair));
  // a number read at a centre on any level converges at the point-value rate (mean-value.ts)
  h.pointSelf = orFlags(h.pointSelf, sol.pointSelf);
  h.pointPair = orFlags(h.pointPair, sol.pointPair);
  h.levels.push({ elements: mesh.tets.length / 4, dofs: sol.space.nDofs, iterations: sol.iterations, s, uEv: Array.from(sol.self, (x) => x * COULOMB_EV_NM) });
}

function orFlags(a: Uint8Array | null, b: Uint8Array): Uint8Array {
  if (!a) return Uint8Array.from(b);
  for (let k = 0; k < a.length; k++) a[k] |= b[k];
  return a;
}

/** Graded mode: `levels` nested a priori meshes (coulomb-plan.ts gradedFamily), the finest reported. */
export function runGraded(design: Design, pl: Plan, order: 1 | 2, opts: CoulombOptions, report: Report): DriverOutcome {
  const tol = design.refinement.targetRelError;
  const h = newHistory();
  const notes: string[] = [];
  const levels = Math.max(2, Math.floor(opts.levels ?? 3));
  report({ phase: 'mesh', fraction: 0 });
  const meshes = pl.method === 'split' ? splitFamily(design, pl.sites, order, levels, opts.mesh ?? {}) : gradedFamily(design, order, levels, opts.mesh ?? {});
  // weights of the levels in the progress bar: proportional to their sizes
  const w = meshes.map((m) => m.tets.length);
  const wSum = w.reduce((a, b) => a + b, 0);
  let done = 0;
  let finest: LevelSolution | null = null;
  for (let l = 0; l < meshes.length; l++) {
    throwIfAborted(opts.signal);
    const sol = solveLevel(design, meshes[l], order, pl.sites, pl.pairIdx, opts, (phase, site, f) =>
      report({ phase, level: l + 1, site, fraction: (done + w[l] * f) / wSum }),
    pl.method, finest);
    record(h, sol, meshes[l]);
    finest = sol;
    done += w[l];
  }
  const b = budgetsFrom(h, pl, order);
  const meets = b.rel <= tol;
  if (!meets) {
    notes.push(
      `The estimated relative error ${b.rel.toExponential(2)} does not meet targetRelError ${tol}: refine (smaller targetRelError drives a finer mesh), use --adaptive, or enlarge the box if the boundary bound dominates.`,
    );
  }
  return { sites: b.sites, pairs: b.pairs, rel: b.rel, meets, notes, history: h, finest: finest!, finestMesh: meshes[meshes.length - 1] };
}

/**
 * Adaptive mode: residual-indicator refinement from a mesh graded for a looser tolerance until the
 * estimated error meets targetRelError or maxElements is spent (then meets = false and a note).
 */
export function runAdaptiveDriver(design: Design, pl: Plan, order: 1 | 2, opts: CoulombOptions, report: Report): DriverOutcome {
  const tol = design.refinement.targetRelError;
  const h = newHistory();
  const notes: string[] = [];
  const theta = opts.theta ?? DEFAULT_THETA;
  // The boundary bound and the density cut by the box do not shrink with refinement: refuse at
  // once, before any meshing, when they alone exceed the target for some site or pair.
  const floor = irreducibleRelError(pl);
  if (floor.rel > tol) {
    throw new CoulombError(
      'not-converged',
      `${floor.what}: the domain's boundary error bound plus the density cut by the box is already ${floor.rel.toExponential(2)} relative, above targetRelError ${tol}; no refinement can fix that. ` +
        'Enlarge the box (the check command recommends half-extents) or use a multipole boundary.',
      { relError: floor.rel, targetRelError: tol },
    );
  }
  const startTol = Math.min(0.2, (opts.startFactor ?? 4) * tol);
  // the starting mesh: graded for a looser tolerance; looser still when the budget asks for it
  let md: ReturnType<typeof meshDesign> | null = null;
  for (let t = startTol; !md; t *= 4) {
    try {
      md = meshDesign(design, { ...opts.mesh, order, targetRelError: Math.min(t, 0.5), keepBisectionMesh: true });
    } catch (err) {
      if (!(err instanceof MeshError && err.code === 'too-many-elements') || t >= 0.5) throw err;
    }
  }
  const eps = epsByRegion(design);
  let firstRel = Infinity;
  let base = 0;
  let finest: LevelSolution | null = null;
  let finestMesh: TetMesh | null = null;
  const out = runAdaptive(
    md.bisectionMesh!,
    (mesh, round) => {
      const sol = solveLevel(design, mesh, order, pl.sites, pl.pairIdx, opts, (phase, site, f) =>
        report({ phase, level: round + 1, site, fraction: base + 0.05 * f * (1 - base) }),
      );
      const nT = mesh.tets.length / 4;
      record(h, sol, mesh);
      finest = sol;
      finestMesh = mesh;
      const b = budgetsFrom(h, pl, order);
      // progress: how far the error has come down (on log axes) from the first mesh to the target
      if (firstRel === Infinity && Number.isFinite(b.rel)) firstRel = b.rel;
      if (Number.isFinite(b.rel) && firstRel > tol) base = Math.max(base, Math.min(0.99, Math.log(firstRel / b.rel) / Math.log(firstRel / tol)));
      // indicator: sum over sites of η_T² relative to each site's energy, so every site counts alike
      const ind = new Float64Array(nT);
      for (let k = 0; k < pl.sites.length; k++) {
        const site = pl.sites[k];
        const eta = residualIndicator(sol.space, sol.phis[k], (x, y, z) => 4 * Math.PI * densityAt(site.orbital, site.position, x, y, z), eps);
        const scale = 1 / Math.max(1e-300, Math.abs(sol.self[k]));
        for (let t = 0; t < nT; t++) ind[t] += eta[t] * scale;
      }
      return { result: b, indicator: ind, relError: b.rel };
    },
    { theta, targetRelError: tol, maxElements: Math.min(design.refinement.maxElements, opts.mesh?.hardCap ?? Infinity), signal: opts.signal },
  );
  if (!out.converged) notes.push(out.message);
  return { sites: out.last.sites, pairs: out.last.pairs, rel: out.relError, meets: out.converged, notes, history: h, finest: finest!, finestMesh: finestMesh! };
}
