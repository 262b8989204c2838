/**
 * The far-field check's warnings, built in one place so that the full check (check.ts) and the
 * resident session (session.ts) give the same codes, messages and site lists in the same order.
 * Order of the list: pairs-limited (when pairs are limited), then the site and pair findings
 * below, then element-budget (when an element estimate was asked for).
 * The words are shared by the command line and the studio's far-field panel; they say "domain
 * box" for the document's `domain` (the on-screen name, issue 9).
 */
import type { Boundary, Vec3 } from '../design/types';
import { ORBITAL_MAX_PLAUSIBLE_NM, type FarFieldWarning, type OrbitalSizeFindings } from './check';

export function describeBoundary(b: Boundary): string {
  return b.kind === 'grounded' ? 'grounded' : `multipole(order ${b.order})`;
}

/** The boundary in running text: "grounded boundary", "multipole boundary (order 2)". */
export function boundaryPhrase(b: Boundary): string {
  return b.kind === 'grounded' ? 'grounded boundary' : `multipole boundary (order ${b.order})`;
}

const pct = (x: number) => `${(100 * x).toPrecision(3)}%`;

export function pairsLimitedWarning(n: number): FarFieldWarning {
  return {
    code: 'pairs-limited',
    severity: 'info',
    message: `With ${n} sites only bond-graph neighbours (and donors of the same cluster) are checked as pairs.`,
    siteIds: [],
  };
}

/** What the site and pair loops found (id lists may repeat ids where the check says so), with the orbital sizes out of range. */
export interface Findings extends OrbitalSizeFindings {
  siteCount: number;
  boundary: Boundary;
  tolerance: number;
  latticeConstantNm: number;
  worst: number;
  recommended: Vec3;
  outside: string[];
  tooClose: string[];
  cut: string[];
  worstCut: number;
  coincide: string[];
  overlap: string[];
  offLattice: string[];
  aniso: string[];
  noElectrons: string[];
}

export function findingsWarnings(f: Findings): FarFieldWarning[] {
  const warnings: FarFieldWarning[] = [];
  const { boundary, tolerance: tol, worst, recommended: rec } = f;
  const uniq = (ids: string[]) => [...new Set(ids)];
  const fmt = (v: Vec3) => v.map((x) => (Number.isFinite(x) ? x.toPrecision(4) : '∞')).join(' × ');
  if (f.siteCount === 0) warnings.push({ code: 'no-sites', severity: 'warning', message: 'The design has no sites, so there is nothing to bound.', siteIds: [] });
  if (f.outside.length)
    warnings.push({
      code: 'site-outside-domain',
      severity: 'error',
      message: `${f.outside.length} site(s) lie outside the domain box or on its boundary; no boundary bound exists for them. Move them inside or enlarge the half-extents.`,
      siteIds: f.outside,
    });
  if (f.tooClose.length)
    warnings.push({
      code: 'boundary-too-close',
      severity: 'warning',
      message: `The ${boundaryPhrase(boundary)} is too close for the tolerance: the worst bound is ${pct(worst)} against a target of ${pct(tol)}. Half-extents of at least ${fmt(rec)} nm meet it${boundary.kind === 'grounded' ? '; a multipole boundary needs a far smaller box' : ''}.`,
      siteIds: uniq(f.tooClose),
    });
  if (f.cut.length)
    warnings.push({
      code: 'density-cut',
      severity: 'warning',
      message: `The domain box cuts off more than ${pct(tol / 10)} of the density of ${f.cut.length} site(s) (largest ${pct(f.worstCut)}); the boundary bound assumes the density lies inside.`,
      siteIds: f.cut,
    });
  if (f.coincide.length)
    warnings.push({ code: 'sites-coincide', severity: 'error', message: 'Some sites sit at the same position; give each its own lattice site.', siteIds: uniq(f.coincide) });
  if (f.overlap.length)
    warnings.push({
      code: 'sites-overlap',
      severity: 'warning',
      message: `Some sites are closer than one lattice constant (${f.latticeConstantNm} nm) without sharing a cluster label; their densities overlap strongly and the model of separate sites is doubtful.`,
      siteIds: uniq(f.overlap),
    });
  if (f.offLattice.length)
    warnings.push({ code: 'off-lattice', severity: 'info', message: `${f.offLattice.length} site(s) are not on a silicon lattice site (free placement).`, siteIds: f.offLattice });
  if (f.aniso.length)
    warnings.push({
      code: 'anisotropic-envelope',
      severity: 'info',
      message: 'The anisotropic envelope is a single-valley model; a real donor state sums six valleys and is nearly isotropic apart from lattice-scale oscillations.',
      siteIds: f.aniso,
    });
  if (f.tooSmall.length)
    warnings.push({
      code: 'orbital-too-small',
      severity: 'warning',
      message: `${f.tooSmall.length} site(s) have an orbital size below a hundredth of the lattice constant (${f.minPlausible.toPrecision(3)} nm; smallest ${f.smallest.toPrecision(3)} nm): such an envelope would sit inside one atom's core, where the effective-mass models used here do not apply, and its mesh would need a huge number of elements.`,
      siteIds: f.tooSmall,
    });
  if (f.tooLarge.length)
    warnings.push({
      code: 'orbital-too-large',
      severity: 'warning',
      message: `${f.tooLarge.length} site(s) have an orbital size above ${ORBITAL_MAX_PLAUSIBLE_NM} nm (largest ${f.largest.toPrecision(3)} nm), far beyond any bound donor state in silicon (1–3 nm); check the unit (nm) and the model.`,
      siteIds: f.tooLarge,
    });
  if (f.noElectrons.length)
    warnings.push({ code: 'no-electrons', severity: 'info', message: 'Sites with no electrons: their bounds are for the orbital an added electron would occupy.', siteIds: f.noElectrons });
  return warnings;
}

/** The element-budget warning, or null when the estimate fits the budget. */
export function elementBudgetWarning(estimate: number, maxElements: number, isLowerBound = false): FarFieldWarning | null {
  if (!(estimate > maxElements)) return null;
  return {
    code: 'element-budget',
    severity: 'warning',
    message: `The recommended domain box would need ${isLowerBound ? 'more than' : 'about'} ${estimate} elements, more than the budget of ${maxElements}.`,
    siteIds: [],
  };
}
