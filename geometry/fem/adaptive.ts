/**
 * Adaptive refinement: solve → estimate → mark → refine, until the estimated error meets the
 * target or the element budget is spent.
 *
 * Estimate. The explicit residual estimator (Babuška & Rheinboldt, SIAM J. Numer. Anal. 15
 * (1978) 736–754; in the form of Verfürth, "A Posteriori Error Estimation Techniques for Finite
 * Element Methods", Oxford 2013, §1.4): for −∇·(ε∇φ) = f,
 *
 *     η_T² = h_T² ‖f + ε Δφ_h‖²_T  +  ½ Σ_{faces F ⊂ ∂T, interior} h_F ‖[ε ∂_n φ_h]‖²_F
 *
 * with h_T the longest edge of T, h_F the longest edge of F, and [·] the jump across F. It bounds
 * the energy-norm error from above and below up to constants, and for our problems the energy
 * error is exactly what matters: with φ_h the Galerkin solution, U − U_h = ‖∇(φ − φ_h)‖²_ε / 4π
 * (grounded box), so marking the elements with the largest η_T is marking where U is lost.
 * Dirichlet faces carry no jump term, and that includes the faces of an electrode (issue 11): an
 * electrode's tetrahedra stay in the mesh (region ELECTRODE_REGION, every dof Dirichlet), so its
 * faces are interior faces of the mesh, but the jump of ε∂_nφ there is the induced surface charge
 * of the metal, not an error; it does not vanish under refinement, and counting it made Dörfler
 * marking spend its marks on the metal surface right above a site while the error stayed in the
 * dielectric (tests/geometry/fem/adaptive-device.test.ts). Electrode elements themselves carry no
 * indicator (φ is fixed there). For P1, Δφ_h = 0 inside each element; for P2 it is a
 * constant per element (Δ[λ_i(2λ_i − 1)] = 4|∇λ_i|², Δ[4λ_aλ_b] = 8 ∇λ_a·∇λ_b).
 * The face integrals use the interior 3-point triangle rule (2/3, 1/6, 1/6) of degree 2 (Strang & Fix, An Analysis of the Finite Element Method, 1973,
 * Table 4.1), exact for the square of the linear P2 jump.
 *
 * Mark. Dörfler marking (Dörfler, SIAM J. Numer. Anal. 33 (1996) 1106–1124) with an explicit
 * bulk parameter θ: the smallest set M with Σ_{T∈M} η_T² ≥ θ Σ_T η_T², taking the largest
 * indicators first (ties by element index, so the marks are deterministic).
 *
 * Refine. The mesher's newest-vertex bisection with closure (geometry/mesh refine), which keeps
 * the mesh conforming and the bisection hierarchy the multigrid preconditioner needs.
 */
import { throwIfAborted } from '../errors';
import { buildFaces, NO_TET } from '../mesh/edges';
import { refine, toTetMesh, MeshError, type BisectionMesh } from '../mesh/index';
import { ELECTRODE_REGION } from '../mesh/device';
import type { TetMesh } from '../mesh/types';
import { GEOM_SIZE, tetGeometry, p2GradientsBary, tetQuadrature, TET_EDGES } from './reference';
import type { FeSpace } from './space';

/** Default Dörfler bulk parameter. Common practice is 0.3–0.7; we measured 0.7 reaching 1e-4 on a
 * 1s density in the fewest solve rounds (4 rounds vs 5–7 at 0.5). */
export const DEFAULT_THETA = 0.7;

/** Degree-2 rule on a triangle in barycentric coordinates (Strang & Fix 1973, Table 4.1). */
const TRI_BARY = [
  [2 / 3, 1 / 6, 1 / 6],
  [1 / 6, 2 / 3, 1 / 6],
  [1 / 6, 1 / 6, 2 / 3],
];

/**
 * Squared residual indicators η_T² (one per tetrahedron) of a finite-element potential φ_h that
 * solves −∇·(ε∇φ) = source with ε = epsByRegion[tetRegion].
 * `source(x, y, z)` is the full right-hand side (4πρ in the units of geometry/units.ts).
 */
export function residualIndicator(
  space: FeSpace,
  phi: Float64Array,
  source: (x: number, y: number, z: number) => number,
  epsByRegion: ArrayLike<number>,
): Float64Array {
  const { mesh, order, nTets, tetDofs } = space;
  const nLoc = space.dofsPerTet;
  const coords = mesh.coords;
  const tets = mesh.tets;
  const nV = coords.length / 3;
  const eta2 = new Float64Array(nTets);
  const geom = new Float64Array(GEOM_SIZE * nTets);
  const hT = new Float64Array(nTets);
  const lap = new Float64Array(nTets);
  const rule = tetQuadrature(4);

  // --- element residuals h_T² ‖f + εΔφ_h‖²
  const g = new Float64Array(GEOM_SIZE);
  for (let t = 0; t < nTets; t++) {
    const a = tets[4 * t], b = tets[4 * t + 1], c = tets[4 * t + 2], d = tets[4 * t + 3];
    tetGeometry(coords, a, b, c, d, g);
    geom.set(g, GEOM_SIZE * t);
    if (mesh.tetRegion[t] === ELECTRODE_REGION) continue; // φ is fixed in metal: no error there
    let h2 = 0;
    const vs = [a, b, c, d];
    for (let i = 0; i < 3; i++) {
      for (let j = i + 1; j < 4; j++) {
        const dx = coords[3 * vs[i]] - coords[3 * vs[j]];
        const dy = coords[3 * vs[i] + 1] - coords[3 * vs[j] + 1];
        const dz = coords[3 * vs[i] + 2] - coords[3 * vs[j] + 2];
        h2 = Math.max(h2, dx * dx + dy * dy + dz * dz);
      }
    }
    hT[t] = Math.sqrt(h2);
    const eps = epsByRegion[mesh.tetRegion[t]];
    let L = 0;
    if (order === 2) {
      const o = nLoc * t;
      for (let i = 0; i < 4; i++) {
        const gi = 3 * i;
        L += phi[tetDofs[o + i]] * 4 * (g[gi] * g[gi] + g[gi + 1] * g[gi + 1] + g[gi + 2] * g[gi + 2]);
      }
      for (let e = 0; e < 6; e++) {
        const [p, q] = TET_EDGES[e];
        L += phi[tetDofs[o + 4 + e]] * 8 * (g[3 * p] * g[3 * q] + g[3 * p + 1] * g[3 * q + 1] + g[3 * p + 2] * g[3 * q + 2]);
      }
      L *= eps;
    }
    lap[t] = L;
    let s = 0;
    for (let k = 0; k < rule.n; k++) {
      const l0 = rule.bary[4 * k], l1 = rule.bary[4 * k + 1], l2 = rule.bary[4 * k + 2], l3 = rule.bary[4 * k + 3];
      const x = l0 * coords[3 * a] + l1 * coords[3 * b] + l2 * coords[3 * c] + l3 * coords[3 * d];
      const y = l0 * coords[3 * a + 1] + l1 * coords[3 * b + 1] + l2 * coords[3 * c + 1] + l3 * coords[3 * d + 1];
      const z = l0 * coords[3 * a + 2] + l1 * coords[3 * b + 2] + l2 * coords[3 * c + 2] + l3 * coords[3 * d + 2];
      const r = source(x, y, z) + L;
      s += rule.weights[k] * r * r;
    }
    eta2[t] = h2 * 6 * g[12] * s;
  }

  // --- face jumps ½ h_F ‖[ε ∂_n φ_h]‖²
  const F = buildFaces(tets, nV);
  const nF = F.faceTets.length / 2;
  const lam = new Float64Array(4);
  const grad = new Float64Array(30);
  // local binding: module re-exports can compile to getters, too slow inside this loop
  const p2Grad = p2GradientsBary;
  const gradAt = (t: number, fa: number, fb: number, fc: number, w: readonly number[], out: Float64Array): void => {
    // barycentric coordinates of the face point in tet t
    for (let i = 0; i < 4; i++) {
      const v = tets[4 * t + i];
      lam[i] = v === fa ? w[0] : v === fb ? w[1] : v === fc ? w[2] : 0;
    }
    const gg = geom.subarray(GEOM_SIZE * t, GEOM_SIZE * t + 12);
    const o = nLoc * t;
    let gx = 0, gy = 0, gz = 0;
    if (order === 1) {
      for (let i = 0; i < 4; i++) {
        const u = phi[tetDofs[o + i]];
        gx += u * gg[3 * i];
        gy += u * gg[3 * i + 1];
        gz += u * gg[3 * i + 2];
      }
    } else {
      p2Grad(lam, gg, grad);
      for (let i = 0; i < 10; i++) {
        const u = phi[tetDofs[o + i]];
        gx += u * grad[3 * i];
        gy += u * grad[3 * i + 1];
        gz += u * grad[3 * i + 2];
      }
    }
    out[0] = gx;
    out[1] = gy;
    out[2] = gz;
  };
  const g1 = new Float64Array(3);
  const g2 = new Float64Array(3);
  const faceTets = F.faceTets, faces = F.faces, regions = mesh.tetRegion;
  for (let f = 0; f < nF; f++) {
    const t1 = faceTets[2 * f], t2 = faceTets[2 * f + 1];
    if (t2 === NO_TET) continue;
    if (regions[t1] === ELECTRODE_REGION || regions[t2] === ELECTRODE_REGION) continue; // a Dirichlet surface
    const fa = faces[3 * f], fb = faces[3 * f + 1], fc = faces[3 * f + 2];
    const ux = coords[3 * fb] - coords[3 * fa], uy = coords[3 * fb + 1] - coords[3 * fa + 1], uz = coords[3 * fb + 2] - coords[3 * fa + 2];
    const vx = coords[3 * fc] - coords[3 * fa], vy = coords[3 * fc + 1] - coords[3 * fa + 1], vz = coords[3 * fc + 2] - coords[3 * fa + 2];
    const nx = uy * vz - uz * vy, ny = uz * vx - ux * vz, nz = ux * vy - uy * vx;
    const n2 = Math.sqrt(nx * nx + ny * ny + nz * nz);
    const area = 0.5 * n2;
    const wx = vx - ux, wy = vy - uy, wz = vz - uz;
    const hF = Math.sqrt(Math.max(ux * ux + uy * uy + uz * uz, vx * vx + vy * vy + vz * vz, wx * wx + wy * wy + wz * wz));
    const e1 = epsByRegion[regions[t1]], e2 = epsByRegion[regions[t2]];
    let s = 0;
    const npts = order === 1 ? 1 : 3;
    for (let k = 0; k < npts; k++) {
      const w = order === 1 ? [1 / 3, 1 / 3, 1 / 3] : TRI_BARY[k];
      gradAt(t1, fa, fb, fc, w, g1);
      gradAt(t2, fa, fb, fc, w, g2);
      const jump = ((e1 * g1[0] - e2 * g2[0]) * nx + (e1 * g1[1] - e2 * g2[1]) * ny + (e1 * g1[2] - e2 * g2[2]) * nz) / n2;
      s += (jump * jump) / npts;
    }
    const contrib = 0.5 * hF * area * s;
    eta2[t1] += contrib;
    eta2[t2] += contrib;
  }
  return eta2;
}

/**
 * Dörfler marking: the smallest set of elements, largest indicators first (ties by index), whose
 * indicators sum to at least θ of the total. Returns a 0/1 marker per element.
 */
export function dorflerMark(eta2: Float64Array, theta: number): Uint8Array {
  if (!(theta > 0 && theta <= 1)) throw new RangeError(`Dörfler parameter θ must lie in (0, 1], got ${theta}`);
  const n = eta2.length;
  const marks = new Uint8Array(n);
  let total = 0;
  for (let t = 0; t < n; t++) total += eta2[t];
  if (!(total > 0)) return marks;
  const goal = theta * total;
  // threshold τ: walk the sorted values from the top (native numeric sort of a copy)
  const sorted = eta2.slice().sort();
  let acc = 0;
  let tau = sorted[n - 1];
  for (let k = n - 1; k >= 0; k--) {
    tau = sorted[k];
    acc += tau;
    if (acc >= goal) break;
  }
  // everything strictly above τ, then elements equal to τ in index order until the goal is met
  acc = 0;
  for (let t = 0; t < n; t++) {
    if (eta2[t] > tau) {
      marks[t] = 1;
      acc += eta2[t];
    }
  }
  for (let t = 0; t < n && acc < goal; t++) {
    if (eta2[t] === tau && !marks[t]) {
      marks[t] = 1;
      acc += tau;
    }
  }
  return marks;
}

export interface AdaptiveStepResult<T> {
  /** what the caller wants back from this mesh */
  result: T;
  /** η_T² per element (any positive scale: only the ordering and sums matter) */
  indicator: Float64Array;
  /** the caller's estimate of the relative error of its numbers on this mesh */
  relError: number;
}

export interface AdaptiveOptions {
  /** Dörfler bulk parameter θ (default DEFAULT_THETA) */
  theta?: number;
  targetRelError: number;
  /** element budget: no mesh beyond this many tetrahedra is built */
  maxElements: number;
  /** safety stop on the number of solve–refine rounds (default 60) */
  maxSteps?: number;
  signal?: { readonly aborted: boolean };
}

export type AdaptiveStopReason = 'converged' | 'budget' | 'max-steps';

export interface AdaptiveOutcome<T> {
  /** the result on the last mesh that was solved */
  last: T;
  lastMesh: TetMesh;
  relError: number;
  converged: boolean;
  reason: AdaptiveStopReason;
  steps: { elements: number; vertices: number; relError: number }[];
  message: string;
}

/**
 * The loop. `step` solves on a mesh and returns its numbers, indicators and error estimate; the
 * loop stops when relError ≤ target (converged), when the next refinement would pass the element
 * budget (budget: the last numbers are returned with converged = false and a message saying so),
 * or after maxSteps rounds. The bisection mesh is refined in place.
 */
export function runAdaptive<T>(
  bm: BisectionMesh,
  step: (mesh: TetMesh, round: number) => AdaptiveStepResult<T>,
  options: AdaptiveOptions,
): AdaptiveOutcome<T> {
  const theta = options.theta ?? DEFAULT_THETA;
  const maxSteps = options.maxSteps ?? 60;
  const steps: AdaptiveOutcome<T>['steps'] = [];
  if (bm.nTets > options.maxElements) {
    throw new MeshError('too-many-elements', `the starting mesh already has ${bm.nTets} tetrahedra, more than the budget of ${options.maxElements}`, {
      limit: options.maxElements,
    });
  }
  for (let round = 0; ; round++) {
    throwIfAborted(options.signal);
    const mesh = toTetMesh(bm);
    const r = step(mesh, round);
    steps.push({ elements: bm.nTets, vertices: bm.nVertices, relError: r.relError });
    const done = (reason: AdaptiveStopReason, message: string): AdaptiveOutcome<T> => ({
      last: r.result, lastMesh: mesh, relError: r.relError, converged: reason === 'converged', reason, steps, message,
    });
    if (r.relError <= options.targetRelError) {
      return done('converged', `estimated relative error ${fmt(r.relError)} meets the target ${fmt(options.targetRelError)} after ${round + 1} solves`);
    }
    const budgetMsg = (): string =>
      `the element budget (${options.maxElements} tetrahedra) is spent before the target is met: the estimated relative error is ` +
      `${fmt(r.relError)}, the target ${fmt(options.targetRelError)}. Raise refinement.maxElements or loosen targetRelError; ` +
      'the numbers of the last mesh are NOT converged to the target.';
    if (round + 1 >= maxSteps) return done('max-steps', `stopped after ${maxSteps} rounds without meeting the target (estimated ${fmt(r.relError)})`);
    const marks = dorflerMark(r.indicator, theta);
    // A refinement interrupted by the budget check leaves the mesh half-closed, so refine a copy
    // and keep it only when it stayed within the budget.
    const trial = cloneBisectionMesh(bm);
    try {
      refine(trial, marks, { maxTets: options.maxElements });
    } catch (err) {
      if (err instanceof MeshError && err.code === 'too-many-elements') return done('budget', budgetMsg());
      throw err;
    }
    Object.assign(bm, trial);
  }
}

function fmt(x: number): string {
  return Number.isFinite(x) ? x.toExponential(2) : 'unknown (too few meshes)';
}


/** Deep copy of a bisection mesh (typed arrays copied at their capacity). */
export function cloneBisectionMesh(m: BisectionMesh): BisectionMesh {
  return {
    ...m,
    coords: m.coords.slice(),
    parents: m.parents.slice(),
    vertexLevel: m.vertexLevel.slice(),
    vertexFaces: m.vertexFaces.slice(),
    tets: m.tets.slice(),
    tetTag: m.tetTag.slice(),
    tetFlip: m.tetFlip.slice(),
    tetLevel: m.tetLevel.slice(),
    tetRegion: m.tetRegion.slice(),
    boxMin: [...m.boxMin] as [number, number, number],
    boxMax: [...m.boxMax] as [number, number, number],
    cells: [...m.cells] as [number, number, number],
  };
}
