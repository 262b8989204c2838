/**
 * The right-hand side of one site's Poisson problem: f_j = ∫ ρ_i v_j for every basis function
 * v_j, by quadrature that stays accurate where the orbital density is hard to integrate.
 *
 * Two difficulties, and what we do about each:
 *
 *  1. The 1s cusp. exp(−2r/a) has a kink at the nucleus, so a polynomial rule on the element
 *     that contains it converges only like h⁴ (one order above the volume), however high its
 *     degree. We bisect that element recursively (longest edge first, in the element's own
 *     barycentric coordinates), following only the pieces whose bounding ball still contains
 *     the nucleus, until their radius is below CUSP_RADIUS_FRACTION of the density's length
 *     scale. The number of pieces grows only linearly with the depth.
 *
 *           nucleus ×                 pieces near × are split again, the rest are leaves
 *            ┌──────────┐            ┌─────┬────┐
 *            │ ×        │     →      │×┼─┤ │    │
 *            │          │            ├─┴─┘ │    │
 *            └──────────┘            └─────┴────┘
 *
 *  2. Under-resolved elements. Where the mesh is coarse compared with the density's decay
 *     length (ℓ = a/2 for exp(−2r/a), σ for a Gaussian) the fixed-degree rule is not accurate
 *     enough for a charge that must add up to 1 within 1e-6. The integrand is ρ·v_j with v_j a
 *     polynomial of degree p (the element order), so a rule exact to degree d integrates the
 *     density's Taylor polynomial only to degree m − 1 = d − p: it errs by about
 *     |ρ^(m)| R^m/m! × volume on a piece of radius R, m = d − p + 1, and the density's
 *     derivatives are ≈ ρ/ℓ^m, so a piece at depth k (volume 2^−k of its element) is split while
 *         ρ_max(ball) · volume · (R/ℓ)^m/m!  >  PIECE_TOLERANCE · 2^−k.
 *     Scaling the tolerance by the piece's volume fraction keeps the estimated error of a whole
 *     element below PIECE_TOLERANCE however many pieces it is cut into (an absolute tolerance
 *     per piece would let the total grow with the number of pieces). The graded meshes do
 *     trigger it: near a site nearly every element that carries charge is subdivided (the
 *     `subdivided` count of the result shows how many), so this is the common path, not a
 *     rare fallback.
 * Elements whose whole bounding ball sees a density below NEGLIGIBLE (absolute: charge per
 * element) use a 4-point rule: they carry nothing the energies can notice, and they are most of
 * a graded mesh.
 *
 * The discrete charge Σ_j f_j = ∫_Ω ρ (the basis is a partition of unity) is reported: it must be
 * 1 minus the fraction of the density outside the box.
 *
 * Units: the load is ∫ρ v_j in the units of ρ (nm⁻³ × nm³ = 1); the Poisson right-hand side is
 * 4π times it (geometry/units.ts).
 */
import { cooperate, COOPERATE_MASK } from '../cooperate';
import type { Orbital, Vec3 } from '../design/types';
import { densityAt, orbitalLengths, orbitalModel } from '../density';
import { tetQuadrature, p2BasisBary, type TetRule } from './reference';
import type { FeSpace } from './space';

/** Pieces containing the nucleus are split until their radius is below this × ℓ. */
export const CUSP_RADIUS_FRACTION = 1 / 256;
/** Pieces whose pessimistic quadrature-error estimate (see header) exceeds this × their volume fraction are split. */
export const PIECE_TOLERANCE = 3e-6;
/** An element whose largest possible charge is below this uses the cheap rule (absolute). */
export const NEGLIGIBLE = 1e-15;
/** Safety stop on the recursion depth (each level halves the volume). */
const MAX_DEPTH = 60;

export interface DensityLoadOptions {
  /** exact degree of the base rule (default 5: the positive 15-point rule; with v_j of degree ≤ 2 it
   *  still integrates the density's Taylor expansion to third order, and the resolution criterion
   *  splits the pieces where that is not enough) */
  degree?: number;
  /** per-element quadrature tolerance of the resolution criterion, shared by its pieces by volume (default PIECE_TOLERANCE; Infinity switches it off) */
  pieceTolerance?: number;
}

export interface DensityLoad {
  /** ∫ ρ v_j per dof */
  load: Float64Array;
  /** Σ_j load_j = ∫_Ω ρ, the discrete charge */
  charge: number;
  /** number of elements integrated by subdivision */
  subdivided: number;
  /** number of leaf pieces used in subdivided elements */
  pieces: number;
}

/**
 * What the quadrature needs of the density, from the registry (geometry/density/models.ts): the
 * shortest decay length ℓ (the e⁻² length rule halved: a/2 for exp(−2r/a), σ for a Gaussian),
 * whether it has a cusp, and the model's bound of ρ beyond a distance.
 */
function densityScale(orbital: Orbital): { ell: number; cusp: boolean; beyond: (dist: number) => number } {
  const model = orbitalModel(orbital);
  return { ell: orbitalLengths(orbital).decayMin, cusp: model.cusp, beyond: (dist) => model.densityBeyond(orbital, dist) };
}

/**
 * f_j = ∫ ρ v_j for a unit-charge orbital density centred at `center`, on a P1 or P2 space.
 * Deterministic: elements in index order, pieces in a fixed depth-first order.
 */
export function densityLoad(space: FeSpace, orbital: Orbital, center: Vec3, options: DensityLoadOptions = {}): DensityLoad {
  const { mesh, order, nTets, tetDofs } = space;
  const nLoc = space.dofsPerTet;
  const coords = mesh.coords;
  const tets = mesh.tets;
  const base: TetRule = tetQuadrature(options.degree ?? 5);
  // a local binding: module re-exports can compile to getters, too slow for the innermost loop
  const rho = densityAt;
  const cheap: TetRule = tetQuadrature(2);
  const { ell, cusp, beyond } = densityScale(orbital);
  const pieceTol = options.pieceTolerance ?? PIECE_TOLERANCE;
  // Taylor order m of the remainder: the rule is exact for ρ's polynomial part up to degree − order
  const m = Math.max(1, base.degree - order + 1);
  let fact = 1;
  for (let k = 2; k <= m; k++) fact *= k;
  const errScale = 1 / fact;
  const cuspR = CUSP_RADIUS_FRACTION * ell;
  const cx = center[0], cy = center[1], cz = center[2];

  const load = new Float64Array(space.nDofs);
  const local = new Float64Array(nLoc);
  const lam = new Float64Array(4);
  const phi = new Float64Array(10);
  const p = new Float64Array(12); // physical vertices of the element
  // depth-first stack of pieces: barycentric vertices (16 per piece) and depth
  const STACK = MAX_DEPTH + 2; // each pop pushes two: depth-first keeps ≤ one sibling per level
  const stackB = new Float64Array(16 * STACK);
  const stackD = new Uint8Array(STACK);
  const q = new Float64Array(12); // physical vertices of a piece
  let subdivided = 0;
  let pieces = 0;
  let charge = 0, comp = 0; // Neumaier sum of element charges

  /** integrate rule over the piece with barycentric vertices B (16) and volume vol into local[] */
  const integratePiece = (rule: TetRule, B: Float64Array, off: number, vol: number): number => {
    let s = 0;
    const jac = 6 * vol;
    for (let k = 0; k < rule.n; k++) {
      const x0 = rule.bary[4 * k], x1 = rule.bary[4 * k + 1], x2 = rule.bary[4 * k + 2], x3 = rule.bary[4 * k + 3];
      for (let m = 0; m < 4; m++) lam[m] = x0 * B[off + m] + x1 * B[off + 4 + m] + x2 * B[off + 8 + m] + x3 * B[off + 12 + m];
      const x = lam[0] * p[0] + lam[1] * p[3] + lam[2] * p[6] + lam[3] * p[9];
      const y = lam[0] * p[1] + lam[1] * p[4] + lam[2] * p[7] + lam[3] * p[10];
      const z = lam[0] * p[2] + lam[1] * p[5] + lam[2] * p[8] + lam[3] * p[11];
      const w = rho(orbital, center, x, y, z) * rule.weights[k] * jac;
      if (w === 0) continue;
      s += w;
      if (order === 1) {
        for (let i = 0; i < 4; i++) local[i] += w * lam[i];
      } else {
        p2BasisBary(lam, phi);
        for (let i = 0; i < 10; i++) local[i] += w * phi[i];
      }
    }
    return s;
  };

  /** centre and radius of the bounding ball (about the centroid) of a piece, physical coords */
  let ballX = 0, ballY = 0, ballZ = 0, ballR = 0;
  const ball = (B: Float64Array, off: number): void => {
    for (let v = 0; v < 4; v++) {
      const o = off + 4 * v;
      q[3 * v] = B[o] * p[0] + B[o + 1] * p[3] + B[o + 2] * p[6] + B[o + 3] * p[9];
      q[3 * v + 1] = B[o] * p[1] + B[o + 1] * p[4] + B[o + 2] * p[7] + B[o + 3] * p[10];
      q[3 * v + 2] = B[o] * p[2] + B[o + 1] * p[5] + B[o + 2] * p[8] + B[o + 3] * p[11];
    }
    ballX = 0.25 * (q[0] + q[3] + q[6] + q[9]);
    ballY = 0.25 * (q[1] + q[4] + q[7] + q[10]);
    ballZ = 0.25 * (q[2] + q[5] + q[8] + q[11]);
    let r2 = 0;
    for (let v = 0; v < 4; v++) {
      const dx = q[3 * v] - ballX, dy = q[3 * v + 1] - ballY, dz = q[3 * v + 2] - ballZ;
      const d2 = dx * dx + dy * dy + dz * dz;
      if (d2 > r2) r2 = d2;
    }
    ballR = Math.sqrt(r2);
  };

  let elementVol = 1;
  /** 0: leaf with the cheap rule, 1: leaf with the base rule, 2: split */
  const classify = (vol: number, depth: number): number => {
    const dx = ballX - cx, dy = ballY - cy, dz = ballZ - cz;
    const d = Math.sqrt(dx * dx + dy * dy + dz * dz);
    const bound = beyond(d - ballR) * vol;
    if (bound < NEGLIGIBLE) return 0;
    if (depth >= MAX_DEPTH) return 1;
    if (cusp && d <= ballR && ballR > cuspR) return 2;
    // vol / elementVol is the piece's volume fraction 2^−depth (see header)
    if (bound * Math.pow(ballR / ell, m) * errScale > pieceTol * (vol / elementVol)) return 2;
    return 1;
  };

  // fast path: the base and cheap rules at the element's own points, basis values precomputed
  const tableOf = (rule: TetRule): Float64Array => {
    const tab = new Float64Array(rule.n * nLoc);
    for (let k = 0; k < rule.n; k++) {
      const l = rule.bary.subarray(4 * k, 4 * k + 4);
      if (order === 1) tab.set(l, 4 * k);
      else {
        p2BasisBary(l, phi);
        tab.set(phi, 10 * k);
      }
    }
    return tab;
  };
  const baseTab = tableOf(base);
  const cheapTab = tableOf(cheap);
  const integrateElement = (rule: TetRule, tab: Float64Array, vol: number): number => {
    let s = 0;
    const jac = 6 * vol;
    const bary = rule.bary;
    for (let k = 0; k < rule.n; k++) {
      const l0 = bary[4 * k], l1 = bary[4 * k + 1], l2 = bary[4 * k + 2], l3 = bary[4 * k + 3];
      const x = l0 * p[0] + l1 * p[3] + l2 * p[6] + l3 * p[9];
      const y = l0 * p[1] + l1 * p[4] + l2 * p[7] + l3 * p[10];
      const z = l0 * p[2] + l1 * p[5] + l2 * p[8] + l3 * p[11];
      const w = rho(orbital, center, x, y, z) * rule.weights[k] * jac;
      s += w;
      const o = nLoc * k;
      for (let i = 0; i < nLoc; i++) local[i] += w * tab[o + i];
    }
    return s;
  };

  for (let t = 0; t < nTets; t++) {

    if ((t & COOPERATE_MASK) === 0) cooperate();
    const a = tets[4 * t], b = tets[4 * t + 1], c = tets[4 * t + 2], d = tets[4 * t + 3];
    for (let k = 0; k < 3; k++) {
      p[k] = coords[3 * a + k];
      p[3 + k] = coords[3 * b + k];
      p[6 + k] = coords[3 * c + k];
      p[9 + k] = coords[3 * d + k];
    }
    const ux = p[3] - p[0], uy = p[4] - p[1], uz = p[5] - p[2];
    const vx = p[6] - p[0], vy = p[7] - p[1], vz = p[8] - p[2];
    const wx = p[9] - p[0], wy = p[10] - p[1], wz = p[11] - p[2];
    const vol = Math.abs(ux * (vy * wz - vz * wy) - uy * (vx * wz - vz * wx) + uz * (vx * wy - vy * wx)) / 6;
    elementVol = vol;
    local.fill(0);
    // the element itself is piece 0 with the identity barycentric vertices
    stackB.fill(0, 0, 16);
    stackB[0] = 1; stackB[5] = 1; stackB[10] = 1; stackB[15] = 1;
    ball(stackB, 0);
    const kind = classify(vol, 0);
    let s: number;
    if (kind === 0) {
      s = integrateElement(cheap, cheapTab, vol);
    } else if (kind === 1) {
      s = integrateElement(base, baseTab, vol);
    } else {
      subdivided++;
      s = 0;
      let top = 1;
      stackD[0] = 0;
      while (top > 0) {
        top--;
        const off = 16 * top;
        const depth = stackD[top];
        const pv = vol / Math.pow(2, depth);
        ball(stackB, off);
        const k = depth === 0 ? 2 : classify(pv, depth);
        if (k < 2) {
          s += integratePiece(k === 0 ? cheap : base, stackB, off, pv);
          pieces++;
          continue;
        }
        // bisect the longest edge (i, j) of the piece (physical lengths in q); ties → lowest pair
        let bi = 0, bj = 1, best = -1;
        for (let i = 0; i < 3; i++) {
          for (let j = i + 1; j < 4; j++) {
            const ex = q[3 * i] - q[3 * j], ey = q[3 * i + 1] - q[3 * j + 1], ez = q[3 * i + 2] - q[3 * j + 2];
            const l2 = ex * ex + ey * ey + ez * ez;
            if (l2 > best) {
              best = l2;
              bi = i;
              bj = j;
            }
          }
        }
        // child 1 (stays in place): vertex bj replaced by the midpoint; child 2: vertex bi replaced
        const off2 = off + 16;
        for (let m = 0; m < 16; m++) stackB[off2 + m] = stackB[off + m];
        for (let m = 0; m < 4; m++) {
          const mid = 0.5 * (stackB[off + 4 * bi + m] + stackB[off + 4 * bj + m]);
          stackB[off + 4 * bj + m] = mid;
          stackB[off2 + 4 * bi + m] = mid;
        }
        stackD[top] = depth + 1;
        stackD[top + 1] = depth + 1;
        top += 2;
      }
    }
    for (let i = 0; i < nLoc; i++) load[tetDofs[nLoc * t + i]] += local[i];
    const tsum = charge + s;
    comp += Math.abs(charge) >= Math.abs(s) ? charge - tsum + s : s - tsum + charge;
    charge = tsum;
  }
  return { load, charge: charge + comp, subdivided, pieces };
}
