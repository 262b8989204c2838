/**
 * Figures of the project page's designs table and the page titles. The percentage is checked
 * against the plain definition (relative bound × 100); the name limit is the contract's own
 * (designNameSchema, 200), checked with that schema rather than a copied number.
 */
import { describe, expect, it } from 'vitest';
import { designNameSchema } from '@contracts/api';
import { boundState, copyName, formatBound, matchesFilter } from '../../app/src/features/designs/designRows';
import { documentTitle } from '../../app/src/components/pageTitle';

describe('formatBound', () => {
  it('writes a relative bound as a percentage with two significant figures and its unit', () => {
    expect(formatBound(0.0042)).toBe('0.42 %');
    expect(formatBound(0.01)).toBe('1 %');
    expect(formatBound(0.123456)).toBe('12.3 %');
    expect(formatBound(2.5)).toBe('250 %');
    expect(formatBound(0)).toBe('0 %');
    expect(formatBound(3e-9)).toBe('< 0.0001 %');
  });
});

describe('boundState', () => {
  it('flags a bound above the target, passes one at or under it, and says when either is unknown', () => {
    expect(boundState(0.02, 0.01)).toBe('above');
    expect(boundState(0.01, 0.01)).toBe('within');
    expect(boundState(0.002, 0.01)).toBe('within');
    expect(boundState(0.02)).toBe('unknown-target');
    expect(boundState(0.02, null)).toBe('unknown-target');
    expect(boundState(null, 0.01)).toBe('none');
  });
});

describe('copyName', () => {
  it('adds "(copy)" and keeps a short name whole', () => {
    expect(copyName('6-site chain')).toBe('6-site chain (copy)');
  });
  it('shortens a name at the limit so the copy still passes the contract', () => {
    const longest = 'x'.repeat(200);
    const out = copyName(longest);
    expect(out.length).toBeLessThanOrEqual(200);
    expect(out.endsWith('… (copy)')).toBe(true);
    expect(designNameSchema.safeParse(out).success).toBe(true);
    // without shortening, the contract would refuse it
    expect(designNameSchema.safeParse(`${longest} (copy)`).success).toBe(false);
  });
  it('never splits a surrogate pair when shortening', () => {
    const out = copyName('\u{1D4D0}'.repeat(100)); // 200 UTF-16 units (Unicode 15, §3.9: two units per supplementary code point)
    expect(out.length).toBeLessThanOrEqual(200);
    expect(/[\uD800-\uDBFF](?![\uDC00-\uDFFF])/.test(out)).toBe(false);
  });
});

describe('matchesFilter', () => {
  const d = { name: 'Honeycomb flake, 24 sites', updatedBy: 'Ama Reyes' };
  it('matches name or person, ignoring case and surrounding spaces', () => {
    expect(matchesFilter(d, '  HONEYCOMB ')).toBe(true);
    expect(matchesFilter(d, 'reyes')).toBe(true);
    expect(matchesFilter(d, 'chain')).toBe(false);
    expect(matchesFilter({ name: 'x', updatedBy: null }, 'ama')).toBe(false);
    expect(matchesFilter(d, '')).toBe(true);
  });
});

describe('documentTitle', () => {
  it('names the page before the app', () => {
    expect(documentTitle('Projects')).toBe('Projects · Tetrawell');
    expect(documentTitle('  Quad dot  ')).toBe('Quad dot · Tetrawell');
    expect(documentTitle('')).toBe('Tetrawell');
    expect(documentTitle(null)).toBe('Tetrawell');
  });
});
