/**
 * Planning a Coulomb run: which sites and pairs, their far-field bounds and density cuts (from the
 * far-field check), the part of the error no refinement reduces, and the nested a priori meshes
 * of the graded mode.
 */
import type { Design } from '../design/types';
import { resolveOrbital } from '../design/presets';
import { farFieldCheck, type FarFieldReport } from '../farfield';
import { meshDesign, refineUniform, toTetMesh, type MeshDesignOptions } from '../mesh/index';
import type { TetMesh } from '../mesh/types';
import { CoulombError, type CoulombOptions } from './coulomb-types';
import type { ActiveSite, SolveMethod } from './coulomb-level';
import { hasClosedForm, pairClosedForm } from './split';
import { clippedElectrodes, hasDevice, interfacesInside } from '../mesh/device';
import { autoCoreSize, CORE_SAFETY_FACTOR } from '../mesh/sizefield';
import { electrodeEdgeRule } from '../mesh/edge-rule';

export function activeSites(design: Design, siteIds?: string[]): ActiveSite[] {
  const byId = new Map(design.sites.map((s, i) => [s.id, i] as const));
  let idx: number[];
  if (siteIds) {
    idx = siteIds.map((id) => {
      const i = byId.get(id);
      if (i === undefined) throw new CoulombError('unknown-site', `there is no site "${id}" in the design`, { siteId: id });
      if (!(design.sites[i].electrons > 0)) {
        throw new CoulombError('no-electrons', `site "${id}" has no electrons (an ionised core), so it has no density and no on-site U; give it 1 or 2 electrons or leave it out`, { siteId: id });
      }
      return i;
    });
  } else {
    idx = [];
    design.sites.forEach((s, i) => {
      if (s.electrons > 0) idx.push(i);
    });
  }
  if (idx.length === 0) throw new CoulombError('no-sites', 'the design has no site with electrons: there is no density to compute U or V for');
  return idx.map((i) => ({ index: i, id: design.sites[i].id, orbital: resolveOrbital(design.sites[i]), position: design.sites[i].position }));
}

export interface Plan {
  sites: ActiveSite[];
  pairIdx: Int32Array;
  pairInfo: { a: string; b: string; distanceNm: number; boundEv: number; relBound: number }[];
  siteBound: number[];
  siteCut: number[];
  far: FarFieldReport;
  /** how every number is computed (chooseMethod) */
  method: SolveMethod;
}

export function plan(design: Design, opts: CoulombOptions): Plan {
  const sites = activeSites(design, opts.siteIds);
  const allPairsLimit = opts.pairs === 'all' ? Number.POSITIVE_INFINITY : opts.pairs === 'bond-graph' ? 0 : undefined;
  const far = farFieldCheck(design, allPairsLimit === undefined ? {} : { allPairsLimit });
  // Two sites at one position have no pair distance: V would be the self-energy of a shared
  // density, not an inter-site energy, and the pair drops out of the bond graph. Refuse rather
  // than print a table that silently lacks it.
  const coincide = far.warnings.find((w) => w.code === 'sites-coincide');
  if (coincide) {
    throw new CoulombError('sites-coincide', `sites ${coincide.siteIds.map((id) => `"${id}"`).join(', ')} sit at the same position: give each its own lattice site`, { siteIds: coincide.siteIds });
  }
  const boundById = new Map(far.sites.map((s) => [s.id, s] as const));
  const siteBound: number[] = [];
  const siteCut: number[] = [];
  for (const s of sites) {
    const b = boundById.get(s.id);
    if (!b || b.uBoundEv === null) {
      throw new CoulombError('site-outside', `site "${s.id}" is not strictly inside the domain: enlarge the box or move the site`, { siteId: s.id });
    }
    siteBound.push(b.uBoundEv);
    siteCut.push(b.chargeOutside);
  }
  const local = new Map(sites.map((s, k) => [s.id, k] as const));
  const pi: number[] = [];
  const pairInfo: Plan['pairInfo'] = [];
  if (opts.pairs !== 'none') {
    for (const p of far.pairs) {
      const i = local.get(p.a), j = local.get(p.b);
      if (i === undefined || j === undefined) continue;
      pi.push(i, j);
      pairInfo.push({ a: p.a, b: p.b, distanceNm: p.distanceNm, boundEv: p.vBoundEv ?? Infinity, relBound: p.vRelBound ?? Infinity });
    }
  }
  const pairIdx = Int32Array.from(pi);
  return { sites, pairIdx, pairInfo, siteBound, siteCut, far, method: chooseMethod(design, sites, pairIdx, opts) };
}

/**
 * The part of each number's relative error that refinement cannot reduce: the boundary bound
 * plus the density cut by the box (the same terms budgetsFrom adds: 2c for U, c_i + c_j for V).
 * Returns the largest over sites and pairs and which number it belongs to.
 */
export function irreducibleRelError(pl: Pick<Plan, 'sites' | 'siteCut' | 'pairIdx' | 'pairInfo' | 'far'>): { rel: number; what: string } {
  const boundById = new Map(pl.far.sites.map((s) => [s.id, s.uRelBound ?? Infinity] as const));
  let rel = 0;
  let what = 'no number';
  pl.sites.forEach((site, k) => {
    const r = (boundById.get(site.id) ?? Infinity) + 2 * pl.siteCut[k];
    if (r > rel) {
      rel = r;
      what = `U of ${site.id}`;
    }
  });
  pl.pairInfo.forEach((p, k) => {
    const r = p.relBound + pl.siteCut[pl.pairIdx[2 * k]] + pl.siteCut[pl.pairIdx[2 * k + 1]];
    if (r > rel) {
      rel = r;
      what = `V of ${p.a}–${p.b}`;
    }
  });
  return { rel, what };
}

/**
 * The nested a priori meshes of the graded mode, coarsest first, finest = the design's own mesh.
 * Coarser levels double the core size h0 (factor 2, 4, … up to 64) and are kept only when they
 * are really coarser (≤ 0.8× the unknowns-proxy vertices of the next level): where the size cap
 * hmax governs, doubling h0 changes nothing, and two identical "levels" would fake a converged
 * number. When no coarser distinct mesh exists, the finest is bisected uniformly three times
 * (h/2) and that refinement becomes the reported level instead.
 */
export function gradedFamily(design: Design, order: 1 | 2, levels: number, meshOpts: MeshDesignOptions): TetMesh[] {
  const base = meshOpts.h0Factor ?? 1;
  const finest = meshDesign(design, { order, ...meshOpts, h0Factor: base, keepBisectionMesh: true });
  const out: TetMesh[] = [finest.mesh];
  let factor = base;
  while (out.length < levels && factor < 64 * base) {
    factor *= 2;
    const m = meshDesign(design, { order, ...meshOpts, h0Factor: factor }).mesh;
    if (m.coords.length <= 0.8 * out[0].coords.length) out.unshift(m);
  }
  if (out.length < 2) {
    const finer = refineUniform(finest.bisectionMesh!, 3, { maxTets: Math.min(design.refinement.maxElements, meshOpts.hardCap ?? Infinity) });
    out.push(toTetMesh(finer));
  }
  return out;
}


/**
 * The method of a run (CoulombOptions.method): split when asked or by default where every site
 * has a closed-form potential and every requested pair a closed-form interaction (split.ts) and
 * the mode is graded; full otherwise. An explicit 'split' that cannot be honoured is refused.
 */
export function chooseMethod(design: Design, sites: ActiveSite[], pairIdx: Int32Array, opts: CoulombOptions): SolveMethod {
  const asked = opts.method ?? 'auto';
  if (asked === 'full') return 'full';
  let why: string | null = null;
  if (opts.adaptive) why = 'the adaptive mode solves the whole potential';
  const open = sites.find((s) => !hasClosedForm(s.orbital));
  if (!why && open) why = `site "${open.id}" (${open.orbital.model}) has no closed-form potential`;
  for (let p = 0; !why && p < pairIdx.length / 2; p++) {
    const a = sites[pairIdx[2 * p]], b = sites[pairIdx[2 * p + 1]];
    const R = Math.hypot(a.position[0] - b.position[0], a.position[1] - b.position[1], a.position[2] - b.position[2]);
    if (pairClosedForm(a.orbital, b.orbital, R) === null) why = `the pair ${a.id}–${b.id} has no closed-form interaction`;
  }
  if (why === null) return 'split';
  if (asked === 'split') throw new CoulombError('split-unavailable', `the split method is unavailable: ${why}; use method "full"`, { reason: why });
  return 'full';
}

/** Measured constant of the split's remainder error for P2 (see splitCoreSize). */
export const SPLIT_ERROR_CONSTANT_P2 = 1e-4;

/**
 * Core size of the split's meshes. The remainder varies on the scale d of the distance from the
 * sites to the nearest interface, electrode or wall (split.ts), so the size rule is that of
 * geometry/mesh/sizefield.ts, relative error ≈ C (h0/d)^{2p}, with d in place of the orbital
 * length: h0 = d · min(1, (tol/(S·C))^{1/(2p)}), S = CORE_SAFETY_FACTOR. For P2, C =
 * SPLIT_ERROR_CONSTANT_P2, measured: a Gaussian (σ = 1 nm) 3 nm under a Si/SiO₂ interface, uniform
 * meshes of size d and 2d, relative error of U 7e-5 and 7e-4. For P1 nothing was measured and
 * the conservative rule of the graded meshes is used (autoCoreSize with a = d).
 */
export function splitCoreSize(design: Design, sites: ActiveSite[], order: 1 | 2): number {
  const c = design.domain.center, h = design.domain.halfExtentsNm;
  // interfaces and electrodes outside the domain lie beyond its walls, which count already
  const interfaces = interfacesInside(design);
  const electrodes = clippedElectrodes(design);
  let d = Infinity;
  for (const s of sites) {
    const p = s.position;
    for (let a = 0; a < 3; a++) d = Math.min(d, h[a] - Math.abs(p[a] - c[a]));
    for (const z of interfaces) d = Math.min(d, Math.abs(p[2] - z));
    for (const e of electrodes) {
      let q = 0;
      for (let a = 0; a < 3; a++) {
        const lo = e.min[a], hi = e.max[a];
        const t = p[a] < lo ? lo - p[a] : p[a] > hi ? p[a] - hi : 0;
        q += t * t;
      }
      d = Math.min(d, Math.sqrt(q));
    }
  }
  const tol = design.refinement.targetRelError;
  if (order === 1) return autoCoreSize(d, tol, 1);
  return d * Math.min(1, Math.pow(tol / (CORE_SAFETY_FACTOR * SPLIT_ERROR_CONSTANT_P2), 1 / 4));
}

/**
 * The finest level's electrode-edge size h_E and grading β_E of a nested family: the given
 * `electrodeEdgeNm`/`electrodeEdgeExponent` win (a given size alone keeps the size field's default
 * β_E, as before the rule); else, when the design has electrode edges, the default rule of
 * geometry/mesh/edge-rule.ts for these sites (both undefined without edges, so such designs mesh
 * exactly as before).
 */
export function familyEdge(design: Design, sites: ActiveSite[], meshOpts: MeshDesignOptions): { edgeNm?: number; exponent?: number } {
  const given = meshOpts.electrodeEdgeNm;
  const rule = given === undefined ? electrodeEdgeRule(design, { siteIndices: sites.map((s) => s.index) }) : null;
  const edgeNm = given ?? rule?.hNm;
  const exponent = meshOpts.electrodeEdgeExponent ?? rule?.exponent;
  return { ...(edgeNm !== undefined ? { edgeNm } : {}), ...(exponent !== undefined ? { exponent } : {}) };
}

/**
 * The nested meshes of the split: a priori meshes with core sizes H, 2H, 4H, … (H =
 * splitCoreSize) and the size cap H near the sites' depth wherever a device is present, kept
 * only when really coarser (as gradedFamily), finest last. The finest level's electrode-edge size
 * and grading are `familyEdge`'s (given, else the default rule of geometry/mesh/edge-rule.ts), the
 * size × 2, 4, … on the coarser levels.
 *
 * Measured on the issue-11 device bench (2×2 array, P2, tol 1e-3; sizefield.ts ElectrodeEdgeSpec):
 * the default edge sizes 20/10/5 nm start pre-asymptotic (observed rate ~1.5 in s, safety factor
 * 3, estimated 2.7e-3, 6 s CPU); `electrodeEdgeNm: 1.25, electrodeEdgeExponent: 1` (5/2.5/1.25 nm)
 * gives observed rates 2.97–3.0 with factor 1.25 for every number, estimated 1.0e-4, for 28.5 s.
 * The default rule (h_E = 2.65 nm, β_E = 1, on the 2×2 and the 10×10 bench alike) and what it
 * gives: edge-rule.ts's calibration table and DEVELOPERS.md.
 */
export function splitFamily(design: Design, sites: ActiveSite[], order: 1 | 2, levels: number, meshOpts: MeshDesignOptions): TetMesh[] {
  const H = splitCoreSize(design, sites, order) * (meshOpts.h0Factor ?? 1);
  const device = hasDevice(design);
  // the finest level's electrode-edge size and grading: given, else the default rule (edge-rule.ts)
  const { edgeNm: edge, exponent } = familyEdge(design, sites, meshOpts);
  const opts = (f: number): MeshDesignOptions => ({
    order,
    ...meshOpts,
    h0Nm: H * f,
    ...(device ? { hmaxNm: Math.max(H * f, meshOpts.hmaxNm ?? 0) } : {}),
    // coarser levels scale the edge size like the core size (the same size on every level made
    // them no coarser near the edges, so none was kept)
    ...(edge !== undefined ? { electrodeEdgeNm: edge * f } : {}),
    ...(exponent !== undefined ? { electrodeEdgeExponent: exponent } : {}),
  });
  const finest = meshDesign(design, { ...opts(1), keepBisectionMesh: true });
  const out: TetMesh[] = [finest.mesh];
  for (let f = 2; out.length < levels && f <= 64; f *= 2) {
    const m = meshDesign(design, opts(f)).mesh;
    if (m.coords.length <= 0.8 * out[0].coords.length) out.unshift(m);
  }
  if (out.length < 2) {
    const finer = refineUniform(finest.bisectionMesh!, 3, { maxTets: Math.min(design.refinement.maxElements, meshOpts.hardCap ?? Infinity) });
    out.push(toTetMesh(finer));
  }
  return out;
}
