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
import type { ActiveSite } from './coulomb-level';

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
  return { sites, pairIdx: Int32Array.from(pi), pairInfo, siteBound, siteCut, far };
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

