/**
 * The far-field report's trip from the worker (app/src/features/studio/farfield/transport.ts):
 * packed into typed arrays, structured-cloned as postMessage would, unpacked — equal to the
 * original, exactly (nulls, point-charge flags and every bit of every number; common practice
 * for a serialisation round trip).
 */
import { describe, expect, it } from 'vitest';
import { farFieldCheck } from '../../geometry/farfield';
import { packReport, unpackReport } from '../../app/src/features/studio/farfield/transport';
import { generateArray } from '../../geometry/arrays';
import { siliconDesign } from '../geometry/design-fixtures';
import type { Design } from '../../geometry/design/types';
import { siliconOxideVacuum } from '../fixtures/stacks';

describe('far-field report transport', () => {
  it('round trip keeps every field, null and flag of a report with sites outside and point-charge pairs', () => {
    const sites = generateArray({ kind: 'square', nx: 4, ny: 4, spacingNm: 4.3, latticeConstantNm: 0.5431020511 });
    sites[3] = { ...sites[3], orbital: { model: 'gaussian', sigmaNm: 1.5 } }; // gaussian–hydrogenic: point-charge V
    const d = siliconDesign({
      name: 'transport',
      sites,
      // a box that leaves the outer column outside: null bounds
      domain: { center: [0, 0, 0], halfExtentsNm: [5, 9, 6], boundary: { kind: 'grounded' } },
      refinement: { order: 2, targetRelError: 1e-3, maxElements: 1e6 },
    });
    const r = farFieldCheck(d);
    expect(r.sites.some((s) => s.uBoundEv === null)).toBe(true);
    expect(r.pairs.some((p) => p.vModel === 'point-charge')).toBe(true);
    expect(r.pairs.some((p) => p.vRelBound === null)).toBe(true);
    const back = unpackReport(structuredClone(packReport(r)));
    expect(back).toEqual(r);
    expect(Object.is(back.sites[5].clearanceNm, r.sites[5].clearanceNm)).toBe(true);
  });

  it('round trip keeps a layered host\'s bound kind and reason per site, and leaves them absent where the report has none', () => {
    // An invented buried row under 5 nm of oxide (εr 11.7 silicon, 3.9 SiO₂, 1 vacuum: Sze & Ng,
    // Physics of Semiconductor Devices, 3rd ed., Appendix; from memory), grounded walls. Three
    // sites sit 22 nm deep in the silicon, where less than 0.1 % of a density crosses the
    // interface (rigorous: the stack's image series, geometry/farfield/layered.ts); one sits
    // 0.6 nm under it, with a share of its density across (estimated, 'density-leaks').
    const A = 0.5431020511; // Si lattice constant (nm), CODATA 2018
    const base = siliconDesign({
      name: 'transport, layered',
      sites: [
        { id: 'w', species: 'P', position: [-8 * A, 0, -40 * A], electrons: 1 },
        { id: 'c', species: 'P', position: [0, 0, -40 * A], electrons: 1 },
        { id: 'e', species: 'P', position: [8 * A, 0, -40 * A], electrons: 1 },
        { id: 'top', species: 'P', position: [0, 8 * A, -0.6], electrons: 1 },
      ],
      domain: { center: [0, 0, -5], halfExtentsNm: [30, 30, 30], boundary: { kind: 'grounded' } },
      refinement: { order: 2, targetRelError: 1e-3, maxElements: 1e6 },
    });
    const d: Design = {
      ...base,
      host: {
        ...base.host,
        layers: siliconOxideVacuum(),
      },
    };
    const r = farFieldCheck(d);
    expect(r.sites.map((s) => s.boundKind)).toEqual(['rigorous', 'rigorous', 'rigorous', 'estimated']);
    expect(r.sites.map((s) => s.boundReason)).toEqual(['image-series', 'image-series', 'image-series', 'density-leaks']);
    const back = unpackReport(structuredClone(packReport(r)));
    expect(back).toEqual(r);
    // toEqual passes over a key set to undefined; the keys themselves must match too
    back.sites.forEach((s, i) => expect(Object.keys(s).sort()).toEqual(Object.keys(r.sites[i]).sort()));

    // the same sites in a homogeneous host: no kinds, and none made up on the way back
    const plain = farFieldCheck(base);
    expect(plain.sites.every((s) => !('boundKind' in s) && !('boundReason' in s))).toBe(true);
    const plainBack = unpackReport(structuredClone(packReport(plain)));
    expect(plainBack).toEqual(plain);
    expect(plainBack.sites.every((s) => !('boundKind' in s) && !('boundReason' in s))).toBe(true);
  });

  it('refuses a bound code it cannot carry rather than sending back another one', () => {
    const d = siliconDesign({
      name: 'transport, refused',
      sites: [{ id: 'a', species: 'P', position: [0, 0, 0], electrons: 1 }],
      domain: { center: [0, 0, 0], halfExtentsNm: [20, 20, 20], boundary: { kind: 'grounded' } },
      refinement: { order: 2, targetRelError: 1e-3, maxElements: 1e6 },
    });
    const r = farFieldCheck(d);
    const odd = { ...r, sites: [{ ...r.sites[0], boundKind: 'rigorous' as const, boundReason: 'no-such-reason' as never }] };
    expect(() => packReport(odd)).toThrow(/unknown bound reason/);
  });
});
