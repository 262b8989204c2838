/**
 * The figures stored at save (server/workers/designFigures.ts): the worker thread gives the same
 * sha256 and worst bound as the in-place computation, and both match outside references.
 */
import { createHash } from 'node:crypto';
import { afterAll, describe, expect, it } from 'vitest';
import { computeFigures, figureComputer } from '../../server/workers/designFigures';
import { importSites, ImportRefused, writeCsv } from '../../server/formats';
import { emptyDesign } from '../../server/services/designs';
import { generateArray } from '../../geometry/arrays';
import { farFieldCheck } from '../../geometry/farfield';
import type { Design } from '../../geometry/design/types';
import type { DesignDocument } from '@contracts/design';

const A = 0.5431020511; // Si lattice constant, nm (CODATA 2018)
const canonical = (v: unknown) =>
  JSON.stringify(v, (_k, x: unknown) => (x && typeof x === 'object' && !Array.isArray(x) ? Object.fromEntries(Object.keys(x).sort().map((k) => [k, (x as Record<string, unknown>)[k]])) : x));

function square(n: number): DesignDocument {
  const sites = generateArray({ kind: 'square', nx: n, ny: n, spacingNm: 8 * A, latticeConstantNm: A });
  const half = (n * 8 * A) / 2 + 30;
  return { ...emptyDesign(`Square ${n}×${n}`), sites, domain: { center: [0, 0, 0], halfExtentsNm: [half, half, 40], boundary: { kind: 'multipole', order: 2 } } };
}

const computer = figureComputer({ threshold: 1, thresholdBytes: 0 });
afterAll(async () => {
  await computer.close();
});

describe('design figures', () => {
  it('in a worker thread equal the in-place figures, the far-field check and node:crypto', async () => {
    const doc = square(20);
    const inWorker = await computer.compute(doc, JSON.stringify(doc));
    const inPlace = computeFigures(doc);
    expect(inWorker).toEqual(inPlace);
    expect(inPlace.worstRelBound).toBe(farFieldCheck(doc as Design).worstRelBound);
    expect(inPlace.worstRelBound).toBeGreaterThan(0);
    // FIPS 180-4 SHA-256 via node:crypto of canonical JSON built independently
    expect(inPlace.sha256).toBe(createHash('sha256').update(canonical(doc)).digest('hex'));
  });

  it('an import read in the worker equals the one read in place; a refusal comes back as ImportRefused', async () => {
    const doc = square(12);
    const ctx = { domain: doc.domain, latticeConstantNm: A };
    const bytes = new TextEncoder().encode(`${writeCsv(doc.sites)}bad,P,x,0,0,1\n`);
    const there = await computer.importSites(bytes, 'sq.csv', ctx);
    expect(there).toEqual(importSites(bytes, 'sq.csv', ctx));
    expect(there.sites).toEqual(doc.sites);
    expect(there.errors).toEqual([{ line: doc.sites.length + 2, message: 'column x_nm holds "x", not a number' }]);
    await expect(computer.importSites(new Uint8Array([0x61, 0, 0x62]), 'bin.csv', ctx)).rejects.toBeInstanceOf(ImportRefused);
  });

  it('no sites, or a site outside the box: no bound (null)', () => {
    expect(computeFigures(emptyDesign('none')).worstRelBound).toBeNull();
    const out = { ...emptyDesign('out'), sites: [{ id: 'x', species: 'P' as const, position: [25, 0, 0] as [number, number, number], electrons: 1 }] };
    expect(computeFigures(out).worstRelBound).toBeNull();
  });
});
