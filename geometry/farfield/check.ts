/**
 * The far-field check of a design: how much the domain's boundary condition can err in
 * U_i and V_ij, before any mesh exists.
 *
 * Physics (maximum principle). In a homogeneous medium the difference between the potential
 * computed in the domain and the free-space potential is harmonic inside, so it is at most
 * its largest magnitude on the boundary, where it equals the neglected far field n_i (see
 * envelope.ts). For a unit charge inside the box, |ΔU_i| ≤ max_∂Ω |n_i| =: δ_i.
 * Pairs: grounded — the box Green's function is symmetric, so ΔV_ij is bounded by both δ_i and
 * δ_j: we use min(δ_i, δ_j). Multipole — the error depends on which density carries the
 * boundary data, so we use max(δ_i, δ_j), valid whichever way the solver computes V_ij.
 * δ_i ≤ envelope_i(d_i) with d_i the distance from site i to the nearest face.
 * Energies: eV = COULOMB_EV_NM · δ / εr; relative to U_i = COULOMB_EV_NM·selfEnergy/εr and
 * V_ij = COULOMB_EV_NM·pairEnergy/εr (closed form where one exists, else the point-charge 1/R).
 * Per-site bounds are for the site's own orbital (what U of an added electron would see),
 * whatever its electron count.
 * Not covered by the bound: density outside the box (reported separately as chargeOutside),
 * discretisation error, a non-homogeneous medium.
 *
 * Recommended box: each site needs a clearance D_i with envelope_i(D_i) ≤ tol·min(U_i, V_ij
 * over its pairs) (bisection, envelope non-increasing) and with at most tol/10 of its density
 * beyond D_i (the density-cut warning threshold); the smallest half-extents about the
 * current centre are then h_k = max_i(|p_ik − c_k| + D_i) — exact for this bound, per axis.
 * (For grounded pairs we ask both ends to meet the target, slightly more than min() needs.)
 *
 * Pairs: all pairs up to `allPairsLimit` sites (default 64), otherwise the bond-graph edges
 * plus pairs inside a cluster. Cost O(N) besides the bond graph (O(N log N)).
 */
import type { Design, Orbital, Vec3 } from '../design/types';
import { resolveOrbital } from '../design/presets';
import { COULOMB_EV_NM } from '../units';
import { chargeOutsideBox, orbitalKey, orbitalModel, pairEnergy, profileRadius, selfEnergy } from '../density';
import { bondPairs, DEFAULT_SHELL_FACTOR } from '../arrays/bonds';
import { latticeOffsetNm } from '../lattice';
import { clearanceFor, neglectedEnvelope, type Envelope } from './envelope';
import { combinedMoments, orbitalMoments } from './moments';
import { closeSitePairs } from './close-pairs';
import { describeBoundary, elementBudgetWarning, findingsWarnings, pairsLimitedWarning } from './warnings';
import {
  ImageEffectCollector,
  isLayered,
  LAYERED_ASSUMPTIONS,
  layeredContext,
  layeredSiteBound,
  nearElectrode,
  pairImage,
  siteImage,
  siteProfile,
  type BoundKind,
  type BoundReason,
  type ImageEffectReport,
} from './layered';

/** Stable warning codes: the UI and scripts may key on them; never rename, only add. */
export const WARNING_CODES = [
  'site-outside-domain',
  'boundary-too-close',
  'density-cut',
  'sites-coincide',
  'sites-overlap',
  'off-lattice',
  'anisotropic-envelope',
  'no-electrons',
  'pairs-limited',
  'element-budget',
  'no-sites',
  'orbital-too-small',
  'orbital-too-large',
] as const;
export type WarningCode = (typeof WARNING_CODES)[number];

export interface FarFieldWarning {
  code: WarningCode;
  severity: 'error' | 'warning' | 'info';
  message: string;
  siteIds: string[];
}

export interface SiteBound {
  id: string;
  /** fraction of the site's unit density outside the domain */
  chargeOutside: number;
  /** bound on |ΔU_i| in eV; null when the site is not strictly inside the domain */
  uBoundEv: number | null;
  uRelBound: number | null;
  /** the site's on-site energy in this model (eV), the denominator of uRelBound */
  uEv: number;
  /** distance from the site to the nearest face (nm); ≤ 0 outside */
  clearanceNm: number;
  /** clearance this site needs for the tolerance (nm) */
  requiredClearanceNm: number;
  /**
   * Layered hosts and electrodes only (absent in a homogeneous host, where every bound is
   * rigorous): whether uBoundEv is a rigorous bound or an estimate, and why (layered.ts).
   */
  boundKind?: BoundKind;
  boundReason?: BoundReason;
}

export interface PairBound {
  a: string;
  b: string;
  distanceNm: number;
  /** the pair's V in this model (eV): the closed-form overlap integral where one exists, else e²/(4πε R) */
  vEv: number;
  /** which of the two vEv is: exact for two Gaussians or two equal 1s densities, a point-charge value otherwise */
  vModel: 'closed-form' | 'point-charge';
  vBoundEv: number | null;
  vRelBound: number | null;
}

export interface FarFieldReport {
  boundary: string;
  tolerance: number;
  sites: SiteBound[];
  pairs: PairBound[];
  /** largest relative bound over sites and pairs; null when some site is not inside */
  worstRelBound: number | null;
  recommendedHalfExtentsNm: Vec3;
  /** element count the refinement would need for the recommended box, when an estimator is given */
  elementsEstimate: number | null;
  /**
   * true when the estimator stopped at its cap: the real count is more than elementsEstimate
   * (a lower bound), which the check reports instead of integrating on
   */
  elementsEstimateIsLowerBound: boolean;
  warnings: FarFieldWarning[];
  /**
   * Multipole moments Q_lm (l ≤ 4, real solid harmonics in Racah normalisation, the order of
   * geometry/farfield/harmonics.ts) about `center`, when asked for: of each site's unit density
   * and of the whole array (weights = electrons).
   */
  moments?: { center: Vec3; order: number; values: number[]; sites: { id: string; values: number[] }[] };
  assumptions: string[];
  /**
   * With layers or electrodes: the worst image-charge effect on U and V against an infinite host
   * of host.epsilonR, over the check's pairs (layered.ts). Absent otherwise.
   */
  imageEffect?: ImageEffectReport;
}

export interface FarFieldOptions {
  /** all pairs up to this many sites, bond-graph pairs above (default 64) */
  allPairsLimit?: number;
  /** bond-graph pruning factor (default 1.2, see geometry/arrays/bonds.ts) */
  shellFactor?: number;
  /**
   * hook for the mesh issue: the element count the refinement would need for given half-extents,
   * or { elements, atLeast } when the estimator stopped at a cap and elements is a lower bound
   */
  estimateElements?: (halfExtentsNm: Vec3) => number | { elements: number; atLeast: boolean };
  /** include the multipole moments up to order 4 of every site and of the array */
  moments?: boolean;
  /** the centre the moments are taken about (default: the domain centre) */
  momentsCenter?: Vec3;
}

export const ALL_PAIRS_LIMIT = 64;

/**
 * The check's results in flat columns (one entry per site, one per checked pair), with what the
 * report says besides its rows. farFieldCheck builds its SiteBound and PairBound objects from
 * these (siteBoundAt, pairBoundAt); a caller with 10⁵ sites that only prints or sums rows (the
 * CLI) reads them one at a time instead of holding 4·10⁵ objects.
 */
export interface FarFieldColumns {
  head: Omit<FarFieldReport, 'sites' | 'pairs'>;
  /** eV per nm⁻¹: COULOMB_EV_NM / εr */
  ev: number;
  siteIds: readonly string[];
  sites: {
    count: number;
    chargeOutside: Float64Array;
    /** δ_i (nm⁻¹), the bound for a unit charge; Infinity when the site is not strictly inside */
    delta: Float64Array;
    /** the site's self energy (nm⁻¹; U in the stack with layers or electrodes) */
    self: Float64Array;
    clearanceNm: Float64Array;
    requiredClearanceNm: Float64Array;
    /** layered hosts and electrodes only (null otherwise): each site's bound kind and reason */
    boundKind: readonly BoundKind[] | null;
    boundReason: readonly BoundReason[] | null;
  };
  pairs: {
    count: number;
    /** site indices of each pair */
    i: Int32Array;
    j: Int32Array;
    distanceNm: Float64Array;
    /** V in nm⁻¹ (closed form, or 1/R; in the stack with layers or electrodes) */
    v: Float64Array;
    /** 1 when the free-space V has a closed form, 0 for the point-charge value */
    closedForm: Uint8Array;
    /** the pair's δ (min or max of the sites' δ); not finite: no bound */
    delta: Float64Array;
  };
}

/** Row i of the report's sites, as farFieldCheck gives it. */
export function siteBoundAt(c: FarFieldColumns, i: number): SiteBound {
  const s = c.sites;
  const inside = s.clearanceNm[i] > 0;
  const row: SiteBound = {
    id: c.siteIds[i],
    chargeOutside: s.chargeOutside[i],
    uBoundEv: inside ? c.ev * s.delta[i] : null,
    uRelBound: inside ? s.delta[i] / s.self[i] : null,
    uEv: c.ev * s.self[i],
    clearanceNm: s.clearanceNm[i],
    requiredClearanceNm: s.requiredClearanceNm[i],
  };
  if (s.boundKind && s.boundReason) {
    row.boundKind = s.boundKind[i];
    row.boundReason = s.boundReason[i];
  }
  return row;
}

/** Row t of the report's pairs, as farFieldCheck gives it. */
export function pairBoundAt(c: FarFieldColumns, t: number): PairBound {
  const p = c.pairs;
  const dl = p.delta[t];
  const v = p.v[t];
  const bounded = Number.isFinite(dl);
  return {
    a: c.siteIds[p.i[t]],
    b: c.siteIds[p.j[t]],
    distanceNm: p.distanceNm[t],
    vEv: c.ev * v,
    vModel: p.closedForm[t] ? 'closed-form' : 'point-charge',
    vBoundEv: bounded ? c.ev * dl : null,
    vRelBound: bounded ? dl / v : null,
  };
}

/** The report with its rows as objects, from the columns (keys in the order farFieldCheck has always had). */
export function reportFromColumns(c: FarFieldColumns): FarFieldReport {
  const sites: SiteBound[] = new Array(c.sites.count);
  for (let i = 0; i < sites.length; i++) sites[i] = siteBoundAt(c, i);
  const pairs: PairBound[] = new Array(c.pairs.count);
  for (let t = 0; t < pairs.length; t++) pairs[t] = pairBoundAt(c, t);
  const { head } = c;
  const report: FarFieldReport = {
    boundary: head.boundary,
    tolerance: head.tolerance,
    sites,
    pairs,
    worstRelBound: head.worstRelBound,
    recommendedHalfExtentsNm: head.recommendedHalfExtentsNm,
    elementsEstimate: head.elementsEstimate,
    elementsEstimateIsLowerBound: head.elementsEstimateIsLowerBound,
    warnings: head.warnings,
    assumptions: head.assumptions,
  };
  if (head.imageEffect) report.imageEffect = head.imageEffect;
  if (head.moments) report.moments = head.moments;
  return report;
}

/**
 * Plausible orbital sizes (radiusNm, radiusZNm, sigmaNm) for the envelope models, outside which
 * check warns (the schema refuses only what no atom can have, see server/contracts/design.ts).
 * Below a hundredth of the lattice constant (0.0054 nm in silicon) an envelope would sit inside
 * one atom's core, where the effective-mass picture behind every model here does not hold
 * (it needs envelopes spanning many unit cells: Kohn & Luttinger 1955, from memory). Above 100 nm,
 * 40 times the default donor envelope of 2.5 nm, no bound shallow-donor state in silicon is that
 * large (ground-state radii are 1–3 nm, from memory); the schema's ceiling is 1 µm, so a
 * warning at a micron could never fire (common practice).
 */
export const ORBITAL_MIN_LATTICE_FRACTION = 0.01;
export const ORBITAL_MAX_PLAUSIBLE_NM = 100;

/** the lengths a user gave for an orbital model */
export function orbitalSizes(o: Orbital): number[] {
  return orbitalModel(o).sizes(o);
}

/** What the orbital-too-small / orbital-too-large warnings need, gathered site by site (check and session alike). */
export interface OrbitalSizeFindings {
  tooSmall: string[];
  tooLarge: string[];
  smallest: number;
  largest: number;
  minPlausible: number;
}

export function orbitalSizeFindings(latticeConstantNm: number): { findings: OrbitalSizeFindings; add(id: string, o: Orbital): void } {
  const findings: OrbitalSizeFindings = { tooSmall: [], tooLarge: [], smallest: Infinity, largest: 0, minPlausible: ORBITAL_MIN_LATTICE_FRACTION * latticeConstantNm };
  return {
    findings,
    add(id, o) {
      const sizes = orbitalSizes(o);
      const lo = Math.min(...sizes), hi = Math.max(...sizes);
      if (lo < findings.minPlausible) {
        findings.tooSmall.push(id);
        findings.smallest = Math.min(findings.smallest, lo);
      }
      if (hi > ORBITAL_MAX_PLAUSIBLE_NM) {
        findings.tooLarge.push(id);
        findings.largest = Math.max(findings.largest, hi);
      }
    },
  };
}

export const MODEL_ASSUMPTIONS = [
  'Homogeneous host with the design\'s relative permittivity; no interfaces, gates or screening.',
  'Each site is a fixed, normalised model density (hydrogenic, anisotropic single-valley or Gaussian envelope); species defaults are model assumptions you can override.',
  'Bounds cover only the boundary condition (maximum principle); discretisation error and density cut by the boundary are reported separately.',
  'Every site carries a like unit charge: for a boron acceptor (a hole) the sign of V with a donor electron is reversed, and its envelope is the donor one, a placeholder.',
  'All figures are estimates to be confirmed by your group\'s own validated methods before any fabrication or design decision.',
];

function dist(p: readonly number[], q: readonly number[]): number {
  const dx = p[0] - q[0], dy = p[1] - q[1], dz = p[2] - q[2];
  return Math.sqrt(dx * dx + dy * dy + dz * dz);
}

/**
 * Clearance a site needs: the bound's clearance for its target, and room enough that at most
 * tol/10 of the density lies beyond it (rigorous: the box holds the stretched ball of radius
 * clearance / largest radius). Targets are rounded down to 1/256 of a binary octave before the
 * bisection so that sites with nearly equal targets share one search (a lower target only
 * asks for more room: conservative, by < 0.3 % in the target).
 */
export function requiredClearance(o: Orbital, okey: string, env: Envelope, target: number, tol: number, cache: ClearanceCache): number {
  const q = target > 0 ? Math.pow(2, Math.floor(Math.log2(target) * 256) / 256) : 0;
  let entry = cache.get(okey);
  if (!entry) {
    entry = { density: profileRadius(o) * clearanceFor(orbitalModel(o).profileTail, tol / 10), byTarget: new Map() };
    cache.set(okey, entry);
  }
  const hit = entry.byTarget.get(q);
  if (hit !== undefined) return hit;
  const req = Math.max(clearanceFor(env, q), entry.density);
  entry.byTarget.set(q, req);
  return req;
}

/**
 * Clearances found so far, per orbital key: the density clearance, and the bound's clearance per
 * rounded target (numeric keys: no string is built per site).
 */
export type ClearanceCache = Map<string, { density: number; byTarget: Map<number, number> }>;

export function farFieldCheck(design: Design, options: FarFieldOptions = {}): FarFieldReport {
  return reportFromColumns(farFieldColumns(design, options));
}

/** The far-field check (see the header), its rows in columns. */
export function farFieldColumns(design: Design, options: FarFieldOptions = {}): FarFieldColumns {
  const eps = design.host.epsilonR;
  const a = design.host.latticeConstantNm;
  const tol = design.refinement.targetRelError;
  const { center, halfExtentsNm: half, boundary } = design.domain;
  const ev = COULOMB_EV_NM / eps;
  const sites = design.sites;
  const n = sites.length;
  const warnings: FarFieldWarning[] = [];

  // ---- per site
  const orbitals: Orbital[] = new Array(n);
  const orbitalKeys: string[] = new Array(n);
  const envs: Envelope[] = new Array(n);
  const delta = new Float64Array(n);
  const self = new Float64Array(n);
  const clear = new Float64Array(n);
  const target = new Float64Array(n);
  const envByKey = new Map<string, Envelope>();
  // sites without an orbital of their own share their species' preset object: key, envelope and
  // self energy are then those of the site before (no key string built per site)
  let lastOrbital: Orbital | null = null;
  let lastKey = '';
  let lastEnv: Envelope | null = null;
  let lastSelf = 0;
  for (let i = 0; i < n; i++) {
    const s = sites[i];
    const o = resolveOrbital(s);
    orbitals[i] = o;
    if (o !== lastOrbital) {
      const key = orbitalKey(o);
      let env = envByKey.get(key);
      if (!env) {
        env = neglectedEnvelope(o, boundary);
        envByKey.set(key, env);
      }
      lastOrbital = o;
      lastKey = key;
      lastEnv = env;
      lastSelf = selfEnergy(o);
    }
    const env = lastEnv as Envelope;
    orbitalKeys[i] = lastKey;
    envs[i] = env;
    let d = Infinity;
    for (let k = 0; k < 3; k++) d = Math.min(d, half[k] - Math.abs(s.position[k] - center[k]));
    clear[i] = d;
    delta[i] = d > 0 ? env(d) : Infinity;
    self[i] = lastSelf;
    target[i] = tol * self[i];
  }

  // ---- layered host or electrodes: the stack's bound and U in the stack (layered.ts). Values stay
  // in the units of the homogeneous path (εr = host, ×ev for eV), so everything below is shared.
  const layered = isLayered({ layers: design.host.layers, electrodes: design.electrodes });
  const electrodes = design.electrodes ?? [];
  const ctx = layered ? layeredContext({ epsilonR: eps, layers: design.host.layers, electrodes, domain: design.domain }, Float64Array.from(sites, (s) => s.position[2])) : null;
  const collector = ctx ? new ImageEffectCollector(ctx, electrodes, design.domain) : null;
  const kinds: BoundKind[] = [];
  const reasons: BoundReason[] = [];
  if (ctx && collector) {
    for (let i = 0; i < n; i++) {
      const site = { position: sites[i].position, orbital: orbitals[i] };
      const img = siteImage(ctx, site);
      collector.site(i, img, nearElectrode(electrodes, site));
      const b = layeredSiteBound(ctx, sites[i].position, siteProfile(orbitals[i], boundary), envs[i], boundary, img.leak);
      delta[i] = b.delta * eps;
      kinds[i] = b.kind;
      reasons[i] = b.reason;
      if (img.uEv !== null) {
        self[i] = img.uEv / ev;
        target[i] = tol * self[i];
      }
    }
  }

  // ---- pairs
  let pairI: Int32Array;
  let pairJ: Int32Array;
  if (n <= (options.allPairsLimit ?? ALL_PAIRS_LIMIT)) {
    pairI = new Int32Array((n * (n - 1)) / 2);
    pairJ = new Int32Array(pairI.length);
    let t = 0;
    for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) {
      pairI[t] = i;
      pairJ[t++] = j;
    }
  } else {
    const pos = new Float64Array(3 * n);
    for (let i = 0; i < n; i++) for (let k = 0; k < 3; k++) pos[3 * i + k] = sites[i].position[k];
    ({ I: pairI, J: pairJ } = bondPairs(pos, { groups: sites.map((s) => s.cluster), shellFactor: options.shellFactor ?? DEFAULT_SHELL_FACTOR }));
    warnings.push(pairsLimitedWarning(n));
  }
  // one row per checked pair in pre-sized columns (no object per pair: 3·10⁵ of them at 10⁵ sites)
  const np = pairI.length;
  const colI = new Int32Array(np);
  const colJ = new Int32Array(np);
  const colR = new Float64Array(np);
  const colV = new Float64Array(np);
  const colExact = new Uint8Array(np);
  const colDelta = new Float64Array(np);
  let m = 0;
  const coincide: string[] = [];
  const overlap: string[] = [];
  const grounded = boundary.kind === 'grounded';
  for (let t = 0; t < np; t++) {
    const i = pairI[t], j = pairJ[t];
    const si = sites[i], sj = sites[j];
    const R = dist(si.position, sj.position);
    if (R < 1e-6) {
      coincide.push(si.id, sj.id);
      continue;
    }
    const exact = pairEnergy(orbitals[i], orbitals[j], R);
    let v = exact ?? 1 / R;
    if (ctx && collector) {
      const img = pairImage(ctx, { position: si.position, orbital: orbitals[i] }, { position: sj.position, orbital: orbitals[j] });
      collector.pair(t, i, img);
      if (img.vEv !== null) v = img.vEv / ev;
    }
    colI[m] = i;
    colJ[m] = j;
    colR[m] = R;
    colV[m] = v;
    colExact[m] = exact === null ? 0 : 1;
    colDelta[m] = grounded ? Math.min(delta[i], delta[j]) : Math.max(delta[i], delta[j]);
    m++;
    target[i] = Math.min(target[i], tol * v);
    target[j] = Math.min(target[j], tol * v);
  }
  closeSitePairs(sites, a, coincide, overlap);

  // ---- site results, recommended box
  const chargeOut = new Float64Array(n);
  const required = new Float64Array(n);
  const rec: Vec3 = n === 0 ? [half[0], half[1], half[2]] : [0, 0, 0];
  const outside: string[] = [];
  const cut: string[] = [];
  let worstCut = 0;
  const tooClose: string[] = [];
  const noElectrons: string[] = [];
  const offLattice: string[] = [];
  const aniso: string[] = [];
  const sizes = orbitalSizeFindings(a);
  let worst = 0;
  const reqCache: ClearanceCache = new Map();
  for (let i = 0; i < n; i++) {
    const s = sites[i];
    const inside = clear[i] > 0;
    // the bound's clearance, and enough room that at most tol/10 of the density is cut off
    // (rigorous: the box holds the stretched ball of radius clearance / largest radius)
    const req = requiredClearance(orbitals[i], orbitalKeys[i], envs[i], target[i], tol, reqCache);
    for (let k = 0; k < 3; k++) rec[k] = Math.max(rec[k], Math.abs(s.position[k] - center[k]) + req);
    const co = chargeOutsideBox(orbitals[i], s.position, center, half);
    chargeOut[i] = co;
    required[i] = req;
    if (!inside) outside.push(s.id);
    else {
      worst = Math.max(worst, delta[i] / self[i]);
      if (delta[i] / self[i] > tol) tooClose.push(s.id);
    }
    if (inside && co > tol / 10) {
      cut.push(s.id);
      if (co > worstCut) worstCut = co;
    }
    if (s.electrons === 0) noElectrons.push(s.id);
    if (orbitalModel(orbitals[i]).singleValley) aniso.push(s.id);
    sizes.add(s.id, orbitals[i]);
    if (latticeOffsetNm(s.position, a) > 1e-6) offLattice.push(s.id);
  }
  for (let t = 0; t < m; t++) {
    const dl = colDelta[t];
    if (!Number.isFinite(dl)) continue;
    const rel = dl / colV[t];
    worst = Math.max(worst, rel);
    if (rel > tol) tooClose.push(sites[colI[t]].id, sites[colJ[t]].id);
  }
  warnings.push(
    ...findingsWarnings({
      siteCount: n, boundary, tolerance: tol, latticeConstantNm: a, worst, recommended: rec,
      outside, tooClose, cut, worstCut, coincide, overlap, offLattice, aniso, noElectrons,
      ...sizes.findings,
    }),
  );
  let elementsEstimate: number | null = null;
  let elementsEstimateIsLowerBound = false;
  if (options.estimateElements && rec.every(Number.isFinite)) {
    const e = options.estimateElements(rec);
    elementsEstimate = typeof e === 'number' ? e : e.elements;
    elementsEstimateIsLowerBound = typeof e !== 'number' && e.atLeast;
    const budget = elementBudgetWarning(elementsEstimate, design.refinement.maxElements, elementsEstimateIsLowerBound);
    if (budget) warnings.push(budget);
  }
  const head: FarFieldColumns['head'] = {
    boundary: describeBoundary(boundary),
    tolerance: tol,
    worstRelBound: outside.length ? null : worst,
    recommendedHalfExtentsNm: rec,
    elementsEstimate,
    elementsEstimateIsLowerBound,
    warnings,
    assumptions: layered ? LAYERED_ASSUMPTIONS : MODEL_ASSUMPTIONS,
  };
  if (collector) head.imageEffect = collector.report(sites.map((s) => s.id), (t) => [sites[pairI[t]].id, sites[pairJ[t]].id]);
  if (options.moments) {
    const c: Vec3 = options.momentsCenter ? [...options.momentsCenter] : [center[0], center[1], center[2]];
    const vals = combinedMoments(
      sites.map((s, i) => ({ orbital: orbitals[i], position: s.position, weight: s.electrons })),
      c,
      4,
    );
    head.moments = {
      center: c,
      order: 4,
      values: Array.from(vals),
      sites: sites.map((s, i) => ({ id: s.id, values: Array.from(orbitalMoments(orbitals[i], s.position, c, 4)) })),
    };
  }
  return {
    head,
    ev,
    siteIds: sites.map((s) => s.id),
    sites: {
      count: n, chargeOutside: chargeOut, delta, self, clearanceNm: clear, requiredClearanceNm: required,
      boundKind: layered ? kinds : null, boundReason: layered ? reasons : null,
    },
    pairs: { count: m, i: colI.subarray(0, m), j: colJ.subarray(0, m), distanceNm: colR.subarray(0, m), v: colV.subarray(0, m), closedForm: colExact.subarray(0, m), delta: colDelta.subarray(0, m) },
  };
}
