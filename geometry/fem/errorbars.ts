/**
 * The discretisation error bar of every U and V: Richardson extrapolation on nested meshes with
 * the safety factors of Roache's grid convergence index (GCI). This is the one statement of the
 * rule; coulomb.ts and the drivers only call it.
 *
 * Values E_l on nested meshes with mesh-size parameters s_l (decreasing; the Coulomb layer uses
 * s = N^(−1/3), N unknowns: doubling the core size h0 does not coarsen the far field, whose size
 * is capped, so h0 overstates the refinement ratio, and we measured that it understated the error
 * 6×) are taken to approach their limit as E = E∞ + C s^q. Then
 *
 *     extrapolated = E_f + (E_f − E_c) / ((s_c/s_f)^q − 1)
 *     error        = F_s · spread / ((s_c/s_f)^q − 1)
 *
 * (P. J. Roache, J. Fluids Eng. 116 (1994) 405–413; L. F. Richardson, Phil. Trans. R. Soc. A 210
 * (1911) 307), with, from the last three meshes:
 *  - the observed rate q_obs from (E1 − E0)/(E2 − E1) = (s0^q − s1^q)/(s1^q − s2^q) (bisection);
 *  - q = min(q_obs, q_theory) when q_obs is finite and at least 0.25 × q_theory ("observed"), else
 *    q = q_theory ("theoretical": two meshes, successive differences of opposite sign, no rate);
 *    capping at theory means a pre-asymptotic burst never shrinks the bar;
 *  - F_s = 1.25 only when 0.75 q_theory ≤ q_obs ≤ 1.25 q_theory (the asymptotic range, Roache's
 *    criterion for three meshes); F_s = 3 otherwise (Roache's factor for two meshes and for an
 *    observed order away from the formal one). A rate well above theory gets 3 too: it is a
 *    pre-asymptotic coincidence, and the part of the error that does not shrink with the core
 *    size (the unchanged outer mesh) hides from the differences (with 1.25 a pair bar fell 15 %
 *    short of the closed-form error);
 *  - spread = |E_f − E_c|, or the larger of the last two differences when they change sign (an
 *    oscillating approach: a lucky small last step does not shrink the bar).
 * One mesh: error = Infinity. The theoretical rate of an energy with elements of order p is 2p in
 * h, i.e. q = 2p in s for the graded meshes (e.g. Ciarlet, The Finite Element Method for Elliptic
 * Problems, 1978; the grading restores the smooth-solution rate).
 *
 * The reported value is E_f (the finest mesh), not the extrapolated one, so the bar covers the
 * number shown.
 */

/** Roache's factor of safety for three meshes in the asymptotic range. */
export const GCI_SAFETY_OBSERVED = 1.25;
/** Roache's factor of safety otherwise (two meshes, or an observed rate away from theory). */
export const GCI_SAFETY_THEORETICAL = 3;
/** An observed rate below this fraction of theory is not used (the theoretical rate is). */
export const RATE_USABLE_FRACTION = 0.25;
/** The asymptotic range: observed rate within these fractions of theory keeps GCI_SAFETY_OBSERVED. */
export const RATE_ASYMPTOTIC_LOW = 0.75;
export const RATE_ASYMPTOTIC_HIGH = 1.25;

export interface RichardsonResult {
  extrapolated: number;
  /** F_s · spread / ((s_c/s_f)^q − 1): the grid convergence index (header) */
  error: number;
  rate: number;
  rateSource: 'observed' | 'theoretical';
  /** the safety factor applied (header) */
  safetyFactor: number;
}

/**
 * Observed rate q from the last three nested levels with error ≈ C s^q (header).
 * Returns NaN when the differences change sign or vanish, or no rate in (0.05, 20) fits.
 */
export function observedRate(s: readonly number[], e: readonly number[]): number {
  if (s.length < 3) return NaN;
  const k = s.length - 3;
  const [s0, s1, s2] = [s[k], s[k + 1], s[k + 2]];
  const d1 = e[k + 1] - e[k];
  const d2 = e[k + 2] - e[k + 1];
  if (d1 === 0 || d2 === 0 || Math.sign(d1) !== Math.sign(d2)) return NaN;
  const target = d1 / d2;
  const f = (q: number): number => (Math.pow(s0, q) - Math.pow(s1, q)) / (Math.pow(s1, q) - Math.pow(s2, q)) - target;
  let lo = 0.05, hi = 20;
  let flo = f(lo);
  const fhi = f(hi);
  if (!Number.isFinite(flo) || !Number.isFinite(fhi) || Math.sign(flo) === Math.sign(fhi)) return NaN;
  for (let it = 0; it < 100; it++) {
    const mid = 0.5 * (lo + hi);
    const fm = f(mid);
    if (Math.sign(fm) === Math.sign(flo)) {
      lo = mid;
      flo = fm;
    } else {
      hi = mid;
    }
  }
  return 0.5 * (lo + hi);
}

/** Richardson extrapolation with the GCI error bar of the header, for values e on meshes s (decreasing). */
export function richardson(s: readonly number[], e: readonly number[], theoreticalRate: number): RichardsonResult {
  const n = e.length;
  if (n < 2) return { extrapolated: e[n - 1], error: Infinity, rate: theoreticalRate, rateSource: 'theoretical', safetyFactor: GCI_SAFETY_THEORETICAL };
  const qObs = observedRate(s, e);
  const usable = Number.isFinite(qObs) && qObs >= RATE_USABLE_FRACTION * theoreticalRate;
  const asymptotic = usable && qObs >= RATE_ASYMPTOTIC_LOW * theoreticalRate && qObs <= RATE_ASYMPTOTIC_HIGH * theoreticalRate;
  const q = usable ? Math.min(qObs, theoreticalRate) : theoreticalRate;
  const fs = asymptotic ? GCI_SAFETY_OBSERVED : GCI_SAFETY_THEORETICAL;
  const ratio = Math.pow(s[n - 2] / s[n - 1], q);
  const last = e[n - 1] - e[n - 2];
  const delta = last / (ratio - 1);
  let spread = Math.abs(last);
  if (n >= 3) {
    const prev = e[n - 2] - e[n - 3];
    if (prev !== 0 && last !== 0 && Math.sign(prev) !== Math.sign(last)) spread = Math.max(spread, Math.abs(prev));
  }
  return { extrapolated: e[n - 1] + delta, error: (fs * spread) / (ratio - 1), rate: q, rateSource: usable ? 'observed' : 'theoretical', safetyFactor: fs };
}
