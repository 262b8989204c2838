/**
 * Error budgets of U and V from the values on nested meshes: discretisation (errorbars.ts),
 * the boundary bound of the far-field check, and the density cut by the box (2c·U for U,
 * (c_i + c_j)·V for V: first-order effect of the charge outside the box, common practice).
 * Their sum is each number's error bar.
 */
import { COULOMB_EV_NM } from '../units';
import { richardson } from './errorbars';
import { pointValueRate } from './mean-value';
import type { ErrorBudget, LevelSummary, PairEnergy, SiteEnergy } from './coulomb-types';
import type { Plan } from './coulomb-plan';

/**
 * Smallest discretisation bar, relative to the value: round-off of the sums (common practice). The
 * split's remainder can vanish to round-off (a multipole box in a homogeneous host), and a bar of
 * exactly zero would claim more than floating point holds.
 */
export const ROUNDING_FLOOR = 1e-12;

export interface History {
  s: number[];
  self: number[][]; // per level, per site (nm⁻¹)
  pair: number[][];
  levels: LevelSummary[];
  /** 1 where a U (per site) or V (per pair) was read at a centre on some level (mean-value.ts) */
  pointSelf: Uint8Array | null;
  pointPair: Uint8Array | null;
}

export function budgetsFrom(h: History, pl: Plan, order: 1 | 2): { sites: SiteEnergy[]; pairs: PairEnergy[]; rel: number } {
  const ev = COULOMB_EV_NM;
  // theoretical rate: 2p for the functional ∫ρφ, p + 1 for a number read at a centre (mean-value.ts)
  const qOf = (point: Uint8Array | null, k: number): number => (point && point[k] ? pointValueRate(order) : 2 * order);
  let rel = 0;
  const sites: SiteEnergy[] = pl.sites.map((site, k) => {
    const series = h.self.map((l) => l[k] * ev);
    const r = richardson(h.s, series, qOf(h.pointSelf, k));
    const u = series[series.length - 1];
    r.error = Math.max(r.error, ROUNDING_FLOOR * Math.abs(u));
    const cut = 2 * pl.siteCut[k] * Math.abs(u);
    const budget: ErrorBudget = {
      discretisationEv: r.error, boundaryEv: pl.siteBound[k], densityCutEv: cut, rate: r.rate, rateSource: r.rateSource, safetyFactor: r.safetyFactor, extrapolatedEv: r.extrapolated,
    };
    const err = r.error + pl.siteBound[k] + cut;
    rel = Math.max(rel, err / Math.abs(u));
    return { id: site.id, method: pl.method, uEv: u, uErrorEv: err, budget, charge: 0 };
  });
  const pairs: PairEnergy[] = pl.pairInfo.map((p, k) => {
    const series = h.pair.map((l) => l[k] * ev);
    const r = richardson(h.s, series, qOf(h.pointPair, k));
    const v = series[series.length - 1];
    r.error = Math.max(r.error, ROUNDING_FLOOR * Math.abs(v));
    const i = pl.pairIdx[2 * k], j = pl.pairIdx[2 * k + 1];
    const cut = (pl.siteCut[i] + pl.siteCut[j]) * Math.abs(v);
    const budget: ErrorBudget = {
      discretisationEv: r.error, boundaryEv: p.boundEv, densityCutEv: cut, rate: r.rate, rateSource: r.rateSource, safetyFactor: r.safetyFactor, extrapolatedEv: r.extrapolated,
    };
    const err = r.error + p.boundEv + cut;
    rel = Math.max(rel, err / Math.abs(v));
    return { a: p.a, b: p.b, method: pl.method, distanceNm: p.distanceNm, vEv: v, vErrorEv: err, budget };
  });
  return { sites, pairs, rel };
}

