/** Convergence studies: the rate fit, the refinement sweep and the box sweep. */
import { describe, expect, it } from 'vitest';
import { fitLogLog, runConvergence, type BoxRow, type RefinementRow } from '../../../geometry/fem/convergence';
import { COULOMB_EV_NM } from '../../../geometry/units';
import { oneSite } from './coulomb-fixtures';

describe('fitLogLog', () => {
  it('recovers the exponent and prefactor of an exact power law', () => {
    const x = [100, 300, 1000, 5000];
    const y = x.map((v) => 3.5 * Math.pow(v, -4 / 3));
    const f = fitLogLog(x, y)!;
    expect(f.rate).toBeCloseTo(4 / 3, 12);
    expect(f.prefactor).toBeCloseTo(3.5, 10);
  });
  it('skips non-positive values and needs two points', () => {
    expect(fitLogLog([1, 2], [0, 1])).toBeNull();
    expect(fitLogLog([1, 2, 4], [1, 0, 0.25])!.rate).toBeCloseTo(1, 12);
  });
});

describe('runConvergence', () => {
  it('refinement: U rises towards the Gaussian self-energy at about N^(-2/3) for P1 (graded-mesh theory)', () => {
    const d = oneSite({ model: 'gaussian', sigmaNm: 1 }, { half: 12, order: 1, tol: 1e-2 });
    const r = runConvergence(d, { kind: 'refinement', levels: 3 });
    const rows = r.rows as RefinementRow[];
    expect(rows).toHaveLength(3);
    // unknowns grow, Galerkin energies rise monotonically towards the exact value
    // (the discrete energy is a lower bound that increases on nested meshes)
    const exact = COULOMB_EV_NM / (11.7 * Math.sqrt(Math.PI)); // standard Gaussian result
    for (let k = 1; k < rows.length; k++) {
      expect(rows[k].dofs).toBeGreaterThan(rows[k - 1].dofs);
      expect(rows[k].uEv[0]).toBeGreaterThan(rows[k - 1].uEv[0]);
      expect(rows[k].uEv[0]).toBeLessThan(exact * (1 + 1e-6));
    }
    expect(r.theoreticalRate).toBeCloseTo(2 / 3, 12);
    expect(r.fittedRate).not.toBeNull();
    expect(Math.abs(r.fittedRate! - 2 / 3)).toBeLessThan(0.2);
    // each level halves every edge: at least 8× the elements (closure of a graded mesh adds some)
    expect(rows[1].elements).toBeGreaterThanOrEqual(8 * rows[0].elements);
    expect(r.plots[1].logX && r.plots[1].logY).toBe(true);
    expect(r.plots[1].fit?.rate).toBe(r.fittedRate);
    // three nested P1 solves: about 20 s on an idle 2-core machine, three times that when it is shared
  }, 180_000);

  it('box: grounded U climbs with the half-width like −1/(εr L), multipole U stays put', () => {
    const d = oneSite({ model: 'gaussian', sigmaNm: 1 }, { half: 8, order: 2, tol: 1e-2, boundary: { kind: 'grounded' } });
    const r = runConvergence(d, { kind: 'box', factors: [1, 2] });
    const rows = r.rows as BoxRow[];
    const g = rows.filter((x) => x.boundary === 'grounded');
    const m = rows.filter((x) => x.boundary.startsWith('multipole'));
    expect(g).toHaveLength(2);
    expect(m).toHaveLength(2);
    expect(g[1].uEv[0]).toBeGreaterThan(g[0].uEv[0]);
    // a centred charge in a grounded box loses between 1/(εr·L) (inscribed sphere, Jackson ch. 2)
    // and 1/(εr·√3 L) (circumscribed sphere): the gain from L to 2L lies between half of each
    const k = COULOMB_EV_NM / 11.7;
    const gain = g[1].uEv[0] - g[0].uEv[0];
    expect(gain).toBeGreaterThan(0.5 * k / (Math.sqrt(3) * 8) * 0.9);
    expect(gain).toBeLessThan(0.5 * k / 8 * 1.1);
    expect(Math.abs(m[1].uEv[0] - m[0].uEv[0])).toBeLessThan(m[0].uErrorEv[0] + m[1].uErrorEv[0]);
    expect(r.plots[0].series).toHaveLength(2);
  });
});
