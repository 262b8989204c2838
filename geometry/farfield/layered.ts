/**
 * The far-field check in a layered host and with electrodes (issue 11): the boundary bound of
 * each site from the image series of the planar stack, and the image-charge effect on U and V.
 *
 * Bound (maximum principle). The operator −∇·(ε∇·) with piecewise constant ε obeys the weak
 * maximum principle (it holds for divergence-form operators with bounded measurable
 * coefficients: Gilbarg & Trudinger, Elliptic PDE of Second Order, Thm 8.1, from memory), so the
 * error e = φ − φ_box of a site's potential in the domain box is at most max over the walls of
 * |e|, which is what the box's boundary condition drops there:
 *   grounded    e = φ on the walls, φ = Σ_k c_k ψ(|x − X_k|)/ε_s: the images of a spherical (or
 *               z-mirror-symmetric) density wholly inside its layer are copies of it at the image
 *               points X_k on the vertical through the site (Jackson 3rd ed. §4.4, planar images).
 *   multipole   the boundary values are the site's multipole expansion up to the box's order
 *               carried through the stack's image series (geometry/fem/boundary.ts
 *               layeredBoundaryValues: each image is the density copied or mirrored in z, with
 *               its moments mirrored alike), so e = Σ_k c_k (ψ_k − M_k)/ε_s with M_k the
 *               expansion of image k to that order, each term at most the homogeneous neglected
 *               envelope (envelope.ts) of the same order at its distance (the envelope is a
 *               maximum over directions of a z-symmetric density, so it holds for mirror images).
 * Per wall piece (a face cut at every interface, so one region of the stack holds it) each term
 * is bounded on its own: the image point lies outside the observation region, so its height above
 * the piece is monotone and the piece's two ends give the nearest and farthest heights; a positive
 * term takes its upper bound at the nearest point, a negative one its lower bound at the farthest.
 * Adding the series' rigorous truncation bound (geometry/host/images.ts) makes the figure a
 * rigorous bound for densities inside their layers ('rigorous', reason 'image-series').
 *
 * Grounded finite electrodes (gates, leads that do not span the cross-section) only lower the
 * Green's function (domain monotonicity: a grounded conductor removes room, and G_D ≤ G_D′ for
 * D ⊂ D′ by the same maximum principle), so the stack's bound still holds for them. With a
 * multipole box they change the true far field the boundary values leave out: 'estimated',
 * reason 'electrode-not-plane'.
 * Estimated elsewhere, and how:
 *   density-leaks        a share above LEAK_NOTICE of the density lies across an interface: the
 *                        same figure, but the image construction is then an approximation
 *   too-many-interfaces  no closed form (> 2 interfaces between the nearest metals): the
 *   layers-invalid       homogeneous bound with the smallest εr of the stack (common practice)
 *
 * Image-charge effect: ΔU_i and ΔV_ij against an infinite host of the design's host.epsilonR
 * (the silicon host, issue 11), with geometry/host's layeredEnergy; the same split as
 * geometry/host/effect.ts `imageChargeEffect` (a test keeps the two equal), per site and per
 * pair so the live session can recompute only what an edit changed.
 */
import type { Boundary, Electrode, HostLayer, Orbital, Vec3 } from '../design/types';
import { hostStack, imageSeries, layeredEnergy, type HostCode, type HostFinding, type ImageOptions, type ImageSeries, type LayeredEnergy, type PlanarStack } from '../host';
import { orbitalModel, orbitalScale, pairEnergy, radialPotential, selfEnergy } from '../density';
import { COULOMB_EV_NM } from '../units';
import { neglectedEnvelope, type Envelope } from './envelope';

export type BoundKind = 'rigorous' | 'estimated';
/** Why a bound is what it is (stable codes; words in the CLI and the app). */
export type BoundReason = 'image-series' | 'density-leaks' | 'electrode-not-plane' | 'too-many-interfaces' | 'layers-invalid';

/** Codes of the image-effect findings: geometry/host's codes and the electrode checks of this file. */
export type ImageFindingCode =
  | HostCode
  | 'electrode-outside-domain' // the electrode box misses the domain box: clipped to nothing
  | 'electrode-clipped' // part of the electrode box lies outside the domain box (value: share of its volume kept)
  | 'site-near-electrode'; // a site within NEAR_ELECTRODE_SCALES orbital sizes of an electrode (value: distance, nm)

export interface ImageFinding {
  code: ImageFindingCode;
  /** site, electrode or layer index, by code (README "check") */
  index?: number;
  value?: number;
}

/** `FarFieldReport.imageEffect` (absent without layers and electrodes); relative numbers are fractions. */
export interface ImageEffectReport {
  /** largest |ΔU/U| against the infinite host, and its site id; null when no site has a closed form */
  worstURel: number | null;
  worstUSite: string | null;
  worstVRel: number | null;
  worstVPair: [string, string] | null;
  /** largest truncation bound of the image series over all figures (eV) */
  tailBoundEv: number;
  /** largest share of a density across an interface (size of the point-image approximation) */
  maxLeak: number;
  findings: ImageFinding[];
}

/** A site closer than this many orbital sizes to an electrode gets `site-near-electrode` (common practice). */
export const NEAR_ELECTRODE_SCALES = 3;
/** Share of a density across an interface above which the bound is called estimated (geometry/host LEAK_NOTICE, 0.1 %). */
export const BOUND_LEAK_LIMIT = 1e-3;
/** Series tolerance of the bound and the image effect (nm⁻¹; as geometry/host/effect.ts, common practice). */
export const LAYERED_TOLERANCE_NM1 = 1e-9;
/** Heights are evaluated this far inside a wall piece (nm), more than geometry/host's ON_INTERFACE_NM. */
const NUDGE_NM = 2e-9;

export interface LayeredInput {
  epsilonR: number;
  layers?: readonly HostLayer[];
  electrodes?: readonly Electrode[];
  domain: { center: Vec3; halfExtentsNm: Vec3 };
}

/** Does the design need the layered path (layers or electrodes)? */
export function isLayered(input: { layers?: readonly unknown[]; electrodes?: readonly unknown[] }): boolean {
  return (input.layers?.length ?? 0) > 0 || (input.electrodes?.length ?? 0) > 0;
}

/** One piece of a wall: a face of the box, cut so that one region of the stack holds it. */
interface WallPiece {
  axis: 0 | 1 | 2;
  /** the face's coordinate along `axis` */
  coord: number;
  /** z range of the piece (equal for a top or bottom face) */
  zLo: number;
  zHi: number;
  /** heights the series is evaluated at, just inside the piece */
  zEvalLo: number;
  zEvalHi: number;
}

export interface LayeredContext {
  stack: PlanarStack | null;
  /** host findings of the stack itself (layers, planes) */
  stackFindings: HostFinding[];
  /** any electrode that is not a plane (finite gate or lead) */
  finiteElectrodes: boolean;
  /** smallest finite εr of the layers (the estimate's permittivity) */
  epsilonMin: number;
  hostEpsilonR: number;
  pieces: WallPiece[];
  center: Vec3;
  half: Vec3;
  options: ImageOptions;
  /** image series by heights, shared by every site of one height */
  series: Map<string, ReturnType<typeof imageSeries>>;
  /** the two series of every wall piece, by the site's height (undefined: not built yet) */
  pieceSeries: Map<number, ([ImageSeries, ImageSeries] | null | undefined)[]>;
}

export function layeredContext(input: LayeredInput, siteZ: ArrayLike<number>): LayeredContext {
  const built = hostStack({ epsilonR: input.epsilonR, layers: input.layers, electrodes: input.electrodes, domain: input.domain }, siteZ);
  const { center, halfExtentsNm: half } = input.domain;
  let epsilonMin = input.epsilonR;
  if (input.layers?.length) {
    epsilonMin = Infinity;
    for (const l of input.layers) if (Number.isFinite(l.epsilonR) && l.epsilonR > 0) epsilonMin = Math.min(epsilonMin, l.epsilonR);
    if (!Number.isFinite(epsilonMin)) epsilonMin = input.epsilonR;
  }
  const pieces: WallPiece[] = [];
  const stack = built.stack;
  if (stack) {
    const zLo = center[2] - half[2];
    const zHi = center[2] + half[2];
    const cuts = [zLo];
    for (const z of stack.interfaces) if (z > zLo && z < zHi) cuts.push(z);
    cuts.push(zHi);
    for (const axis of [0, 1] as const)
      for (const sgn of [-1, 1])
        for (let p = 0; p + 1 < cuts.length; p++) {
          const lo = cuts[p];
          const hi = cuts[p + 1];
          if (!(hi - lo > 4 * NUDGE_NM)) continue;
          pieces.push({ axis, coord: center[axis] + sgn * half[axis], zLo: lo, zHi: hi, zEvalLo: lo + NUDGE_NM, zEvalHi: hi - NUDGE_NM });
        }
    pieces.push({ axis: 2, coord: zLo, zLo, zHi: zLo, zEvalLo: zLo + NUDGE_NM, zEvalHi: zLo + NUDGE_NM });
    pieces.push({ axis: 2, coord: zHi, zLo: zHi, zHi, zEvalLo: zHi - NUDGE_NM, zEvalHi: zHi - NUDGE_NM });
  }
  return {
    stack,
    stackFindings: built.findings,
    finiteElectrodes: built.findings.some((f) => f.code === 'electrode-not-plane'),
    epsilonMin,
    hostEpsilonR: input.epsilonR,
    pieces,
    center: [center[0], center[1], center[2]],
    half: [half[0], half[1], half[2]],
    options: { toleranceNm1: LAYERED_TOLERANCE_NM1 },
    series: new Map(),
    pieceSeries: new Map(),
  };
}

/** Same stack and host εr: U, V and the image effect of one context hold for the other. */
export function sameStack(a: LayeredContext, b: LayeredContext): boolean {
  const s = a.stack, t = b.stack;
  if (!s || !t) return false;
  if (s.interfaces.length !== t.interfaces.length || a.hostEpsilonR !== b.hostEpsilonR) return false;
  for (let k = 0; k < s.interfaces.length; k++) if (s.interfaces[k] !== t.interfaces[k]) return false;
  for (let k = 0; k < s.epsilon.length; k++) if (s.epsilon[k] !== t.epsilon[k]) return false;
  return true;
}

/** Same stack, box and electrode kinds: the bounds of one context hold for the other. */
export function sameContext(a: LayeredContext, b: LayeredContext): boolean {
  if (!sameStack(a, b) || a.finiteElectrodes !== b.finiteElectrodes || a.epsilonMin !== b.epsilonMin) return false;
  for (let k = 0; k < 3; k++) if (a.center[k] !== b.center[k] || a.half[k] !== b.half[k]) return false;
  return true;
}

function regionOfZ(stack: PlanarStack, z: number): number {
  let k = 0;
  while (k < stack.interfaces.length && z > stack.interfaces[k]) k++;
  return k;
}

function seriesFor(ctx: LayeredContext, z0: number, z: number, maxRoundTrips?: number): ReturnType<typeof imageSeries> {
  const key = `${z0}|${z}|${maxRoundTrips ?? ''}`;
  let hit = ctx.series.get(key);
  if (!hit) {
    hit = imageSeries(ctx.stack!, z0, z, maxRoundTrips === undefined ? ctx.options : { ...ctx.options, maxRoundTrips });
    ctx.series.set(key, hit);
  }
  return hit;
}

/** The two series of a piece (at its lower and upper evaluation heights) with the same terms, or null; cached by height. */
function pieceSeries(ctx: LayeredContext, z0: number, q: number): [ImageSeries, ImageSeries] | null {
  let row = ctx.pieceSeries.get(z0);
  if (!row) {
    row = new Array(ctx.pieces.length);
    ctx.pieceSeries.set(z0, row);
  }
  let hit = row[q];
  if (hit === undefined) {
    hit = buildPieceSeries(ctx, z0, ctx.pieces[q]);
    row[q] = hit;
  }
  return hit;
}

function buildPieceSeries(ctx: LayeredContext, z0: number, piece: WallPiece): [ImageSeries, ImageSeries] | null {
  let a = seriesFor(ctx, z0, piece.zEvalLo).series;
  let b = piece.zEvalHi === piece.zEvalLo ? a : seriesFor(ctx, z0, piece.zEvalHi).series;
  if (!a || !b) return null;
  if (a.count !== b.count && a.roundTrips !== b.roundTrips) {
    // the plate series picks its length by height: cap both at the shorter (its bound stays rigorous)
    const cap = Math.min(a.roundTrips, b.roundTrips);
    a = seriesFor(ctx, z0, piece.zEvalLo, cap).series;
    b = seriesFor(ctx, z0, piece.zEvalHi, cap).series;
    if (!a || !b) return null;
  }
  if (a.count !== b.count || a.direct !== b.direct) return null;
  return [a, b];
}

/** What a site's potential is known to do at a distance: bounds for the grounded and multipole walls. */
export interface SiteProfile {
  /** upper bound of the potential (εr = 1, unit charge) over distances ≥ d */
  upper: Envelope;
  /** lower bound of the potential over distances ≤ d (0 where only positivity is known) */
  lower: Envelope;
  /** bound on the neglected part of a multipole wall over distances ≥ d */
  neglected: Envelope;
}

/**
 * The profile of an orbital for a boundary. The neglected envelope has the box's own order: the
 * layered multipole walls keep every order up to boundary.order (geometry/fem/boundary.ts), so
 * the check and the solver leave out the same part.
 */
export function siteProfile(o: Orbital, boundary: Boundary): SiteProfile {
  const grounded = neglectedEnvelope(o, { kind: 'grounded' });
  const spherical = orbitalModel(o).spherical;
  const order = boundary.kind === 'multipole' ? boundary.order : 0;
  return {
    upper: spherical ? (d) => radialPotential(o, Math.max(d, 0)) as number : grounded,
    lower: spherical ? (d) => radialPotential(o, Math.max(d, 0)) as number : () => 0,
    neglected: neglectedEnvelope(o, { kind: 'multipole', order }),
  };
}

export interface LayeredSiteBound {
  /** bound on |ΔU_i| in nm⁻¹ (1/ε included; × COULOMB_EV_NM for eV); Infinity when the site is outside */
  delta: number;
  kind: BoundKind;
  reason: BoundReason;
}

/**
 * A site's boundary bound in the stack. `homogeneous` is the envelope of the homogeneous check for
 * this boundary (εr = 1), used for the estimate where no closed form exists; `leak` the share of
 * the density across an interface (from layeredEnergy).
 */
export function layeredSiteBound(
  ctx: LayeredContext,
  position: Vec3,
  profile: SiteProfile,
  homogeneous: Envelope,
  boundary: Boundary,
  leak: number,
): LayeredSiteBound {
  const { center, half } = ctx;
  let dFace = Infinity;
  for (let k = 0; k < 3; k++) dFace = Math.min(dFace, half[k] - Math.abs(position[k] - center[k]));
  const grounded = boundary.kind === 'grounded';
  const fallback = (reason: BoundReason): LayeredSiteBound => ({ delta: dFace > 0 ? homogeneous(dFace) / ctx.epsilonMin : Infinity, kind: 'estimated', reason });
  if (!ctx.stack) return fallback('layers-invalid');
  if (!(dFace > 0)) return { delta: Infinity, kind: 'rigorous', reason: 'image-series' };
  const stack = ctx.stack;
  const z0 = position[2];
  // lateral distances from the site's vertical to each piece, nearest and farthest; the pieces are
  // visited nearest first, and a piece whose crude bound Σ|c_k|·U(nearest lateral distance) cannot
  // beat the worst so far is skipped (every term's distance is at least that, U is non-increasing)
  const np = ctx.pieces.length;
  const latMin = new Float64Array(np);
  const latMax = new Float64Array(np);
  const order = new Uint32Array(np);
  for (let q = 0; q < np; q++) {
    const piece = ctx.pieces[q];
    let mn = 0;
    let mx = 0;
    for (let k = 0; k < 2; k++) {
      if (k === piece.axis) {
        const d = piece.coord - position[k];
        mn += d * d;
        mx += d * d;
      } else {
        const lo = center[k] - half[k] - position[k];
        const hi = center[k] + half[k] - position[k];
        const near = lo > 0 ? lo : hi < 0 ? -hi : 0;
        const far = Math.max(Math.abs(lo), Math.abs(hi));
        mn += near * near;
        mx += far * far;
      }
    }
    latMin[q] = mn;
    latMax[q] = mx;
    order[q] = q;
  }
  order.sort((p, q) => latMin[p] - latMin[q] || p - q);
  let worst = 0;
  for (let o = 0; o < np; o++) {
    const q = order[o];
    const piece = ctx.pieces[q];
    if (stack.epsilon[regionOfZ(stack, piece.zEvalLo)] === Infinity) continue; // e = 0 in metal
    const both = pieceSeries(ctx, z0, q);
    if (!both) return fallback('too-many-interfaces');
    const [a, b] = both;
    const latMin2 = latMin[q];
    const latMax2 = latMax[q];
    if (worst > 0) {
      let sumAbs = 0;
      for (let k = 0; k < a.count; k++) sumAbs += Math.abs(a.coef[k]);
      const lat = Math.sqrt(latMin2);
      const crude = a.scale * sumAbs * (grounded ? profile.upper(lat) : profile.neglected(lat)) + Math.max(a.tailBound, b.tailBound);
      if (crude <= worst) continue;
    }
    let up = 0;
    let low = 0;
    for (let k = 0; k < a.count; k++) {
      let hMin: number;
      let hMax: number;
      if (k === a.direct) {
        hMin = z0 < piece.zLo ? piece.zLo - z0 : z0 > piece.zHi ? z0 - piece.zHi : 0;
        hMax = Math.max(Math.abs(piece.zLo - z0), Math.abs(piece.zHi - z0));
      } else {
        const ha = a.height[k];
        const hb = b.height[k];
        // an image lies outside the piece's region, so its height changes as fast as z does
        if (Math.abs(Math.abs(hb - ha) - (piece.zEvalHi - piece.zEvalLo)) > 1e-9 * (1 + ha + hb)) return fallback('too-many-interfaces');
        hMin = Math.max(0, Math.min(ha, hb) - NUDGE_NM);
        hMax = Math.max(ha, hb) + NUDGE_NM;
      }
      const c = a.coef[k];
      const dMin = Math.sqrt(latMin2 + hMin * hMin);
      const dMax = Math.sqrt(latMax2 + hMax * hMax);
      if (grounded) {
        if (c > 0) {
          up += c * profile.upper(dMin);
          low += c * profile.lower(dMax);
        } else {
          up += c * profile.lower(dMax);
          low += c * profile.upper(dMin);
        }
      } else {
        up += Math.abs(c) * profile.neglected(dMin);
      }
    }
    const value = a.scale * Math.max(Math.abs(up), Math.abs(low)) + Math.max(a.tailBound, b.tailBound);
    if (value > worst) worst = value;
  }
  if (leak > BOUND_LEAK_LIMIT) return { delta: worst, kind: 'estimated', reason: 'density-leaks' };
  if (!grounded && ctx.finiteElectrodes) return { delta: worst, kind: 'estimated', reason: 'electrode-not-plane' };
  return { delta: worst, kind: 'rigorous', reason: 'image-series' };
}

export interface SiteImage {
  /** U in the stack (eV) and ΔU against the infinite host, relative to the host's U; null without a closed form */
  uEv: number | null;
  relativeU: number | null;
  tailBoundEv: number;
  leak: number;
  findings: HostFinding[];
}

export interface PairImage {
  vEv: number | null;
  relativeV: number | null;
  tailBoundEv: number;
  findings: HostFinding[];
}

type Dens = { position: Vec3; orbital: Orbital };

/** U of one site in the stack and its change against the infinite host (the split of geometry/host/effect.ts). */
export function siteImage(ctx: LayeredContext, site: Dens): SiteImage {
  if (!ctx.stack) return { uEv: null, relativeU: null, tailBoundEv: 0, leak: 0, findings: [] };
  const r: LayeredEnergy = layeredEnergy(ctx.stack, site, site, ctx.options, ctx.series);
  if (r.energyEv === null) return { uEv: null, relativeU: null, tailBoundEv: 0, leak: r.leak, findings: r.findings };
  const host = ctx.hostEpsilonR;
  const self = selfEnergy(site.orbital);
  const u0 = (COULOMB_EV_NM / host) * self;
  const deltaU = (r.sourceEpsilonR === host ? 0 : COULOMB_EV_NM * self * (1 / r.sourceEpsilonR - 1 / host)) + r.reactionEv!;
  return { uEv: r.energyEv, relativeU: deltaU / u0, tailBoundEv: r.tailBoundEv, leak: r.leak, findings: r.findings };
}

/** V of one pair in the stack and its change against the infinite host. */
export function pairImage(ctx: LayeredContext, a: Dens, b: Dens): PairImage {
  if (!ctx.stack) return { vEv: null, relativeV: null, tailBoundEv: 0, findings: [] };
  const r = layeredEnergy(ctx.stack, a, b, ctx.options, ctx.series);
  const findings = r.findings.filter((f) => f.code !== 'density-leaks');
  if (r.energyEv === null) return { vEv: null, relativeV: null, tailBoundEv: 0, findings };
  const host = ctx.hostEpsilonR;
  const R = Math.hypot(b.position[0] - a.position[0], b.position[1] - a.position[1], b.position[2] - a.position[2]);
  const free = pairEnergy(a.orbital, b.orbital, R) ?? 1 / R;
  const v0 = (COULOMB_EV_NM / host) * free;
  const deltaV = (r.sourceEpsilonR === host ? 0 : COULOMB_EV_NM * free * (1 / r.sourceEpsilonR - 1 / host)) + r.reactionEv!;
  return { vEv: r.energyEv, relativeV: deltaV / v0, tailBoundEv: r.tailBoundEv, findings };
}

/** Electrode checks against the domain box: outside (clipped to nothing) or partly outside (clipped). */
export function electrodeFindings(electrodes: readonly Electrode[], domain: { center: Vec3; halfExtentsNm: Vec3 }): ImageFinding[] {
  const out: ImageFinding[] = [];
  electrodes.forEach((e, index) => {
    let kept = 1;
    for (let k = 0; k < 3; k++) {
      const lo = Math.max(e.minNm[k], domain.center[k] - domain.halfExtentsNm[k]);
      const hi = Math.min(e.maxNm[k], domain.center[k] + domain.halfExtentsNm[k]);
      kept *= Math.max(0, hi - lo) / (e.maxNm[k] - e.minNm[k]);
    }
    if (!(kept > 0)) out.push({ code: 'electrode-outside-domain', index });
    else if (kept < 1) out.push({ code: 'electrode-clipped', index, value: kept });
  });
  return out;
}

/** Distance (nm) from a point to an electrode box (0 inside). */
export function distanceToBox(p: Vec3, e: Electrode): number {
  let s = 0;
  for (let k = 0; k < 3; k++) {
    const d = p[k] < e.minNm[k] ? e.minNm[k] - p[k] : p[k] > e.maxNm[k] ? p[k] - e.maxNm[k] : 0;
    s += d * d;
  }
  return Math.sqrt(s);
}

/** The nearest electrode closer than NEAR_ELECTRODE_SCALES orbital sizes, or null. */
export function nearElectrode(electrodes: readonly Electrode[], site: Dens): { index: number; distanceNm: number } | null {
  const limit = NEAR_ELECTRODE_SCALES * orbitalScale(site.orbital);
  let best: { index: number; distanceNm: number } | null = null;
  electrodes.forEach((e, index) => {
    const d = distanceToBox(site.position, e);
    if (d < limit && (!best || d < best.distanceNm)) best = { index, distanceNm: d };
  });
  return best;
}

/**
 * Collects per-site and per-pair results into the report's `imageEffect`, in site order then pair
 * order, one finding per code and index (the first figure kept), as check.ts and the session both do.
 */
export class ImageEffectCollector {
  private worstU = -1;
  private worstURel = 0;
  private worstV = -1;
  private worstVRel = 0;
  private tail = 0;
  private leak = 0;
  private seen = new Set<string>();
  readonly findings: ImageFinding[] = [];

  constructor(ctx: LayeredContext, electrodes: readonly Electrode[], domain: { center: Vec3; halfExtentsNm: Vec3 }) {
    for (const f of electrodeFindings(electrodes, domain)) this.note(f);
    for (const f of ctx.stackFindings) this.note(f);
  }

  note(f: ImageFinding): void {
    const key = `${f.code}:${f.index ?? ''}`;
    if (this.seen.has(key)) return;
    this.seen.add(key);
    this.findings.push(f.index === undefined && f.value === undefined ? { code: f.code } : { ...f });
  }

  site(i: number, r: SiteImage, near: { index: number; distanceNm: number } | null): void {
    for (const f of r.findings) this.note({ code: f.code, index: i, value: f.value });
    if (near) this.note({ code: 'site-near-electrode', index: i, value: near.distanceNm });
    if (r.leak > this.leak) this.leak = r.leak;
    if (r.relativeU === null) return;
    if (r.tailBoundEv > this.tail) this.tail = r.tailBoundEv;
    if (this.worstU < 0 || Math.abs(r.relativeU) > Math.abs(this.worstURel)) {
      this.worstU = i;
      this.worstURel = r.relativeU;
    }
  }

  pair(t: number, i: number, r: PairImage): void {
    for (const f of r.findings) this.note({ code: f.code, index: i, value: f.value });
    if (r.relativeV === null) return;
    if (r.tailBoundEv > this.tail) this.tail = r.tailBoundEv;
    if (this.worstV < 0 || Math.abs(r.relativeV) > Math.abs(this.worstVRel)) {
      this.worstV = t;
      this.worstVRel = r.relativeV;
    }
  }

  report(siteIds: readonly string[], pairIds: (t: number) => [string, string]): ImageEffectReport {
    return {
      worstURel: this.worstU < 0 ? null : this.worstURel,
      worstUSite: this.worstU < 0 ? null : siteIds[this.worstU],
      worstVRel: this.worstV < 0 ? null : this.worstVRel,
      worstVPair: this.worstV < 0 ? null : pairIds(this.worstV),
      tailBoundEv: this.tail,
      maxLeak: this.leak,
      findings: this.findings,
    };
  }
}

/** The assumptions a layered or electrode design adds to the report (issue 11). */
export const LAYERED_ASSUMPTIONS = [
  'Layers are planar and infinite in x and y; each has one relative permittivity.',
  'Electrodes are ideal metal at a fixed voltage; a heavily doped lead is modelled as such a metal box.',
  'The image-charge figures treat the layers and the electrodes spanning the domain\'s x–y cross-section (metal planes) in closed form; other electrodes are left out of them and need a finite-element solve.',
  'Boundary bounds: grounded walls use the stack\'s image series (rigorous for densities inside their layer); multipole walls assume boundary values from the stack\'s own far field of each site\'s multipole expansion up to the box\'s order.',
  'Bounds cover only the boundary condition (maximum principle, which holds for piecewise constant εr); discretisation error and density cut by the boundary are reported separately. The recommended box comes from the homogeneous-host envelope.',
  'Each site is a fixed, normalised model density (hydrogenic, anisotropic single-valley or Gaussian envelope); species defaults are model assumptions you can override.',
  'Every site carries a like unit charge: for a boron acceptor (a hole) the sign of V with a donor electron is reversed, and its envelope is the donor one, a placeholder.',
  'All figures are estimates to be confirmed by your group\'s own validated methods before any fabrication or design decision.',
];
