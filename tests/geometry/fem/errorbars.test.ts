/**
 * The discretisation error rule (geometry/fem/errorbars.ts): Richardson extrapolation
 * (L. F. Richardson, Phil. Trans. R. Soc. A 210 (1911) 307) with the safety factors of Roache's
 * grid convergence index (P. J. Roache, J. Fluids Eng. 116 (1994) 405–413), on exact power laws.
 */
import { describe, expect, it } from 'vitest';
import {
  richardson, observedRate, GCI_SAFETY_OBSERVED, GCI_SAFETY_THEORETICAL, RATE_USABLE_FRACTION,
} from '../../../geometry/fem/errorbars';

describe('richardson / observedRate', () => {
  it('recovers an exact power law E = E∞ + C s^q (Richardson 1911; Roache 1994 safety factors)', () => {
    const s = [0.4, 0.2, 0.1];
    const e = s.map((x) => 1 + 2 * x ** 3);
    expect(observedRate(s, e)).toBeCloseTo(3, 8);
    const r = richardson(s, e, 4);
    expect(r.rateSource).toBe('observed');
    expect(r.rate).toBeCloseTo(3, 8);
    expect(r.extrapolated).toBeCloseTo(1, 10);
    expect(r.error).toBeCloseTo(GCI_SAFETY_OBSERVED * 2 * 0.1 ** 3, 10);
  });
  it('caps the observed rate at the theoretical one and falls back with two levels or mixed signs', () => {
    const s = [0.4, 0.2, 0.1];
    const fast = richardson(s, s.map((x) => 1 + x ** 6), 4);
    expect(fast.rate).toBe(4);
    const two = richardson([0.2, 0.1], [1.1, 1.05], 2);
    expect(two.rateSource).toBe('theoretical');
    expect(two.error).toBeCloseTo(GCI_SAFETY_THEORETICAL * 0.05 / 3, 12);
    const mixed = richardson(s, [1, 1.1, 1.05], 2);
    expect(mixed.rateSource).toBe('theoretical');
    expect(richardson([0.1], [1], 2).error).toBe(Infinity);
  });
  it('only a rate within 25 % of theory keeps the small factor; a rate far above or below it, or mixed signs, get 3 and the larger step (Roache 1994)', () => {
    const s = [0.4, 0.2, 0.1];
    // E = 1 + s^6 with theory 4: outside the asymptotic range (Roache's criterion), capped at 4, F_s = 3
    const e = s.map((x) => 1 + x ** 6);
    const fast = richardson(s, e, 4);
    expect(fast.rate).toBe(4);
    expect(fast.safetyFactor).toBe(GCI_SAFETY_THEORETICAL);
    expect(fast.error).toBeCloseTo((GCI_SAFETY_THEORETICAL * Math.abs(e[2] - e[1])) / (2 ** 4 - 1), 14);
    // within 25 % above theory: still the asymptotic range, 1.25
    expect(richardson(s, s.map((x) => 1 + x ** 4.8), 4).safetyFactor).toBe(GCI_SAFETY_OBSERVED);
    // the capped bar still covers the true error |E_finest − 1| = 0.1^6
    expect(fast.error).toBeGreaterThanOrEqual(0.1 ** 6);
    // E = 1 + s^2 with theory 4: observed 2 < 0.75·4, so F_s = 3 at the observed rate
    const slow = richardson(s, s.map((x) => 1 + x ** 2), 4);
    expect(slow.safetyFactor).toBe(GCI_SAFETY_THEORETICAL);
    expect(slow.rate).toBeCloseTo(2, 8);
    // within 25 % below theory: the asymptotic range, 1.25
    expect(richardson(s, s.map((x) => 1 + x ** 3.5), 4).safetyFactor).toBe(GCI_SAFETY_OBSERVED);
    // differences +0.1 then −0.05: the larger one (0.1) sets the bar, at the theoretical rate with F_s = 3
    const mixed = richardson(s, [1, 1.1, 1.05], 2);
    expect(mixed.safetyFactor).toBe(GCI_SAFETY_THEORETICAL);
    expect(mixed.error).toBeCloseTo((GCI_SAFETY_THEORETICAL * 0.1) / (2 ** 2 - 1), 12);
  });
});


describe('errorbars: the edges of the rule', () => {
  it('an observed rate below a quarter of theory is not used: the theoretical rate and F_s = 3 (Roache 1994)', () => {
    const s = [0.4, 0.2, 0.1];
    // E = 1 + s^0.5 with theory 4: observed 0.5 < 0.25·4 = 1
    const e = s.map((x) => 1 + Math.sqrt(x));
    expect(observedRate(s, e)).toBeCloseTo(0.5, 8);
    expect(0.5).toBeLessThan(RATE_USABLE_FRACTION * 4);
    const r = richardson(s, e, 4);
    expect(r.rateSource).toBe('theoretical');
    expect(r.rate).toBe(4);
    expect(r.safetyFactor).toBe(GCI_SAFETY_THEORETICAL);
  });
  it('the bar covers the true error of E = 1 + s^4 + 3 s^6 (theory 4) on three and on four meshes', () => {
    for (const s of [[0.4, 0.2, 0.1], [0.8, 0.4, 0.2, 0.1]]) {
      const e = s.map((x) => 1 + x ** 4 + 3 * x ** 6);
      const r = richardson(s, e, 4);
      expect(r.error).toBeGreaterThanOrEqual(Math.abs(e[e.length - 1] - 1));
      // and it is not absurdly loose: within 10× the true error (common practice for a GCI bar)
      expect(r.error).toBeLessThan(10 * Math.abs(e[e.length - 1] - 1));
    }
  });
  it('uses the last three meshes only: an early outlier does not change the rate', () => {
    const s = [0.8, 0.4, 0.2, 0.1];
    const e = s.map((x) => 1 + 2 * x ** 3);
    const spoiled = [5, ...e.slice(1)];
    expect(observedRate(s, spoiled)).toBeCloseTo(observedRate(s, e), 12);
    expect(richardson(s, spoiled, 4).error).toBeCloseTo(richardson(s, e, 4).error, 14);
  });
});
