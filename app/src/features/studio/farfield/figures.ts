/**
 * Figures the far-field panel shows, taken from the report (no physics here): the worst
 * relative bound on U and on V, sortable rows, and number formats that carry their unit.
 */
import type { FarFieldReport, PairBound, SiteBound } from '../../../../../geometry/farfield';

/** Largest relative bound over the sites (U) or the pairs (V); null when some entry has no bound (outside the box). */
export function worstU(r: FarFieldReport): { value: number | null; count: number } {
  let worst = 0;
  for (const s of r.sites) {
    if (s.uRelBound === null) return { value: null, count: r.sites.length };
    if (s.uRelBound > worst) worst = s.uRelBound;
  }
  return { value: r.sites.length ? worst : null, count: r.sites.length };
}

export function worstV(r: FarFieldReport): { value: number | null; count: number } {
  let worst = 0;
  for (const p of r.pairs) {
    if (p.vRelBound === null) return { value: null, count: r.pairs.length };
    if (p.vRelBound > worst) worst = p.vRelBound;
  }
  return { value: r.pairs.length ? worst : null, count: r.pairs.length };
}

/** A fraction as a percentage with three significant digits: 0.00123 → "0.123 %". */
export function percent(x: number | null): string {
  if (x === null || !Number.isFinite(x)) return '—';
  return `${(100 * x).toPrecision(3)} %`;
}

/** An energy in eV shown in meV, three significant digits. */
export function meV(x: number | null): string {
  if (x === null || !Number.isFinite(x)) return '—';
  return `${(1000 * x).toPrecision(3)} meV`;
}

export function nm(x: number | null, digits = 4): string {
  if (x === null || !Number.isFinite(x)) return '—';
  return `${x.toPrecision(digits)} nm`;
}

export type SiteColumn = 'id' | 'clearanceNm' | 'requiredClearanceNm' | 'uBoundEv' | 'uRelBound' | 'chargeOutside';
export type PairColumn = 'pair' | 'distanceNm' | 'vEv' | 'vBoundEv' | 'vRelBound';
export type Direction = 'ascending' | 'descending';

/** null (no bound) sorts above every number when descending: the unbounded entries matter most. */
function cmpNum(a: number | null, b: number | null): number {
  const x = a === null ? Infinity : a;
  const y = b === null ? Infinity : b;
  return x === y ? 0 : x < y ? -1 : 1;
}

const collator = new Intl.Collator(undefined, { numeric: true });

export function sortSites(rows: readonly SiteBound[], col: SiteColumn, dir: Direction): SiteBound[] {
  const sign = dir === 'ascending' ? 1 : -1;
  return rows.slice().sort((a, b) => sign * (col === 'id' ? collator.compare(a.id, b.id) : cmpNum(a[col], b[col])) || collator.compare(a.id, b.id));
}

export function sortPairs(rows: readonly PairBound[], col: PairColumn, dir: Direction): PairBound[] {
  const sign = dir === 'ascending' ? 1 : -1;
  const name = (p: PairBound) => `${p.a}–${p.b}`;
  return rows.slice().sort((a, b) => sign * (col === 'pair' ? collator.compare(name(a), name(b)) : cmpNum(a[col], b[col])) || collator.compare(name(a), name(b)));
}
