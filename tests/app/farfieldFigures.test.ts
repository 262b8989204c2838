/**
 * Figures of the far-field panel (app/src/features/studio/farfield/figures.ts): worst bounds,
 * units in every formatted number, and the sort of the per-site and per-pair lists. The reference
 * values are the report's own entries (no physics here; common practice for display helpers).
 */
import { describe, expect, it } from 'vitest';
import type { FarFieldReport, PairBound, SiteBound } from '../../geometry/farfield';
import { meV, nm, percent, sortPairs, sortSites, worstU, worstV } from '../../app/src/features/studio/farfield/figures';

const site = (id: string, uRelBound: number | null): SiteBound => ({ id, chargeOutside: 0, uBoundEv: uRelBound, uRelBound, uEv: 1, clearanceNm: 1, requiredClearanceNm: 1 });
const pair = (a: string, b: string, vRelBound: number | null): PairBound => ({ a, b, distanceNm: 1, vEv: 1, vModel: 'closed-form', vBoundEv: vRelBound, vRelBound });
const report = (sites: SiteBound[], pairs: PairBound[]) => ({ sites, pairs }) as unknown as FarFieldReport;

describe('far-field panel figures', () => {
  it('worst bound on U and on V, and no bound when an entry has none', () => {
    expect(worstU(report([site('a', 1e-4), site('b', 3e-3)], [])).value).toBe(3e-3);
    expect(worstU(report([site('a', 1e-4), site('b', null)], [])).value).toBeNull();
    expect(worstV(report([], [pair('a', 'b', 2e-4), pair('a', 'c', 5e-5)])).value).toBe(2e-4);
    expect(worstV(report([], [])).count).toBe(0);
  });

  it('every formatted number carries its unit; missing values are a dash', () => {
    expect(percent(0.00123)).toBe('0.123\u00a0%'); // no-break space: the unit never wraps away from its number
    expect(meV(0.0456)).toBe('45.6 meV');
    expect(nm(12.3456)).toBe('12.35 nm');
    expect(percent(null)).toBe('—');
    expect(meV(Infinity)).toBe('—');
  });

  it('writes tiny figures as a power of ten instead of a row of zeros (the image-series tail, a leaked charge)', () => {
    // 1.07e-9 eV = 1.07e-6 meV: toPrecision(3) alone gives "0.00000107"
    expect(meV(1.07e-9)).toBe('1.07 × 10⁻⁶ meV');
    expect(percent(2.5e-8)).toBe('2.50 × 10⁻⁶\u00a0%');
    // from 0.001 of the unit on, plain digits as before
    expect(meV(1e-6)).toBe('0.00100 meV');
    expect(meV(0)).toBe('0.00 meV');
    expect(meV(-3.4e-10)).toBe('-3.40 × 10⁻⁷ meV');
  });

  it('sorts by a column, unbounded entries first when descending, ties in report order', () => {
    const rows = [site('s10', 0.2), site('s2', null), site('s1', 0.2), site('s3', 0.05)];
    expect(sortSites(rows, 'uRelBound', 'descending').map((s) => s.id)).toEqual(['s2', 's10', 's1', 's3']);
    expect(sortSites(rows, 'uRelBound', 'ascending').map((s) => s.id)).toEqual(['s3', 's10', 's1', 's2']);
    // names compare numerically: s2 before s10
    expect(sortSites(rows, 'id', 'ascending').map((s) => s.id)).toEqual(['s1', 's2', 's3', 's10']);
    const pairs = [pair('s1', 's2', 1e-3), pair('s1', 's3', 4e-3)];
    expect(sortPairs(pairs, 'vRelBound', 'descending').map((p) => p.b)).toEqual(['s3', 's2']);
  });
});
