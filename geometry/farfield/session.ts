/**
 * The far-field check with the design kept resident: the live panel sends edits as changes and
 * gets the report back, without the whole document crossing the worker boundary each time and
 * without recomputing what an edit cannot have changed.
 *
 * Same numbers as farFieldCheck (check.ts) on the resulting document — the invariant test in
 * tests/geometry/farfield/session.test.ts runs random edit sequences against it. What is kept
 * between updates, and what invalidates it:
 *   per site   orbital, self energy, envelope key, lattice test          the site's own edit, host
 *              clearance, δ_i, density outside the box                    the site's edit, domain
 *              required clearance (bisection)                            its target or the tolerance
 *              moments of the unit density (when asked for)              the site's edit, the centre
 *   pair set   all pairs (≤ allPairsLimit sites) or the bond graph       positions, clusters, site list
 *   close pairs  sites closer than a (close-pairs.ts, as check.ts)       kept in an index that follows each moved
 *                                                                     site; rebuilt on a new site list or lattice
 * Pair energies and bounds are cached per pair and recomputed when one of its sites or the box
 * changed. After a move (more sites than allPairsLimit) the bond pairs are taken from the kept
 * triangulation when it provably stays the one delaunator would return (geometry/arrays/
 * live-bonds.ts: no new triangulation, the distance rule applied again), otherwise from a full
 * rebuild; either way the same pairs as the full check.
 *
 * Report order and ties follow check.ts step by step; keep the two in step when either changes.
 */
import type { Design, Domain, Electrode, Host, Orbital, Refinement, Site, Vec3 } from '../design/types';
import { resolveOrbital } from '../design/presets';
import { COULOMB_EV_NM } from '../units';
import { chargeOutsideBox, orbitalKey, orbitalModel, pairEnergy, selfEnergy } from '../density';
import { DEFAULT_SHELL_FACTOR } from '../arrays/bonds';
import { LiveBondPairs } from '../arrays/live-bonds';
import { latticeOffsetNm } from '../lattice';
import { neglectedEnvelope, type Envelope } from './envelope';
import { harmonicCount } from './harmonics';
import { orbitalMoments } from './moments';
import { ALL_PAIRS_LIMIT, MODEL_ASSUMPTIONS, orbitalSizeFindings, requiredClearance, type ClearanceCache, type FarFieldOptions, type FarFieldReport, type PairBound, type SiteBound } from './check';
import { CloseSiteIndex } from './close-pairs';
import { describeBoundary, elementBudgetWarning, findingsWarnings, pairsLimitedWarning } from './warnings';
import {
  ImageEffectCollector,
  isLayered,
  LAYERED_ASSUMPTIONS,
  layeredContext,
  layeredSiteBound,
  nearElectrode,
  pairImage,
  sameContext,
  sameStack,
  siteImage,
  siteProfile,
  type LayeredContext,
  type LayeredSiteBound,
  type PairImage,
  type SiteImage,
} from './layered';

/**
 * Edits since the last update. Applied in this order: `removed` (by id), `upserted` (a site with
 * a known id replaces it in place, a new id is appended), then `order` (the full id order of the
 * sites, sent only when it differs from what removal and appending give), then the fields.
 */
export interface FarFieldChanges {
  removed?: string[];
  upserted?: Site[];
  order?: string[];
  name?: string;
  host?: Host;
  domain?: Domain;
  refinement?: Refinement;
  /** the design's electrodes (issue 11; [] or absent: none) */
  electrodes?: Electrode[];
}

/** Image series kept per layered context before the cache starts afresh (common practice). */
const SERIES_CACHE_LIMIT = 20_000;

/** FarFieldOptions, with the element estimator also given the current design. */
export type FarFieldSessionOptions = Omit<FarFieldOptions, 'estimateElements'> & {
  estimateElements?: (halfExtentsNm: Vec3, design: Design) => number;
};

export interface FarFieldSession {
  /** apply the edits and return the report of the resulting design (no element estimate) */
  applyChanges(changes: FarFieldChanges): FarFieldReport;
  /** the report of the current design (cached until the next change) */
  report(): FarFieldReport;
  /**
   * The report with the element estimate (options.estimateElements) and its budget warning,
   * exactly as farFieldCheck with the same options gives it. Kept separate because the estimate
   * can take longer than the bounds: the live panel shows the bounds first.
   */
  reportWithElements(): FarFieldReport;
  /** the resident design (do not mutate) */
  design(): Design;
}

interface SiteState {
  site: Site;
  orbital: Orbital;
  okey: string;
  self: number;
  offLattice: boolean;
  /** envelope for the current boundary; null when the boundary changed since */
  env: Envelope | null;
  /** domain stamp the box-dependent values belong to (−1: none yet) */
  boxStamp: number;
  clear: number;
  delta: number;
  chargeOutside: number;
  /** target and stamp (tolerance, boundary) the required clearance belongs to */
  reqTarget: number;
  reqStamp: number;
  req: number;
  /** moments about momentsCenter (when asked for) */
  moments: Float64Array | null;
  /** the last SiteBound given out, and the energy scale it was computed with */
  bound: SiteBound | null;
  boundEv: number;
  /** layered host or electrodes: the stack's bound for context `layStamp`, U for stack `imgStamp` (layered.ts) */
  layStamp: number;
  layBound: LayeredSiteBound | null;
  imgStamp: number;
  layImage: SiteImage | null;
  /** the nearest electrode within a few orbital sizes, for electrode set `nearStamp` */
  nearStamp: number;
  near: { index: number; distanceNm: number } | null;
  /** V of pairs with later sites in the stack, by the other site's state (stack stamp kept with each) */
  pairImages: WeakMap<SiteState, { stamp: number; image: PairImage }> | null;
}

function dist(p: readonly number[], q: readonly number[]): number {
  const dx = p[0] - q[0], dy = p[1] - q[1], dz = p[2] - q[2];
  return Math.sqrt(dx * dx + dy * dy + dz * dz);
}


const sameVec = (p: readonly number[], q: readonly number[]) => p[0] === q[0] && p[1] === q[1] && p[2] === q[2];

/** Copies of the document parts the session keeps, so the caller's later mutations cannot reach it. */
const copySite = (s: Site): Site => {
  const c: Site = { id: s.id, species: s.species, position: [s.position[0], s.position[1], s.position[2]], electrons: s.electrons };
  if (s.orbital !== undefined) c.orbital = { ...s.orbital };
  if (s.cluster !== undefined) c.cluster = s.cluster;
  return c;
};
const copyDomain = (e: Domain): Domain => {
  const d: Domain = { center: [...e.center], halfExtentsNm: [...e.halfExtentsNm], boundary: { ...e.boundary } };
  if (e.electrodeWalls !== undefined) d.electrodeWalls = e.electrodeWalls;
  return d;
};
const copyHost = (h: Host): Host => {
  const c: Host = { material: h.material, epsilonR: h.epsilonR, latticeConstantNm: h.latticeConstantNm };
  if (h.layers !== undefined) c.layers = h.layers.map((l) => ({ ...l }));
  return c;
};
const copyElectrodes = (list: readonly Electrode[]): Electrode[] => list.map((e) => ({ name: e.name, minNm: [...e.minNm], maxNm: [...e.maxNm], voltageV: e.voltageV }));
const sameJson = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);

export function createFarFieldSession(initial: Design, options: FarFieldSessionOptions = {}): FarFieldSession {
  let name = initial.name;
  let host: Host = copyHost(initial.host);
  let electrodes: Electrode[] = copyElectrodes(initial.electrodes ?? []);
  // layered host or electrodes: the context the bounds belong to (layStamp: stack, box, boundary),
  // the one the images belong to (imgStamp: stack only, so a box drag keeps U and V), and the
  // layered pair images by the PairBound object they were computed with
  let layCtx: LayeredContext | null = null;
  let layStamp = 0;
  let imgCtx: LayeredContext | null = null;
  let imgStamp = 0;
  // what the last context was built from (host, electrodes and domain are replaced, never mutated,
  // on a change; the metal planes depend on the sites only through their lowest and highest z)
  let freshCtx: LayeredContext | null = null;
  let freshKey: [Host, Electrode[], Domain, number, number] | null = null;
  let electrodesStamp = 0;
  const pairImages = new WeakMap<PairBound, PairImage>();
  // pair results are valid for one (box stamp, layered stamp): pairStamp counts those
  let pairStamp = 0;
  let pairStampBox = -1;
  let pairStampLay = -1;
  let layBoundaryKind = '';
  let layBoundaryOrder = -1;
  let domain: Domain = copyDomain(initial.domain);
  let refinement: Refinement = { ...initial.refinement };
  let states: SiteState[] = [];
  const limit = options.allPairsLimit ?? ALL_PAIRS_LIMIT;

  let boxStamp = 0;
  let reqStamp = 0;
  let envByKey = new Map<string, Envelope>();
  let reqCache: ClearanceCache = new Map();
  // pair set (site indices); null when it must be rebuilt
  let pairI: Int32Array | null = null;
  let pairJ: Int32Array | null = null;
  // after a move (site indices unchanged) the old pair set, whose cached results the rebuilt set
  // takes over pair by pair; null after a change of the site list
  let prevPairI: Int32Array | null = null;
  let prevPairJ: Int32Array | null = null;
  // per pair of the pair set: the PairBound given out last time, the two site states, box stamp
  // and energy scale it was computed from, and V in nm⁻¹ (for the targets)
  // (two sets of buffers, swapped at each rebuild of the pair set, so a rebuild allocates nothing
  // once they are large enough; entries past pairCount are stale)
  let pairCount = 0;
  let pairObj: (PairBound | null)[] = [];
  let pairStA: (SiteState | null)[] = [];
  let pairStB: (SiteState | null)[] = [];
  let pairV = new Float64Array(0);
  let pairBox = new Float64Array(0);
  let spare = { obj: [] as (PairBound | null)[], stA: [] as (SiteState | null)[], stB: [] as (SiteState | null)[], v: new Float64Array(0), box: new Float64Array(0) };
  let pairEv = NaN;
  // the bond graph, updated site by site while sites move (live-bonds.ts); movedSites lists the
  // sites moved since it last gave pairs, bondsStale asks for a full rebuild
  const bonds = new LiveBondPairs(options.shellFactor ?? DEFAULT_SHELL_FACTOR);
  let bondPos = new Float64Array(0);
  let movedSites: number[] = [];
  let bondsStale = true;
  // sites closer than a lattice constant, kept up to date site by site as sites move (null: scan
  // again, after a change of the site list or of the lattice constant); siteList is the array of
  // sites it reads, states[i].site
  let close: CloseSiteIndex | null = null;
  let siteList: Site[] = [];
  // site id → index in states (null: rebuild, after a change of the site list)
  let indexById: Map<string, number> | null = null;
  let cached: FarFieldReport | null = null;
  let cachedWithElements: FarFieldReport | null = null;
  let momentsCenterKey = '';

  const newState = (s: Site): SiteState => {
    const site = copySite(s);
    const orbital = resolveOrbital(site);
    const a = host.latticeConstantNm;
    return {
      site, orbital, okey: orbitalKey(orbital), self: selfEnergy(orbital),
      offLattice: latticeOffsetNm(site.position, a) > 1e-6,
      env: null, boxStamp: -1, clear: 0, delta: 0, chargeOutside: 0,
      reqTarget: NaN, reqStamp: -1, req: 0, moments: null, bound: null, boundEv: NaN,
      layStamp: -1, layBound: null, imgStamp: -1, layImage: null, nearStamp: -1, near: null, pairImages: null,
    };
  };
  const envFor = (st: SiteState): Envelope => {
    if (st.env) return st.env;
    let env = envByKey.get(st.okey);
    if (!env) {
      env = neglectedEnvelope(st.orbital, domain.boundary);
      envByKey.set(st.okey, env);
    }
    st.env = env;
    return env;
  };
  const structureChanged = () => {
    pairI = pairJ = null;
    prevPairI = prevPairJ = null;
    bondsStale = true;
    movedSites = [];
    close = null;
    indexById = null;
  };

  const reset = (d: Design) => {
    states = d.sites.map(newState);
    structureChanged();
  };
  reset(initial);

  function applyChanges(c: FarFieldChanges): FarFieldReport {
    let touched = false;
    if (c.electrodes && !sameJson(c.electrodes, electrodes)) {
      electrodes = copyElectrodes(c.electrodes);
      electrodesStamp++;
      touched = true;
    }
    if (c.host) {
      const h = c.host;
      if (h.epsilonR !== host.epsilonR || h.latticeConstantNm !== host.latticeConstantNm || h.material !== host.material || !sameJson(h.layers, host.layers)) {
        const latticeChanged = h.latticeConstantNm !== host.latticeConstantNm;
        host = copyHost(h);
        // the lattice test and the overlap window depend on the lattice constant
        if (latticeChanged) {
          states = states.map((st) => newState(st.site));
          close = null;
        }
        touched = true;
      }
    }
    if (c.removed?.length) {
      const gone = new Set(c.removed);
      const kept = states.filter((st) => !gone.has(st.site.id));
      if (kept.length !== states.length) {
        states = kept;
        structureChanged();
        touched = true;
      }
    }
    if (c.upserted?.length) {
      if (!indexById) {
        indexById = new Map();
        for (let i = 0; i < states.length; i++) indexById.set(states[i].site.id, i);
      }
      const at = indexById;
      for (const s of c.upserted) {
        const i = at.get(s.id);
        if (i === undefined) {
          states.push(newState(s));
          structureChanged();
          // appending keeps every earlier index: the map stays valid with the new site added
          at.set(s.id, states.length - 1);
          indexById = at;
        } else {
          const old = states[i].site;
          states[i] = newState(s);
          if (close) siteList[i] = states[i].site;
          if (!sameVec(old.position, s.position)) close?.move(i, old.position, siteList);
          if (!sameVec(old.position, s.position) || old.cluster !== s.cluster) {
            // the bond graph depends on positions and clusters; all pairs do not
            if (old.cluster !== s.cluster) bondsStale = true;
            else movedSites.push(i);
            if (states.length > limit && pairI && pairJ) {
              prevPairI = pairI;
              prevPairJ = pairJ;
              pairI = pairJ = null;
            }
          }
        }
        touched = true;
      }
    }
    if (c.order) {
      const byId = new Map(states.map((st) => [st.site.id, st] as const));
      if (c.order.length !== states.length || c.order.some((id) => !byId.has(id))) {
        throw new Error('far-field session: the new site order does not name the same sites');
      }
      if (c.order.some((id, i) => states[i].site.id !== id)) {
        states = c.order.map((id) => byId.get(id) as SiteState);
        structureChanged();
        touched = true;
      }
    }
    if (c.name !== undefined && c.name !== name) {
      name = c.name;
      touched = true;
    }
    if (c.domain) {
      const e = c.domain;
      if (e.boundary.kind !== domain.boundary.kind || (e.boundary.kind === 'multipole' && domain.boundary.kind === 'multipole' && e.boundary.order !== domain.boundary.order)) {
        // envelopes, and the clearances required of them, belong to one boundary
        envByKey = new Map();
        for (const st of states) st.env = null;
        reqStamp++;
        reqCache = new Map();
      }
      if (!sameVec(e.center, domain.center) || !sameVec(e.halfExtentsNm, domain.halfExtentsNm) || e.boundary.kind !== domain.boundary.kind || (e.boundary.kind === 'multipole' && domain.boundary.kind === 'multipole' && e.boundary.order !== domain.boundary.order)) {
        boxStamp++;
        touched = true;
      }
      domain = copyDomain(e);
    }
    if (c.refinement) {
      const r = c.refinement;
      if (r.targetRelError !== refinement.targetRelError) {
        reqStamp++;
        reqCache = new Map();
      }
      if (r.targetRelError !== refinement.targetRelError || r.maxElements !== refinement.maxElements || r.order !== refinement.order) touched = true;
      refinement = { ...r };
    }
    if (touched) cached = cachedWithElements = null;
    return report();
  }

  function currentDesign(): Design {
    const d: Design = {
      format: 'tetrawell-design',
      version: 2,
      name,
      host: copyHost(host),
      sites: states.map((st) => st.site),
      domain: copyDomain(domain),
      refinement: { ...refinement },
    };
    if (electrodes.length) d.electrodes = copyElectrodes(electrodes);
    return d;
  }

  function report(): FarFieldReport {
    if (cached) return cached;
    cached = compute();
    return cached;
  }

  function compute(): FarFieldReport {
    const eps = host.epsilonR;
    const a = host.latticeConstantNm;
    const tol = refinement.targetRelError;
    const { center, halfExtentsNm: half, boundary } = domain;
    const ev = COULOMB_EV_NM / eps;
    const n = states.length;
    const warnings: FarFieldReport['warnings'] = [];

    // ---- layered host or electrodes (layered.ts, as check.ts): a new context when the stack, the
    // box or the host changed; findings (planes straddled, electrodes clipped) are read afresh
    const layered = isLayered({ layers: host.layers, electrodes });
    let collector: ImageEffectCollector | null = null;
    if (layered) {
      let zLo = Infinity;
      let zHi = -Infinity;
      for (const st of states) {
        const z = st.site.position[2];
        if (z < zLo) zLo = z;
        if (z > zHi) zHi = z;
      }
      const k = freshKey;
      if (!freshCtx || !k || k[0] !== host || k[1] !== electrodes || k[2] !== domain || k[3] !== zLo || k[4] !== zHi) {
        freshCtx = layeredContext({ epsilonR: eps, layers: host.layers, electrodes, domain }, n ? [zLo, zHi] : []);
        freshKey = [host, electrodes, domain, zLo, zHi];
      }
      const fresh = freshCtx;
      if (!layCtx || !sameContext(layCtx, fresh) || boundary.kind !== layBoundaryKind || (boundary.kind === 'multipole' && boundary.order !== layBoundaryOrder)) {
        layCtx = fresh;
        layStamp++;
        layBoundaryKind = boundary.kind;
        layBoundaryOrder = boundary.kind === 'multipole' ? boundary.order : -1;
      }
      if (!imgCtx || !sameStack(imgCtx, fresh)) {
        imgCtx = fresh;
        imgStamp++;
      }
      // the image series by heights: bounded, so a long session of 3-D moves cannot grow it without end
      if (imgCtx.series.size > SERIES_CACHE_LIMIT) imgCtx.series.clear();
      if (layCtx.series.size > SERIES_CACHE_LIMIT) layCtx.series.clear();
      if (layCtx.pieceSeries.size > SERIES_CACHE_LIMIT) layCtx.pieceSeries.clear();
      collector = new ImageEffectCollector(fresh, electrodes, domain);
    } else if (layCtx) {
      layCtx = imgCtx = null;
      layStamp++;
      imgStamp++;
    }
    if (boxStamp !== pairStampBox || layStamp !== pairStampLay) {
      pairStamp++;
      pairStampBox = boxStamp;
      pairStampLay = layStamp;
    }

    // ---- per site: box-dependent values for sites whose stamp is old
    const target = new Float64Array(n);
    // the site's bound and U in the units of the homogeneous path (layered: the stack's, as check.ts)
    const delta = new Float64Array(n);
    const self = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const st = states[i];
      if (st.boxStamp !== boxStamp) {
        const p = st.site.position;
        let d = Infinity;
        for (let k = 0; k < 3; k++) d = Math.min(d, half[k] - Math.abs(p[k] - center[k]));
        st.clear = d;
        st.delta = d > 0 ? envFor(st)(d) : Infinity;
        st.chargeOutside = chargeOutsideBox(st.orbital, p, center, half);
        st.boxStamp = boxStamp;
        st.bound = null;
      }
      delta[i] = st.delta;
      self[i] = st.self;
      if (collector && layCtx && imgCtx) {
        const dens = { position: st.site.position, orbital: st.orbital };
        if (st.imgStamp !== imgStamp || !st.layImage) {
          st.layImage = siteImage(imgCtx, dens);
          st.imgStamp = imgStamp;
          st.layBound = null;
        }
        if (st.layStamp !== layStamp || !st.layBound) {
          st.layBound = layeredSiteBound(layCtx, st.site.position, siteProfile(st.orbital, boundary), envFor(st), boundary, st.layImage.leak);
          st.layStamp = layStamp;
          st.bound = null;
        }
        if (st.nearStamp !== electrodesStamp) {
          st.near = nearElectrode(electrodes, dens);
          st.nearStamp = electrodesStamp;
        }
        collector.site(i, st.layImage, st.near);
        delta[i] = st.layBound.delta * eps;
        if (st.layImage.uEv !== null) self[i] = st.layImage.uEv / ev;
      }
      target[i] = tol * self[i];
    }

    // ---- pairs
    if (!pairI || !pairJ) {
      if (n <= limit) {
        pairI = new Int32Array((n * (n - 1)) / 2);
        pairJ = new Int32Array(pairI.length);
        let t = 0;
        for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) {
          pairI[t] = i;
          pairJ[t++] = j;
        }
      } else {
        if (bondPos.length !== 3 * n) bondPos = new Float64Array(3 * n);
        let clustered = false;
        for (let i = 0; i < n; i++) {
          const p = states[i].site.position;
          bondPos[3 * i] = p[0];
          bondPos[3 * i + 1] = p[1];
          bondPos[3 * i + 2] = p[2];
          if (states[i].site.cluster !== undefined) clustered = true;
        }
        let found: { I: Int32Array; J: Int32Array } | null = null;
        if (!bondsStale && movedSites.length) {
          let local = true;
          for (const i of movedSites) if (!(local = bonds.moved(bondPos, i))) break;
          if (local) found = bonds.pairs();
        }
        // no labels at all gives the same nodes as a list of undefined labels (check.ts passes one)
        found ??= bonds.build(bondPos, clustered ? states.map((st) => st.site.cluster) : undefined);
        ({ I: pairI, J: pairJ } = found);
        movedSites = [];
        bondsStale = false;
      }
      carryPairs(pairI, pairJ);
    }
    if (ev !== pairEv) {
      pairBox.fill(-1);
      pairEv = ev;
    }
    if (n > limit) warnings.push(pairsLimitedWarning(n));
    let dropped = 0;
    const coincide: string[] = [];
    const overlap: string[] = [];
    const grounded = boundary.kind === 'grounded';
    for (let t = 0; t < pairI.length; t++) {
      const i = pairI[t], j = pairJ[t];
      const si = states[i], sj = states[j];
      let pb: PairBound | null;
      let v: number;
      if (pairStA[t] === si && pairStB[t] === sj && pairBox[t] === pairStamp) {
        pb = pairObj[t];
        v = pairV[t];
      } else {
        const R = dist(si.site.position, sj.site.position);
        if (R < 1e-6) {
          pb = null;
          v = NaN;
        } else {
          const exact = pairEnergy(si.orbital, sj.orbital, R);
          v = exact ?? 1 / R;
          let img: PairImage | null = null;
          if (collector && imgCtx) {
            // V in the stack does not depend on the box: kept per pair of site states and stack
            si.pairImages ??= new WeakMap();
            const hit = si.pairImages.get(sj);
            if (hit && hit.stamp === imgStamp) img = hit.image;
            else {
              img = pairImage(imgCtx, { position: si.site.position, orbital: si.orbital }, { position: sj.site.position, orbital: sj.orbital });
              si.pairImages.set(sj, { stamp: imgStamp, image: img });
            }
            if (img.vEv !== null) v = img.vEv / ev;
          }
          const dl = grounded ? Math.min(delta[i], delta[j]) : Math.max(delta[i], delta[j]);
          const bounded = Number.isFinite(dl);
          pb = { a: si.site.id, b: sj.site.id, distanceNm: R, vEv: ev * v, vModel: exact === null ? 'point-charge' : 'closed-form', vBoundEv: bounded ? ev * dl : null, vRelBound: bounded ? dl / v : null };
          if (img) pairImages.set(pb, img);
        }
        pairObj[t] = pb;
        pairStA[t] = si;
        pairStB[t] = sj;
        pairBox[t] = pairStamp;
        pairV[t] = v;
      }
      if (pb === null) {
        coincide.push(si.site.id, sj.site.id);
        dropped++;
        continue;
      }
      if (collector) {
        const img = pairImages.get(pb);
        if (img) collector.pair(t, i, img);
      }
      if (tol * v < target[i]) target[i] = tol * v;
      if (tol * v < target[j]) target[j] = tol * v;
    }

    // the report's list is a copy of the cache (a later update rewrites the cache in place)
    const pairs = (dropped ? pairObj.slice(0, pairCount).filter((pb) => pb !== null) : pairObj.slice(0, pairCount)) as PairBound[];

    // ---- close pairs (close-pairs.ts, shared with check.ts): the index is kept and follows each
    // moved site; which close pair counts as an overlap (clusters) is decided as it lists them
    if (!close) {
      siteList = states.map((st) => st.site);
      close = new CloseSiteIndex(siteList, a);
    }
    close.emit(coincide, overlap);

    // ---- site results, recommended box
    const out: SiteBound[] = new Array(n);
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
    for (let i = 0; i < n; i++) {
      const st = states[i];
      const s = st.site;
      const inside = st.clear > 0;
      if (st.reqStamp !== reqStamp || st.reqTarget !== target[i]) {
        st.req = requiredClearance(st.orbital, st.okey, envFor(st), target[i], tol, reqCache);
        st.reqTarget = target[i];
        st.reqStamp = reqStamp;
      }
      const req = st.req;
      for (let k = 0; k < 3; k++) rec[k] = Math.max(rec[k], Math.abs(s.position[k] - center[k]) + req);
      const co = st.chargeOutside;
      let sb = st.bound;
      if (!sb || st.boundEv !== ev || sb.requiredClearanceNm !== req || (sb.boundKind !== undefined) !== layered) {
        sb = {
          id: s.id,
          chargeOutside: co,
          uBoundEv: inside ? ev * delta[i] : null,
          uRelBound: inside ? delta[i] / self[i] : null,
          uEv: ev * self[i],
          clearanceNm: st.clear,
          requiredClearanceNm: req,
          ...(layered && st.layBound ? { boundKind: st.layBound.kind, boundReason: st.layBound.reason } : {}),
        };
        st.bound = sb;
        st.boundEv = ev;
      }
      out[i] = sb;
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
      if (orbitalModel(st.orbital).singleValley) aniso.push(s.id);
      sizes.add(s.id, st.orbital);
      if (st.offLattice) offLattice.push(s.id);
    }
    for (const p of pairs) {
      if (p.vRelBound === null) continue;
      worst = Math.max(worst, p.vRelBound);
      if (p.vRelBound > tol) tooClose.push(p.a, p.b);
    }
    warnings.push(
      ...findingsWarnings({
        siteCount: n, boundary, tolerance: tol, latticeConstantNm: a, worst, recommended: rec,
        outside, tooClose, cut, worstCut, coincide, overlap, offLattice, aniso, noElectrons,
        ...sizes.findings,
      }),
    );
    const r: FarFieldReport = {
      boundary: describeBoundary(boundary),
      tolerance: tol,
      sites: out,
      pairs,
      worstRelBound: outside.length ? null : worst,
      recommendedHalfExtentsNm: rec,
      elementsEstimate: null,
      elementsEstimateIsLowerBound: false,
      warnings,
      assumptions: layered ? LAYERED_ASSUMPTIONS : MODEL_ASSUMPTIONS,
    };
    if (collector) {
      const I = pairI!, J = pairJ!;
      r.imageEffect = collector.report(states.map((st) => st.site.id), (t) => [states[I[t]].site.id, states[J[t]].site.id]);
    }
    if (options.moments) r.moments = moments();
    return r;
  }

  /**
   * New per-pair caches for a rebuilt pair set. After a move the site indices are the same, so a
   * pair (i, j) found in the previous set keeps its cached result (looked up through the old
   * pairs grouped by i: a few per site); the cache still checks the two site states and the box.
   */
  function carryPairs(I: Int32Array, J: Int32Array): void {
    const m = I.length;
    if (spare.obj.length < m) {
      const cap = Math.ceil(m * 1.25);
      spare = { obj: new Array(cap).fill(null), stA: new Array(cap).fill(null), stB: new Array(cap).fill(null), v: new Float64Array(cap), box: new Float64Array(cap) };
    }
    const { obj, stA, stB, v: val, box } = spare;
    for (let t = 0; t < m; t++) {
      obj[t] = null;
      stA[t] = stB[t] = null;
      box[t] = -1;
    }
    const oldI = prevPairI, oldJ = prevPairJ;
    if (oldI && oldJ && oldI.length === pairCount) {
      const n = states.length;
      const start = new Uint32Array(n + 1);
      for (let t = 0; t < oldI.length; t++) start[oldI[t] + 1]++;
      for (let i = 0; i < n; i++) start[i + 1] += start[i];
      const fill = start.slice(0, n);
      const byI = new Uint32Array(oldI.length);
      for (let t = 0; t < oldI.length; t++) byI[fill[oldI[t]]++] = t;
      for (let t = 0; t < m; t++) {
        const i = I[t], j = J[t];
        for (let u = start[i]; u < start[i + 1]; u++) {
          const o = byI[u];
          if (oldJ[o] !== j) continue;
          obj[t] = pairObj[o];
          stA[t] = pairStA[o];
          stB[t] = pairStB[o];
          val[t] = pairV[o];
          box[t] = pairBox[o];
          break;
        }
      }
    }
    // the old buffers become the spare set for the next rebuild
    spare = { obj: pairObj, stA: pairStA, stB: pairStB, v: pairV, box: pairBox };
    pairObj = obj;
    pairStA = stA;
    pairStB = stB;
    pairV = val;
    pairBox = box;
    pairCount = m;
    prevPairI = prevPairJ = null;
  }

  /** Moments as check.ts gives them: per-site arrays cached, the array sum redone in site order. */
  function moments(): NonNullable<FarFieldReport['moments']> {
    const c: Vec3 = options.momentsCenter ? [...options.momentsCenter] : [domain.center[0], domain.center[1], domain.center[2]];
    const key = c.join(',');
    if (key !== momentsCenterKey) {
      for (const st of states) st.moments = null;
      momentsCenterKey = key;
    }
    const nh = harmonicCount(4);
    const total = new Float64Array(nh);
    const sites: { id: string; values: number[] }[] = [];
    for (const st of states) {
      if (!st.moments) st.moments = orbitalMoments(st.orbital, st.site.position, c, 4);
      const w = st.site.electrons;
      if (w !== 0) for (let i = 0; i < nh; i++) total[i] += w * st.moments[i];
      sites.push({ id: st.site.id, values: Array.from(st.moments) });
    }
    return { center: c, order: 4, values: Array.from(total), sites };
  }

  function reportWithElements(): FarFieldReport {
    if (cachedWithElements) return cachedWithElements;
    const r = report();
    if (!options.estimateElements || !r.recommendedHalfExtentsNm.every(Number.isFinite)) {
      cachedWithElements = r;
      return r;
    }
    cachedWithElements = withElementEstimate(r, options.estimateElements(r.recommendedHalfExtentsNm, currentDesign()), refinement.maxElements);
    return cachedWithElements;
  }

  return { applyChanges, report, reportWithElements, design: currentDesign };
}

/**
 * A report with an element estimate added as farFieldCheck adds it: `elementsEstimate`, and the
 * element-budget warning last when the estimate exceeds the budget. For callers that work out
 * the estimate elsewhere (the studio runs it in a second worker so the bounds stay live).
 */
export function withElementEstimate(
  r: FarFieldReport,
  estimate: number | { elements: number; atLeast: boolean },
  maxElements: number,
): FarFieldReport {
  const elements = typeof estimate === 'number' ? estimate : estimate.elements;
  const atLeast = typeof estimate !== 'number' && estimate.atLeast;
  const budget = elementBudgetWarning(elements, maxElements, atLeast);
  return { ...r, elementsEstimate: elements, elementsEstimateIsLowerBound: atLeast, warnings: budget ? [...r.warnings, budget] : r.warnings };
}
