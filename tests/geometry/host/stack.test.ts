import { describe, expect, it } from 'vitest';
import { planarStack } from '../../../geometry/host';
import { homogeneousStack, regionOf } from '../../../geometry/host/stack';
import type { HostLayer } from '../../../geometry/host';
import { siliconOxideVacuum } from '../../fixtures/stacks';

// Issue 11's own example stack (field names are the contract): silicon below 0, SiO₂ 0–5 nm, vacuum above.
// εr of SiO₂ 3.9 and of silicon 11.7: common practice, from memory.
const SI_OX_VAC: HostLayer[] = siliconOxideVacuum();

describe('planarStack', () => {
  it('turns ordered layers into flat interfaces and permittivities', () => {
    const { stack, findings } = planarStack(SI_OX_VAC);
    expect(findings).toEqual([]);
    expect(Array.from(stack!.interfaces)).toEqual([0, 5]);
    expect(Array.from(stack!.epsilon)).toEqual([11.7, 3.9, 1]);
    expect(stack!.names).toEqual(['silicon', 'oxide', 'vacuum']);
  });

  it('refuses gaps, overlaps, empty layers, bad εr and unbounded inner layers with codes', () => {
    const gap = planarStack([SI_OX_VAC[0], { ...SI_OX_VAC[1], zMinNm: 1 }, SI_OX_VAC[2]]);
    expect(gap.stack).toBeNull();
    expect(gap.findings).toContainEqual({ code: 'layer-order', index: 1 });
    const empty = planarStack([SI_OX_VAC[0], { ...SI_OX_VAC[1], zMaxNm: 0 }, { ...SI_OX_VAC[2], zMinNm: 0 }]);
    expect(empty.findings).toContainEqual({ code: 'layer-empty', index: 1 });
    const eps = planarStack([SI_OX_VAC[0], { ...SI_OX_VAC[1], epsilonR: 0 }, SI_OX_VAC[2]]);
    expect(eps.findings).toContainEqual({ code: 'layer-epsilon', index: 1 });
    const inner = planarStack([SI_OX_VAC[0], { ...SI_OX_VAC[1], zMaxNm: null }, SI_OX_VAC[2]]);
    expect(inner.findings).toContainEqual({ code: 'inner-unbounded', index: 1 });
    expect(planarStack([]).findings).toEqual([{ code: 'no-layers' }]);
  });

  it('takes bounded end layers as unbounded and says so', () => {
    const { stack, findings } = planarStack([{ ...SI_OX_VAC[0], zMinNm: -100 }, SI_OX_VAC[1], SI_OX_VAC[2]]);
    expect(stack).not.toBeNull();
    expect(findings).toEqual([{ code: 'bounded-end', index: 0, value: -100 }]);
  });

  it('merges neighbours of equal εr (no image at such an interface) and cuts at metal planes', () => {
    const { stack } = planarStack(
      [
        { name: 'a', epsilonR: 11.7, zMinNm: null, zMaxNm: 0 },
        { name: 'b', epsilonR: 11.7, zMinNm: 0, zMaxNm: 3 },
        { name: 'c', epsilonR: 3.9, zMinNm: 3, zMaxNm: null },
      ],
      [
        { name: 'top gate', side: 'above', zNm: 8 },
        { name: 'back gate', side: 'below', zNm: -40 },
      ],
    );
    expect(Array.from(stack!.interfaces)).toEqual([-40, 3, 8]);
    expect(Array.from(stack!.epsilon)).toEqual([Infinity, 11.7, 3.9, Infinity]);
    expect(stack!.names).toEqual(['back gate', 'a', 'c', 'top gate']);
  });

  it('finds the region of a height and refuses points on an interface', () => {
    const { stack } = planarStack(SI_OX_VAC);
    expect(regionOf(stack!, -1)).toBe(0);
    expect(regionOf(stack!, 2)).toBe(1);
    expect(regionOf(stack!, 6)).toBe(2);
    expect(regionOf(stack!, 5)).toBe(-1);
    expect(regionOf(stack!, 1e-12)).toBe(-1);
    expect(regionOf(homogeneousStack(11.7), 0)).toBe(0);
  });
});
