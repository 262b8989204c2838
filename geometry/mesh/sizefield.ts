/**
 * The size field: the longest tetrahedron edge wanted at each point of the domain.
 *
 *     h(x) = min( hmax, min over sites s of  h0_s · max(1, |x − p_s| / a_s)^β )
 *
 *   a_s   orbital length of site s (hydrogenic / anisotropic 1s: the (smaller) radius a;
 *         Gaussian: 2σ, because exp(−r²/2σ²) falls off on the scale σ like exp(−2r/a) does on a/2)
 *   h0_s  size inside the core r ≤ a_s, where the charge density lives
 *   β     grading exponent, 2(p+2)/(2p+3): 6/5 for P1, 8/7 for P2
 *
 *   h ▲                                     hmax ─────────
 *     │                              ....·´
 *     │                       ...·´´          h0 (r/a)^β
 *     │               ...·´´
 *  h0 ├───────────·´
 *     └───────────┼──────────────────────────────────────▶ r
 *                 a
 *
 * Why β: with p the element order the energy-norm interpolation error on a tet of size h is
 * ‖∇(u − Iu)‖²_T ≈ h^{2p} |D^{p+1}u|² h³ (Ciarlet, The FEM for Elliptic Problems, Thm 3.1.6), and
 * outside the charge u ≈ q/r, so |D^{p+1}u| ≈ r^{−(p+2)}. Equal error per element,
 * h^{2p+3} r^{−2(p+2)} = const, gives h ∝ r^{2(p+2)/(2p+3)}. Inside the core the derivatives of u
 * scale like a^{−(p+2)} instead, hence the flat part h = h0 for r ≤ a.
 *
 * Why h0 (automatic rule): the relative energy error of a Coulomb energy computed with order-p
 * elements behaves like C_p (h0/a)^{2p} (the energy error is the square of the energy-norm
 * error, O(h^p), and the graded far field scales with h0). Solving S·C_p (h0/a)^{2p} = tol gives
 *
 *     h0 = a · (tol / (S · C_p))^{1/(2p)},   capped at a/2,
 *
 * The cap keeps even loose targets in the asymptotic range: the discretisation bar of the Coulomb
 * solver comes from nested meshes with core sizes h0, 2h0, 4h0, and with h0 = a (the first cap)
 * the coarser two were pre-asymptotic, their differences shrank by chance and the bars for V fell
 * short of the closed-form error (plaquette of four 1s donors, tol 1e-2: bar 0.0076 meV against
 * an error of 0.0205 meV). With a/2 the same case meets 1e-3 with bars that cover the error.
 *
 * where C_p is the constant of the WHOLE default graded mesh (core, far field, closure and the
 * hmax cap together), measured, not derived: the true error of U against the closed forms of
 * geometry/density on default graded meshes, exact multipole boundary (box half-width 16× the
 * orbital radius), for the hydrogenic, Gaussian and anisotropic (a = 2.5, b = 1.4 nm) models,
 * P1 at tol 1e-2 and 3e-3, P2 at 1e-3 and 3e-4. The effective C_p = error/(h0/a)^{2p} ranged
 * over 0.16–0.27 for P1 and 2.7e-3–7.6e-3 for P2 and grows slowly as tol shrinks (the error
 * falls a little slower than h0^{2p}, the far field's share growing), so C_p is the top of the
 * measured range and S = 1.5 a margin (common practice). Measured with these constants: true
 * error / tol = 0.51–0.65 (P1, 1e-2), 0.59–0.74 (P1, 3e-3), 0.44–0.50 (P2, 1e-3), 0.60–0.78
 * (P2, 3e-4). Below those tolerances the ratio may keep creeping up; the adaptive mode, which
 * measures its own error, is the tool for tight targets. (The first rule, C_1 = 0.03 and
 * C_2 = 6e-4 read off uniform-mesh figures with S = 4, missed the target by up to 1.6×.)
 * tests/geometry/fem/core-size.test.ts checks the promise at cheap tolerances. Every
 * parameter can be overridden.
 *
 * Reproducibility note: the marking compares distances with a·(L/h0)^{1/β}, computed with Math.pow,
 * which ECMAScript does not require to be correctly rounded (sqrt and + − × ÷ are). Meshes are
 * byte-identical on every run and machine with the same JavaScript engine (Node 20's V8); another
 * engine could in principle flip a decision that sits within one rounding unit of its threshold.
 */
import type { Design, Orbital } from '../design/types';
import { resolveOrbital } from '../design/presets';
import { orbitalLengths } from '../density';
import { MeshError } from './errors';
import type { TooLarge } from './bisection';
import { electrodeEdgeSegments } from './device';

/** C_p of the rule above, index p − 1 (see header: measured on default graded meshes). */
export const CORE_ERROR_CONSTANT: readonly [number, number] = [0.24, 6.5e-3];
/** margin S of the rule above over the largest measured C_p (common practice). */
export const CORE_SAFETY_FACTOR = 1.5;

export function gradingExponent(order: 1 | 2): number {
  return (2 * (order + 2)) / (2 * order + 3);
}

/** The orbital length a used by the size field (see header): the core length of geometry/density's one length rule. */
export function orbitalLength(orbital: Orbital): number {
  return orbitalLengths(orbital).core;
}

/** Largest automatic core size, as a fraction of the orbital length (see the header). */
export const CORE_SIZE_CAP = 0.5;

/** h0 = a · (tol / (S C_p))^{1/(2p)}, capped at a/2 (see the header). */
export function autoCoreSize(a: number, tol: number, order: 1 | 2): number {
  const ratio = Math.pow(tol / (CORE_SAFETY_FACTOR * CORE_ERROR_CONSTANT[order - 1]), 1 / (2 * order));
  return a * Math.min(CORE_SIZE_CAP, ratio);
}

/** Sites sharing one (h0, a) pair: one class per distinct pair, in order of first appearance. */
export interface SizeClassSpec {
  h0Nm: number;
  coreRadiusNm: number;
  /** site positions, 3 per site */
  positions: Float64Array;
}

export interface SizeFieldSpec {
  exponent: number;
  hmaxNm: number;
  classes: SizeClassSpec[];
  /** refinement towards electrode edges (absent without electrodes): see ElectrodeEdgeSpec */
  edges?: ElectrodeEdgeSpec;
}

/**
 * Electrode edges and corners, where the electrodes' potential is singular (near a re-entrant
 * edge of angle 3π/2 it behaves like d^λ, λ = 2/3; Jackson §2.11 for the wedge):
 *
 *     h_E(d) = h_E · max(1, d/h_E)^{β_E},   β_E = 1 − μ,  μ = ¾·λ/p   (λ = 2/3, p the order)
 *
 * d the distance to the nearest electrode edge segment (its endpoints are the corners). A mesh
 * graded as d^{1−μ} with μ < λ/p restores the order-p rate near such an edge (Apel, Sändig &
 * Whiteman, Math. Methods Appl. Sci. 19 (1996) 63–85; from memory); ¾ keeps μ clear of the limit
 * (common practice). β_E = 1/2 for P1, 3/4 for P2. h_E defaults to hmax/4 (common practice: two
 * bisection cycles below the far-field size), times `electrodeSizeFactor`; `electrodeEdgeNm` and
 * `electrodeEdgeExponent` set h_E and β_E directly. The split's nested family (geometry/fem/
 * coulomb-plan.ts splitFamily) gives them from its own default rule (edge-rule.ts: h_E from the
 * target and the sites' distance to the nearest edge, β_E = 1); a mesh made here alone (the mesh
 * command, the full method's graded family, the lever arms) keeps hmax/4 and the β_E below.
 *
 * A metal edge lying on a dielectric interface (a gate on an oxide) has a smaller exponent than
 * 2/3: with the metal's two faces at θ = π/2 and θ = π, vacuum (ε_v) between 0 and π/2 and the
 * oxide (ε_o) below, the modes r^λ Φ(θ) need ε_o cot(λπ) + ε_v cot(λπ/2) = 0 (matching Φ and εΦ′
 * at θ = 0; our derivation), λ ≈ 0.566 for SiO₂ 3.9 under vacuum, and λ → 1/2 as ε_o/ε_v → ∞.
 * μ = ¾·(2/3)/p is below λ/p for every λ > 1/2, so β_E holds for those edges too.
 *
 * Measured (issue 11 bench, 2×2 array 20 nm under 5 nm of oxide, two gates, split, P2): the U and
 * V of the split are set by h_E alone at these sizes (hmax 20, 40 or 80 nm gave the same mesh; 10
 * nm moved V by 3e-6 relative), and V approaches its limit like h_E^{1.2} (2λ, the pollution of
 * an edge singularity, as expected). β_E = 1 (h = max(h_E, d)) gave the same V within 3 % of the
 * h_E error for 13–22 % fewer unknowns than β_E = 3/4, and β_E = 1/2 the same V for 1.2–1.8× more.
 */
export interface ElectrodeEdgeSpec {
  /** axis-aligned segments, 6 numbers each (two endpoints, nm) */
  segments: Float64Array;
  hNm: number;
  exponent: number;
}

/** β_E = 1 − ¾·(2/3)/p (see ElectrodeEdgeSpec). */
export function electrodeEdgeExponent(order: 1 | 2): number {
  return 1 - (0.75 * (2 / 3)) / order;
}

/** h_E = hmax / ELECTRODE_EDGE_DIVISOR by default (common practice, see ElectrodeEdgeSpec). */
export const ELECTRODE_EDGE_DIVISOR = 4;

/** The parameters as plain data (what meshDesign reports). */
export interface SizeFieldParams {
  order: 1 | 2;
  targetRelError: number;
  exponent: number;
  hmaxNm: number;
  /** smallest h0 over the classes */
  h0MinNm: number;
  classes: { h0Nm: number; coreRadiusNm: number; sites: number }[];
  rule: string;
  /** present only when the design has electrode edges inside the domain */
  electrodeEdges?: { segments: number; hNm: number; exponent: number; rule: string };
}

export interface SizeFieldOptions {
  /** one h0 for every site, overriding the automatic rule */
  h0Nm?: number;
  /** multiplies the automatic h0 (e.g. 0.5 for a finer core) */
  h0Factor?: number;
  /** cap on the size; default: a quarter of the smallest domain extent */
  hmaxNm?: number;
  /** grading exponent; default 2(p+2)/(2p+3) */
  exponent?: number;
  /** order to grade for; default design.refinement.order */
  order?: 1 | 2;
  /** tolerance; default design.refinement.targetRelError */
  targetRelError?: number;
  /** multiplies the size h_E at electrode edges (default 1) */
  electrodeSizeFactor?: number;
  /** the size h_E at electrode edges in nm (overrides hmax/4 and electrodeSizeFactor) */
  electrodeEdgeNm?: number;
  /**
   * β_E of the electrode-edge grading (default electrodeEdgeExponent(order)); 1 gives
   * h = max(h_E, d) up to hmax, the strongest grading the field allows (see ElectrodeEdgeSpec)
   */
  electrodeEdgeExponent?: number;
}

function positive(name: string, v: number): number {
  if (!Number.isFinite(v) || !(v > 0)) throw new MeshError('bad-size-field', `size-field parameter ${name} must be a positive number, got ${v}`);
  return v;
}

export function sizeFieldFromDesign(design: Design, options: SizeFieldOptions = {}): { spec: SizeFieldSpec; params: SizeFieldParams } {
  const order = options.order ?? design.refinement.order;
  const tol = positive('targetRelError', options.targetRelError ?? design.refinement.targetRelError);
  const exponent = positive('exponent', options.exponent ?? gradingExponent(order));
  const ext = design.domain.halfExtentsNm;
  const hmaxNm = positive('hmaxNm', options.hmaxNm ?? (2 * Math.min(ext[0], ext[1], ext[2])) / 4);
  const factor = positive('h0Factor', options.h0Factor ?? 1);
  if (options.h0Nm !== undefined) positive('h0Nm', options.h0Nm);

  // group sites by (h0, a) so the per-tet test costs one pow per class, not per site
  const keyOf = new Map<string, number>(); // only used for lookup; classes keep first-appearance order
  const groups: { h0: number; a: number; pos: number[] }[] = [];
  for (const site of design.sites) {
    const a = positive('orbital radius', orbitalLength(resolveOrbital(site)));
    const h0 = options.h0Nm ?? factor * autoCoreSize(a, tol, order);
    const key = `${h0}|${a}`;
    let g = keyOf.get(key);
    if (g === undefined) {
      g = groups.length;
      keyOf.set(key, g);
      groups.push({ h0, a, pos: [] });
    }
    groups[g].pos.push(site.position[0], site.position[1], site.position[2]);
  }
  const classes = groups.map((g) => ({ h0Nm: g.h0, coreRadiusNm: g.a, positions: Float64Array.from(g.pos) }));
  const spec: SizeFieldSpec = { exponent, hmaxNm, classes };
  const segments = electrodeEdgeSegments(design);
  let edgeParams: SizeFieldParams['electrodeEdges'];
  if (segments.length > 0) {
    const given = options.electrodeEdgeNm;
    const hNm = Math.min(
      hmaxNm,
      given !== undefined ? positive('electrodeEdgeNm', given) : (positive('electrodeSizeFactor', options.electrodeSizeFactor ?? 1) * hmaxNm) / ELECTRODE_EDGE_DIVISOR,
    );
    const edgeExponent = positive('electrodeEdgeExponent', options.electrodeEdgeExponent ?? electrodeEdgeExponent(order));
    // above 1 the size would outgrow the distance to the edge (common practice: at most h = d)
    if (edgeExponent > 1) throw new MeshError('bad-size-field', `size-field parameter electrodeEdgeExponent must be at most 1, got ${edgeExponent}`);
    spec.edges = { segments, hNm, exponent: edgeExponent };
    edgeParams = {
      segments: segments.length / 6,
      hNm,
      exponent: spec.edges.exponent,
      rule: `h = min(hmax, hE·max(1, d/hE)^βE), d = distance to the nearest electrode edge, βE = ${options.electrodeEdgeExponent !== undefined ? `${options.electrodeEdgeExponent} (given)` : '1 − (3/4)(2/3)/p'}, hE = ${given !== undefined ? `${given} nm (given)` : 'hmax/4'}`,
    };
  }
  const params: SizeFieldParams = {
    order,
    targetRelError: tol,
    exponent,
    hmaxNm,
    h0MinNm: classes.length ? Math.min(...classes.map((c) => c.h0Nm)) : hmaxNm,
    classes: classes.map((c) => ({ h0Nm: c.h0Nm, coreRadiusNm: c.coreRadiusNm, sites: c.positions.length / 3 })),
    rule:
      options.h0Nm !== undefined
        ? `h = min(hmax, h0·max(1, r/a)^β), h0 = ${options.h0Nm} nm (given)`
        : `h = min(hmax, h0·max(1, r/a)^β), h0 = ${factor === 1 ? '' : `${factor}·`}a·(tol/(${CORE_SAFETY_FACTOR}·C_p))^(1/2p) capped at a/2, C_1 = ${CORE_ERROR_CONSTANT[0]}, C_2 = ${CORE_ERROR_CONSTANT[1]}, β = 2(p+2)/(2p+3)`,
  };
  if (edgeParams) params.electrodeEdges = edgeParams;
  return { spec, params };
}

/* ------------------------------------------------------------------------------------------ */

/** squared distance from point p to the box [lo, hi] (0 inside) */
function boxDist2(px: number, py: number, pz: number, l0: number, l1: number, l2: number, u0: number, u1: number, u2: number): number {
  const dx = px < l0 ? l0 - px : px > u0 ? px - u0 : 0;
  const dy = py < l1 ? l1 - py : py > u1 ? py - u1 : 0;
  const dz = pz < l2 ? l2 - pz : pz > u2 ? pz - u2 : 0;
  return dx * dx + dy * dy + dz * dz;
}

/**
 * Uniform grid of site positions (CSR: cellStart, cellSites), so that "sites within reach R of a
 * box" visits only the grid cells overlapping the box grown by R. Few sites: a plain scan.
 */
class SiteGrid {
  readonly n: number;
  private readonly pos: Float64Array;
  private readonly useGrid: boolean;
  private readonly origin: number[] = [0, 0, 0];
  private readonly inv: number = 1;
  private readonly dims: number[] = [1, 1, 1];
  private readonly start: Uint32Array = new Uint32Array(0);
  private readonly ids: Uint32Array = new Uint32Array(0);

  constructor(pos: Float64Array) {
    this.pos = pos;
    this.n = pos.length / 3;
    this.useGrid = this.n > 32;
    if (!this.useGrid) return;
    const lo = [Infinity, Infinity, Infinity];
    const hi = [-Infinity, -Infinity, -Infinity];
    for (let i = 0; i < this.n; i++) {
      for (let a = 0; a < 3; a++) {
        lo[a] = Math.min(lo[a], pos[3 * i + a]);
        hi[a] = Math.max(hi[a], pos[3 * i + a]);
      }
    }
    const span = Math.max(hi[0] - lo[0], hi[1] - lo[1], hi[2] - lo[2], 1e-9);
    // About one site per cell, at most ~2n cells in total: start from the volume-filling size
    // span/∛n and halve while the grid stays within 2n cells, so that a flat array (span/√n) or a
    // row (span/n) also gets about one site per cell rather than tens; then grow back by 1.25 to
    // the smallest size within the bound. Exactness does not depend on the size, only the speed.
    let cell = span / Math.cbrt(this.n);
    const dimsOf = (c: number) => [0, 1, 2].map((a) => Math.floor((hi[a] - lo[a]) / c) + 1);
    const within = (c: number) => {
      const d = dimsOf(c);
      return d[0] * d[1] * d[2] <= 2 * this.n + 8;
    };
    while (cell > 1e-9 && within(cell / 2)) cell /= 2;
    while (!within(cell)) cell *= 1.25;
    const d = dimsOf(cell);
    this.origin = lo;
    this.inv = 1 / cell;
    this.dims = d;
    const nc = d[0] * d[1] * d[2];
    const start = new Uint32Array(nc + 1);
    const cellOf = new Uint32Array(this.n);
    for (let i = 0; i < this.n; i++) {
      const c = this.cellIndex(pos[3 * i], pos[3 * i + 1], pos[3 * i + 2]);
      cellOf[i] = c;
      start[c + 1]++;
    }
    for (let c = 0; c < nc; c++) start[c + 1] += start[c];
    const fill = start.slice(0, nc);
    const ids = new Uint32Array(this.n);
    for (let i = 0; i < this.n; i++) ids[fill[cellOf[i]]++] = i; // increasing site index within a cell
    this.start = start;
    this.ids = ids;
  }

  private clampCell(a: number, x: number): number {
    const c = Math.floor((x - this.origin[a]) * this.inv);
    return c < 0 ? 0 : c >= this.dims[a] ? this.dims[a] - 1 : c;
  }

  private cellIndex(x: number, y: number, z: number): number {
    return this.clampCell(0, x) + this.dims[0] * (this.clampCell(1, y) + this.dims[1] * this.clampCell(2, z));
  }

  /**
   * Smallest squared distance from the box [l, u] to a site closer than R (Infinity when none).
   * With `any`, returns as soon as one site closer than R is found.
   *
   * Grid search in Chebyshev rings of cells around the cells the box overlaps: every cell of ring
   * k is at least (k − 1)·cell away from the box along some axis, so the search stops as soon as
   * that bound reaches min(R, best so far). A query far from all sites then costs a few rings, not
   * a scan of every site.
   *
   *        k=2 k=2 k=2 k=2 k=2
   *        k=2 k=1 k=1 k=1 k=2
   *        k=2 k=1 box k=1 k=2      (in 3D the rings are hollow cubes of cells)
   *        k=2 k=1 k=1 k=1 k=2
   *        k=2 k=2 k=2 k=2 k=2
   */
  minDist2(l0: number, l1: number, l2: number, u0: number, u1: number, u2: number, R: number, any: boolean): number {
    let best = R * R;
    let found = false;
    const pos = this.pos;
    if (!this.useGrid) {
      for (let q = 0; q < pos.length; q += 3) {
        const d2 = boxDist2(pos[q], pos[q + 1], pos[q + 2], l0, l1, l2, u0, u1, u2);
        if (d2 < best) {
          best = d2;
          found = true;
          if (any) return best;
        }
      }
      return found ? best : Infinity;
    }
    const [dx, dy, dz] = this.dims;
    const i0 = this.clampCell(0, l0), i1 = this.clampCell(0, u0);
    const j0 = this.clampCell(1, l1), j1 = this.clampCell(1, u1);
    const k0 = this.clampCell(2, l2), k1 = this.clampCell(2, u2);
    const cell = 1 / this.inv;
    const start = this.start;
    const ids = this.ids;
    const maxRing = Math.max(i0, dx - 1 - i1, j0, dy - 1 - j1, k0, dz - 1 - k1);
    // Separation of the query box from the grid's extent along each axis (0 where they overlap):
    // a query far above a flat array is that far from every cell, whatever the ring.
    const o0 = this.origin[0], o1 = this.origin[1], o2 = this.origin[2];
    const s0 = Math.max(0, o0 - u0, l0 - (o0 + dx * cell));
    const s1 = Math.max(0, o1 - u1, l1 - (o1 + dy * cell));
    const s2 = Math.max(0, o2 - u2, l2 - (o2 + dz * cell));
    const S = s0 * s0 + s1 * s1 + s2 * s2;
    for (let ring = 0; ring <= maxRing; ring++) {
      if (ring > 0) {
        // Every cell of ring k lies outside the block of ring k − 1 along some axis, on a side where
        // cells exist: along that axis it is at least as far as that block's face (and as the grid),
        // along the others at least as far as the grid. The smallest such bound over axes and sides
        // bounds the whole ring from below.
        let lb = Infinity;
        let g = 0;
        let v = 0;
        if (i0 - ring >= 0) { g = Math.max(s0, l0 - (o0 + (i0 - ring + 1) * cell)); v = g * g + S - s0 * s0; if (v < lb) lb = v; }
        if (i1 + ring <= dx - 1) { g = Math.max(s0, o0 + (i1 + ring) * cell - u0); v = g * g + S - s0 * s0; if (v < lb) lb = v; }
        if (j0 - ring >= 0) { g = Math.max(s1, l1 - (o1 + (j0 - ring + 1) * cell)); v = g * g + S - s1 * s1; if (v < lb) lb = v; }
        if (j1 + ring <= dy - 1) { g = Math.max(s1, o1 + (j1 + ring) * cell - u1); v = g * g + S - s1 * s1; if (v < lb) lb = v; }
        if (k0 - ring >= 0) { g = Math.max(s2, l2 - (o2 + (k0 - ring + 1) * cell)); v = g * g + S - s2 * s2; if (v < lb) lb = v; }
        if (k1 + ring <= dz - 1) { g = Math.max(s2, o2 + (k1 + ring) * cell - u2); v = g * g + S - s2 * s2; if (v < lb) lb = v; }
        if (lb >= best) break;
      }
      const a0 = i0 - ring, a1 = i1 + ring;
      const b0 = j0 - ring, b1 = j1 + ring;
      const c0 = k0 - ring, c1 = k1 + ring;
      for (let k = Math.max(c0, 0); k <= Math.min(c1, dz - 1); k++) {
        const kEdge = ring === 0 || k === c0 || k === c1; // ring 0 is the whole block
        for (let j = Math.max(b0, 0); j <= Math.min(b1, dy - 1); j++) {
          const jEdge = kEdge || j === b0 || j === b1;
          const row = dx * (j + dy * k);
          // inside the hollow ring only the two end cells of a row belong to it
          const step = jEdge ? 1 : a1 - a0;
          for (let i = a0; i <= a1; i += step) {
            if (i < 0 || i >= dx) continue;
            const c = row + i;
            for (let s = start[c]; s < start[c + 1]; s++) {
              const q = 3 * ids[s];
              const d2 = boxDist2(pos[q], pos[q + 1], pos[q + 2], l0, l1, l2, u0, u1, u2);
              if (d2 < best) {
                best = d2;
                found = true;
                if (any) return best;
              }
            }
          }
        }
      }
    }
    return found ? best : Infinity;
  }
}

interface RuntimeClass {
  h0: number;
  a: number;
  grid: SiteGrid;
  /** distance beyond which this class's h exceeds hmax: a (hmax/h0)^{1/β} */
  reachMax: number;
}

/**
 * Evaluator of a size field. All queries are conservative in the sense the mesher needs: over a
 * box they return the minimum of h over that box (distances are measured to the box, not to a
 * point in it), so a tet that passes the test passes it everywhere inside.
 */
export class SizeField {
  readonly exponent: number;
  readonly hmax: number;
  private readonly invExponent: number;
  private readonly classes: RuntimeClass[];
  /** per class: reach for the last longest edge seen by tooLarge (−1: no refinement) */
  private readonly reach: Float64Array;
  private lastL2 = -1;
  /** electrode edges: segments, h_E, 1/β_E, β_E and the reach where h_E(d) passes hmax (0: none) */
  private readonly edgeSeg: Float64Array;
  private readonly edgeH: number;
  private readonly edgeExp: number;
  private readonly edgeInvExp: number;
  private readonly edgeReachMax: number;

  constructor(spec: SizeFieldSpec) {
    this.exponent = positive('exponent', spec.exponent);
    this.hmax = positive('hmaxNm', spec.hmaxNm);
    this.invExponent = 1 / this.exponent;
    this.classes = spec.classes
      .filter((c) => c.positions.length > 0)
      .map((c) => {
        const h0 = positive('h0Nm', c.h0Nm);
        const a = positive('coreRadiusNm', c.coreRadiusNm);
        return { h0, a, grid: new SiteGrid(c.positions), reachMax: h0 < this.hmax ? a * Math.pow(this.hmax / h0, this.invExponent) : 0 };
      });
    this.reach = new Float64Array(this.classes.length);
    const e = spec.edges;
    this.edgeSeg = e ? e.segments : new Float64Array(0);
    this.edgeH = e ? positive('electrode edge size', e.hNm) : 0;
    this.edgeExp = e ? positive('electrode edge exponent', e.exponent) : 1;
    this.edgeInvExp = 1 / this.edgeExp;
    this.edgeReachMax = e && this.edgeH < this.hmax ? this.edgeH * Math.pow(this.hmax / this.edgeH, this.edgeInvExp) : 0;
  }

  /** squared distance from the box [l, u] to the nearest electrode edge segment (both are boxes: exact) */
  private edgeDist2(l0: number, l1: number, l2: number, u0: number, u1: number, u2: number): number {
    const s = this.edgeSeg;
    let best = Infinity;
    for (let k = 0; k < s.length; k += 6) {
      const g0 = Math.max(0, l0 - Math.max(s[k], s[k + 3]), Math.min(s[k], s[k + 3]) - u0);
      const g1 = Math.max(0, l1 - Math.max(s[k + 1], s[k + 4]), Math.min(s[k + 1], s[k + 4]) - u1);
      const g2 = Math.max(0, l2 - Math.max(s[k + 2], s[k + 5]), Math.min(s[k + 2], s[k + 5]) - u2);
      const d2 = g0 * g0 + g1 * g1 + g2 * g2;
      if (d2 < best) best = d2;
    }
    return best;
  }

  /** min of h over the box [l, u] */
  minOverBox(l0: number, l1: number, l2: number, u0: number, u1: number, u2: number): number {
    let h = this.hmax;
    for (const c of this.classes) {
      if (c.reachMax <= 0) continue;
      const d2 = c.grid.minDist2(l0, l1, l2, u0, u1, u2, c.reachMax, false);
      if (d2 === Infinity) continue;
      const r = Math.sqrt(d2);
      const hc = r <= c.a ? c.h0 : c.h0 * Math.pow(r / c.a, this.exponent);
      if (hc < h) h = hc;
    }
    if (this.edgeReachMax > 0) {
      const r = Math.sqrt(this.edgeDist2(l0, l1, l2, u0, u1, u2));
      if (r < this.edgeReachMax) {
        const he = r <= this.edgeH ? this.edgeH : this.edgeH * Math.pow(r / this.edgeH, this.edgeExp);
        if (he < h) h = he;
      }
    }
    return h;
  }

  valueAt(x: number, y: number, z: number): number {
    return this.minOverBox(x, y, z, x, y, z);
  }

  /**
   * Marking rule: bisect while the longest edge L exceeds min of h over the tet's bounding box.
   * For one class, h0·max(1, d/a)^β < L  ⇔  L > h0 and d < a·(L/h0)^{1/β}: one pow per class,
   * then a "any site closer than R" query.
   */
  readonly tooLarge: TooLarge = (coords, tets, t) => {
    const b = 4 * t;
    const p0 = 3 * tets[b];
    const p1 = 3 * tets[b + 1];
    const p2 = 3 * tets[b + 2];
    const p3 = 3 * tets[b + 3];
    const x0 = coords[p0], y0 = coords[p0 + 1], z0 = coords[p0 + 2];
    const x1 = coords[p1], y1 = coords[p1 + 1], z1 = coords[p1 + 2];
    const x2 = coords[p2], y2 = coords[p2 + 1], z2 = coords[p2 + 2];
    const x3 = coords[p3], y3 = coords[p3 + 1], z3 = coords[p3 + 2];
    let dx = x1 - x0, dy = y1 - y0, dz = z1 - z0;
    let L2 = dx * dx + dy * dy + dz * dz;
    let e;
    dx = x2 - x0; dy = y2 - y0; dz = z2 - z0; e = dx * dx + dy * dy + dz * dz; if (e > L2) L2 = e;
    dx = x3 - x0; dy = y3 - y0; dz = z3 - z0; e = dx * dx + dy * dy + dz * dz; if (e > L2) L2 = e;
    dx = x2 - x1; dy = y2 - y1; dz = z2 - z1; e = dx * dx + dy * dy + dz * dz; if (e > L2) L2 = e;
    dx = x3 - x1; dy = y3 - y1; dz = z3 - z1; e = dx * dx + dy * dy + dz * dz; if (e > L2) L2 = e;
    dx = x3 - x2; dy = y3 - y2; dz = z3 - z2; e = dx * dx + dy * dy + dz * dz; if (e > L2) L2 = e;
    const hmax = this.hmax;
    if (L2 > hmax * hmax) return true;
    const classes = this.classes;
    // Bisection produces few distinct edge lengths (3 per halving for cubic cells), and
    // consecutive tets often share one: remember the reaches of the last L² instead of pow again.
    const reach = this.reach;
    if (L2 !== this.lastL2) {
      const L = Math.sqrt(L2);
      for (let i = 0; i < classes.length; i++) {
        const c = classes[i];
        reach[i] = L <= c.h0 ? -1 : c.a * Math.pow(L / c.h0, this.invExponent);
      }
      this.lastL2 = L2;
    }
    for (let i = 0; i < classes.length; i++) {
      const c = classes[i];
      const R = reach[i];
      if (R < 0) continue;
      const l0 = Math.min(x0, x1, x2, x3), u0 = Math.max(x0, x1, x2, x3);
      const l1 = Math.min(y0, y1, y2, y3), u1 = Math.max(y0, y1, y2, y3);
      const l2 = Math.min(z0, z1, z2, z3), u2 = Math.max(z0, z1, z2, z3);
      if (c.grid.minDist2(l0, l1, l2, u0, u1, u2, R, true) !== Infinity) return true;
    }
    // electrode edges: h_E(d) < L ⇔ L > h_E and d < h_E·(L/h_E)^{1/β_E}
    if (this.edgeReachMax > 0) {
      const L = Math.sqrt(L2);
      if (L > this.edgeH) {
        const R = this.edgeH * Math.pow(L / this.edgeH, this.edgeInvExp);
        const l0 = Math.min(x0, x1, x2, x3), u0 = Math.max(x0, x1, x2, x3);
        const l1 = Math.min(y0, y1, y2, y3), u1 = Math.max(y0, y1, y2, y3);
        const l2 = Math.min(z0, z1, z2, z3), u2 = Math.max(z0, z1, z2, z3);
        if (this.edgeDist2(l0, l1, l2, u0, u1, u2) < R * R) return true;
      }
    }
    return false;
  };
}
