/**
 * Plain figures for the designs table: the worst boundary bound as a percentage, whether it is
 * above the design's target, the name of a duplicate, and the filter.
 */
import type { DesignSummary } from '@contracts/api';

/** Longest design name the contract allows (designNameSchema). */
export const DESIGN_NAME_MAX = 200;

/** A relative bound (0.0042) as a percentage with two significant figures ("0.42 %"). */
export function formatBound(rel: number): string {
  const pct = rel * 100;
  if (pct === 0) return '0 %';
  if (pct < 1e-4) return '< 0.0001 %';
  if (pct >= 100) return `${Math.round(pct).toLocaleString('en')} %`;
  if (pct >= 10) return `${pct.toFixed(1)} %`;
  return `${Number(pct.toPrecision(2))} %`;
}

export type BoundState = 'none' | 'unknown-target' | 'within' | 'above';

/**
 * Where the bound stands against the design's target relative error (the list's targetRelError).
 * Without a target the figure is shown alone; without a bound there is nothing to say.
 */
export function boundState(rel: number | null, target?: number | null): BoundState {
  if (rel === null || !Number.isFinite(rel)) return 'none';
  if (target === undefined || target === null || !(target > 0)) return 'unknown-target';
  return rel > target ? 'above' : 'within';
}

/**
 * "<name> (copy)", shortened so the result still fits the name limit. The limit counts UTF-16
 * units as zod's `max` does; the cut falls between code points, never inside a surrogate pair.
 */
export function copyName(name: string, max = DESIGN_NAME_MAX): string {
  const suffix = ' (copy)';
  const base = name.trim();
  const room = max - suffix.length;
  if (base.length <= room) return `${base}${suffix}`;
  let cut = '';
  for (const ch of base) {
    if (cut.length + ch.length > room - 1) break;
    cut += ch;
  }
  return `${cut}…${suffix}`;
}

/** Case-insensitive match of the filter text against the name and who saved last. */
export function matchesFilter(d: Pick<DesignSummary, 'name' | 'updatedBy'>, filter: string): boolean {
  const q = filter.trim().toLocaleLowerCase();
  if (!q) return true;
  return d.name.toLocaleLowerCase().includes(q) || (d.updatedBy ?? '').toLocaleLowerCase().includes(q);
}
