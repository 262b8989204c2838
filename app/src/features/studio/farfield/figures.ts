/**
 * Figures the far-field panel shows, taken from the report (no physics here): the worst
 * relative bound on U and on V, sortable rows, and number formats that carry their unit.
 */
import type { FarFieldReport, PairBound, SiteBound } from '../../../../../geometry/farfield';
import { boundRank } from './boundWords';

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

const SUPERSCRIPT = '⁰¹²³⁴⁵⁶⁷⁸⁹';

/**
 * Three significant digits; below 0.001 (in the unit shown) as a power of ten, "1.07 × 10⁻⁶", where toPrecision
 * would write "0.00000107" and leave the reader counting zeros.
 */
export function sig3(v: number): string {
  if (v === 0 || Math.abs(v) >= 1e-3) return v.toPrecision(3);
  const [m, e] = v.toExponential(2).split('e');
  const exp = Number(e);
  const digits = String(Math.abs(exp)).split('').map((d) => SUPERSCRIPT[Number(d)]).join('');
  return `${m} × 10${exp < 0 ? '⁻' : ''}${digits}`;
}

/** A fraction as a percentage with three significant digits: 0.00123 → "0.123 %". */
export function percent(x: number | null): string {
  if (x === null || !Number.isFinite(x)) return '—';
  // a no-break space (U+00A0) keeps the unit on the line of its number when a panel wraps
  return `${sig3(100 * x)}\u00a0%`;
}

/** An energy in eV shown in meV, three significant digits. */
export function meV(x: number | null): string {
  if (x === null || !Number.isFinite(x)) return '—';
  return `${sig3(1000 * x)} meV`;
}

export function nm(x: number | null, digits = 4): string {
  if (x === null || !Number.isFinite(x)) return '—';
  return `${x.toPrecision(digits)} nm`;
}

export type SiteColumn = 'id' | 'clearanceNm' | 'requiredClearanceNm' | 'uBoundEv' | 'uRelBound' | 'chargeOutside' | 'bound';
export type PairColumn = 'pair' | 'distanceNm' | 'vEv' | 'vBoundEv' | 'vRelBound';
export type Direction = 'ascending' | 'descending';

const collator = new Intl.Collator(undefined, { numeric: true });

/**
 * Rows in the order of one column; ties keep the report's order (the document's site order), so
 * the sort is stable and cheap: numbers are read once into a typed array, and names are compared
 * only when sorting by name. null (no bound) counts as larger than every number, so unbounded
 * entries come first when descending.
 */
function orderBy<T>(rows: readonly T[], dir: Direction, num: ((r: T) => number | null) | null, name: (r: T) => string): T[] {
  const sign = dir === 'ascending' ? 1 : -1;
  const idx = Array.from({ length: rows.length }, (_, i) => i);
  if (num) {
    const key = new Float64Array(rows.length);
    for (let i = 0; i < rows.length; i++) {
      const v = num(rows[i]);
      key[i] = v === null ? Infinity : v;
    }
    idx.sort((u, v) => (key[u] === key[v] ? u - v : key[u] < key[v] ? -sign : sign));
  } else {
    const names = rows.map(name);
    idx.sort((u, v) => sign * collator.compare(names[u], names[v]) || u - v);
  }
  return idx.map((i) => rows[i]);
}

/** 'bound' orders by kind (rigorous, then estimated) and within a kind by reason (boundWords.ts boundRank). */
export function sortSites(rows: readonly SiteBound[], col: SiteColumn, dir: Direction): SiteBound[] {
  if (col === 'bound') return orderBy(rows, dir, boundRank, (s) => s.id);
  return orderBy(rows, dir, col === 'id' ? null : (s) => s[col], (s) => s.id);
}

export function sortPairs(rows: readonly PairBound[], col: PairColumn, dir: Direction): PairBound[] {
  return orderBy(rows, dir, col === 'pair' ? null : (p) => p[col], (p) => `${p.a}–${p.b}`);
}
