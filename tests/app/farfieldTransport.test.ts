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
});
