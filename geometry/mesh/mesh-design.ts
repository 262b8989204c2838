/**
 * meshDesign: from a design document to a graded, conforming tetrahedral mesh.
 *
 *   1. check the domain (degenerate → MeshError 'degenerate-box')
 *   2. size field from the sites and refinement.targetRelError (sizefield.ts)
 *   3. initial Kuhn cells: near-cubic, `initialCells` across the smallest axis
 *   4. estimate the tet count (estimate.ts; a quick lower bound first); refuse above maxElements
 *      or the server cap
 *   5. bisect to the size field with closure (bisection.ts), arrays pre-sized from the estimate
 *   6. toTetMesh (positively oriented copy)
 */
import type { Design } from '../design/types';
import { kuhnBox, refineToSize, toTetMesh, type BisectionMesh } from './bisection';
import { MeshError } from './errors';
import { CLOSURE_ALLOWANCE, coreLowerBound, estimateTetCount } from './estimate';
import { SizeField, sizeFieldFromDesign, type SizeFieldOptions, type SizeFieldParams } from './sizefield';
import type { TetMesh } from './types';

/** Server-wide cap on tetrahedra (memory: ~60–100 bytes per tet while meshing). Common practice. */
export const DEFAULT_HARD_CAP = 5_000_000;

export interface MeshDesignOptions extends SizeFieldOptions {
  /** fewest initial Kuhn cells across the smallest domain axis (default 2; see chooseInitialCells) */
  initialCells?: number;
  /** server-wide cap (default DEFAULT_HARD_CAP) */
  hardCap?: number;
  /** overrides design.refinement.maxElements */
  maxElements?: number;
  /** keep the tagged bisection mesh in the result (for further adaptive refinement) */
  keepBisectionMesh?: boolean;
  /** work bound of the estimate in cubature leaves (default ESTIMATE_MAX_LEAVES) */
  maxEstimateLeaves?: number;
}

export interface MeshDesignStats {
  vertices: number;
  tets: number;
  initialCells: [number, number, number];
  initialTets: number;
  bisections: number;
  closurePasses: number;
  /** transient bytes of the refinement (midpoint hash + vertex stamps) */
  workBytes: number;
  /** largest tet generation */
  maxLevel: number;
  estimateLeaves: number;
  secondsEstimate: number;
  secondsRefine: number;
  secondsConvert: number;
}

export interface MeshDesignResult {
  mesh: TetMesh;
  sizeField: SizeFieldParams;
  /** estimated tet count, computed before meshing */
  estimate: number;
  stats: MeshDesignStats;
  /** the tagged mesh, when options.keepBisectionMesh */
  bisectionMesh?: BisectionMesh;
}

/**
 * Cells per axis: n across the smallest axis, the others rounded so that cells stay near-cubic.
 * Cubic cells keep the Kuhn shapes exact (dihedral angles within [45°, 120°]); stretched cells
 * stretch every descendant. So n is searched upwards from nMin (up to nMin + 6) for the layout
 * whose largest/smallest cell side is closest to 1, the smallest n winning ties: extents in ratios
 * like 3 : 2 : 2.5 then get exactly cubic cells (n = 4 across the smallest).
 */
export function chooseInitialCells(halfExtents: readonly number[], nMin: number): [number, number, number] {
  if (!Number.isInteger(nMin) || nMin < 1) throw new MeshError('bad-size-field', `initialCells must be a positive integer, got ${nMin}`);
  const smallest = Math.min(halfExtents[0], halfExtents[1], halfExtents[2]);
  let best: [number, number, number] = [1, 1, 1];
  let bestAspect = Infinity;
  for (let n = nMin; n <= nMin + 6; n++) {
    const s = (2 * smallest) / n;
    const cells = [0, 1, 2].map((a) => Math.max(1, Math.round((2 * halfExtents[a]) / s))) as [number, number, number];
    const sides = cells.map((c, a) => (2 * halfExtents[a]) / c);
    const aspect = Math.max(...sides) / Math.min(...sides);
    // 1e-9: exact ratios computed in floating point should still count as cubic
    if (aspect < bestAspect - 1e-9) {
      best = cells;
      bestAspect = aspect;
    }
  }
  return best;
}

function checkDomain(design: Design): void {
  const { center, halfExtentsNm } = design.domain;
  for (let a = 0; a < 3; a++) {
    const h = halfExtentsNm[a];
    const c = center[a];
    if (!Number.isFinite(h) || !(h > 0) || !Number.isFinite(c) || !(c + h > c - h)) {
      throw new MeshError(
        'degenerate-box',
        `the domain is degenerate along ${'xyz'[a]}: half-extent ${h} nm, centre ${c} nm (both must be finite numbers and the half-extent positive)`,
      );
    }
  }
}

/**
 * Most cubature leaves one estimate may use. The estimate's work is in its leaves (a few µs each),
 * so this bounds its time whatever the design; past it the partial sum is still a lower bound
 * (the integrand is positive). Far above the leaves of any design the mesher can build within the
 * server cap (common practice).
 */
export const ESTIMATE_MAX_LEAVES = 1_000_000;

/** Why an estimate stopped early and is a lower bound only. */
export type EstimateStop =
  /** the initial Kuhn grid alone (near-cubic cells across a flat or needle-like box) passes the limit */
  | 'initial-grid'
  /** the integrated count passed the limit */
  | 'count'
  /** the cubature used ESTIMATE_MAX_LEAVES leaves */
  | 'work';

export interface DesignEstimate {
  /** estimated tetrahedra of the graded mesh (never below the initial Kuhn mesh) */
  estimate: number;
  /** true when the count passed the limit and integration stopped early (a lower bound then) */
  aborted: boolean;
  /** why it stopped early (null: the full estimate) */
  stoppedBy: EstimateStop | null;
  /** min(maxElements, hardCap) */
  limit: number;
  maxElements: number;
  hardCap: number;
  cells: [number, number, number];
  initialTets: number;
  leaves: number;
  spec: ReturnType<typeof sizeFieldFromDesign>['spec'];
  params: ReturnType<typeof sizeFieldFromDesign>['params'];
  seconds: number;
}

/**
 * The element count a design's graded mesh would have, from its size field, before any meshing
 * (estimate.ts; within ±30 % by test). The far-field check calls it for recommended domains.
 */
export function estimateDesignElements(design: Design, options: MeshDesignOptions = {}): DesignEstimate {
  checkDomain(design);
  const { center, halfExtentsNm } = design.domain;
  const hardCap = options.hardCap ?? DEFAULT_HARD_CAP;
  const maxElements = options.maxElements ?? design.refinement.maxElements;
  const limit = Math.min(hardCap, maxElements);
  const { spec, params } = sizeFieldFromDesign(design, options);
  const field = new SizeField(spec);
  const cells = chooseInitialCells(halfExtentsNm, options.initialCells ?? 2);
  const boxMin = [0, 1, 2].map((a) => center[a] - halfExtentsNm[a]);
  const boxMax = [0, 1, 2].map((a) => center[a] + halfExtentsNm[a]);
  const initialTets = 6 * cells[0] * cells[1] * cells[2];

  const t0 = performance.now();
  // A flat or needle-like box (half-extents 10⁶ × 10⁶ × 10⁻⁶ nm) needs ~10²⁵ near-cubic initial
  // cells before any refinement: refuse on that count alone, before anything is allocated.
  if (!(initialTets <= limit)) {
    return {
      estimate: initialTets,
      aborted: true,
      stoppedBy: 'initial-grid',
      limit,
      maxElements,
      hardCap,
      cells,
      initialTets,
      leaves: 0,
      spec,
      params,
      seconds: (performance.now() - t0) / 1000,
    };
  }
  // a cheap lower bound first (milliseconds even for 10⁵ sites), then the cubature
  const lower = CLOSURE_ALLOWANCE * coreLowerBound(spec, boxMin, boxMax, cells, limit / CLOSURE_ALLOWANCE);
  const est =
    lower > limit
      ? { tets: lower, sizeDriven: lower / CLOSURE_ALLOWANCE, leaves: 0, aborted: true, stoppedBy: 'count' as const }
      : estimateTetCount({ field, boxMin, boxMax, cells, stopAbove: 1.5 * limit, maxLeaves: options.maxEstimateLeaves ?? ESTIMATE_MAX_LEAVES });
  return {
    estimate: Math.max(initialTets, est.tets),
    aborted: est.aborted,
    stoppedBy: est.stoppedBy,
    limit,
    maxElements,
    hardCap,
    cells,
    initialTets,
    leaves: est.leaves,
    spec,
    params,
    seconds: (performance.now() - t0) / 1000,
  };
}

export function meshDesign(design: Design, options: MeshDesignOptions = {}): MeshDesignResult {
  const { estimate, aborted, stoppedBy, limit, maxElements, hardCap, cells, initialTets, leaves, spec, params, seconds } = estimateDesignElements(design, options);
  const { center, halfExtentsNm } = design.domain;
  const field = new SizeField(spec);
  const t1 = performance.now();
  if (stoppedBy === 'initial-grid') {
    const which = maxElements <= hardCap ? `the design's maxElements (${maxElements})` : `the server cap (${hardCap})`;
    const h = halfExtentsNm;
    const aspect = Math.max(h[0], h[1], h[2]) / Math.min(h[0], h[1], h[2]);
    throw new MeshError(
      'too-many-elements',
      `the domain's half-extents ${h.map((x) => x.toPrecision(4)).join(' × ')} nm (longest/shortest ${aspect.toPrecision(3)}) need ` +
        `${cells.map((c) => c.toPrecision(3)).join(' × ')} near-cubic initial cells, ${initialTets.toPrecision(3)} tetrahedra before any refinement, ` +
        `more than ${which}; make the box less flat or smaller`,
      { estimate, limit, maxElements, hardCap },
    );
  }
  if (estimate > limit) {
    const which = maxElements <= hardCap ? `the design's maxElements (${maxElements})` : `the server cap (${hardCap})`;
    throw new MeshError(
      'too-many-elements',
      `the size field needs ${aborted ? 'at least' : 'about'} ${Math.round(estimate)} tetrahedra, more than ${which}; ` +
        'raise targetRelError, shrink the domain or raise maxElements',
      { estimate, limit, maxElements, hardCap },
    );
  }

  // Pre-size from the estimate (tests hold it within ±30 %): 1.4× leaves room for the error, and
  // graded Kuhn meshes have about 5–6 tets per vertex, so vertices ≤ tets/4 is generous.
  // Arrays still double if a run needs more.
  const tetCap = Math.ceil(1.4 * estimate) + initialTets;
  const mesh = kuhnBox({ center, halfExtents: halfExtentsNm, cells, capacity: { tets: tetCap, vertices: Math.ceil(tetCap / 4) } });
  // The running guard: the estimate may be a little low, so the refinement itself stops (with the
  // same error code) rather than return a mesh above maxElements or the server cap.
  const refineStats = refineToSize(mesh, field.tooLarge, {
    maxTets: limit,
    expectedNewVertices: Math.ceil(estimate / 5),
  });
  const t2 = performance.now();
  const tetMesh = toTetMesh(mesh);
  const t3 = performance.now();
  let maxLevel = 0;
  for (let t = 0; t < tetMesh.tetLevel.length; t++) if (tetMesh.tetLevel[t] > maxLevel) maxLevel = tetMesh.tetLevel[t];

  return {
    mesh: tetMesh,
    sizeField: params,
    estimate,
    stats: {
      vertices: mesh.nVertices,
      tets: mesh.nTets,
      initialCells: cells,
      initialTets,
      bisections: refineStats.bisections,
      closurePasses: refineStats.passes,
      workBytes: refineStats.workBytes,
      maxLevel,
      estimateLeaves: leaves,
      secondsEstimate: seconds,
      secondsRefine: (t2 - t1) / 1000,
      secondsConvert: (t3 - t2) / 1000,
    },
    bisectionMesh: options.keepBisectionMesh ? mesh : undefined,
  };
}

/**
 * Work bound of the far-field check's element estimate, in cubature leaves (~5–10 µs each on the
 * two-core test machine, so about a second at most): the plaquette needs ~11,000, a 100-site array
 * ~100,000; larger counts are reported as "more than N" (common practice: the check must stay instant).
 */
export const CHECK_ESTIMATE_MAX_LEAVES = 120_000;

/**
 * The element count the far-field check reports for a box: the mesher's estimate of the graded
 * mesh with these half-extents, rounded, stopped at CHECK_ESTIMATE_MAX_LEAVES (then `atLeast`).
 * One function for `npm run cli -- check` and the studio's live panel, so both print the same.
 */
export function checkElementEstimate(design: Design, halfExtentsNm: readonly [number, number, number]): { elements: number; atLeast: boolean } {
  const e = estimateDesignElements(
    { ...design, domain: { ...design.domain, halfExtentsNm: [halfExtentsNm[0], halfExtentsNm[1], halfExtentsNm[2]] } },
    { maxEstimateLeaves: CHECK_ESTIMATE_MAX_LEAVES },
  );
  return { elements: Math.round(e.estimate), atLeast: e.aborted };
}
