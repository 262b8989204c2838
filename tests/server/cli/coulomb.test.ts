/** The coulomb and convergence commands: exact JSON shapes, readable honesty, refusals and exit codes. */
import { describe, expect, it } from 'vitest';
import { capture, designFiles, restoreConsoleAfterEach } from './cliHelpers';
import { run as coulomb } from '../../../server/cli/coulomb';
import { run as convergence } from '../../../server/cli/convergence';
import { oneSite } from '../../geometry/fem/coulomb-fixtures';

const designFile = designFiles('coulomb');
restoreConsoleAfterEach();

const base = oneSite({ model: 'gaussian', sigmaNm: 1 }, { half: 10, order: 2, tol: 1e-2 });
// target 5e-2: the command now exits 3 when the estimate misses the target, and on these small
// meshes only two nested levels exist, so the bar uses Roache's factor 3 (about 2 % here)
const twoSites = {
  ...base,
  refinement: { ...base.refinement, targetRelError: 5e-2 },
  sites: [
    { id: 'a', species: 'P', position: [-1.5, 0, 0], electrons: 1, orbital: { model: 'gaussian', sigmaNm: 1 } },
    { id: 'b', species: 'P', position: [1.5, 0, 0], electrons: 1, orbital: { model: 'gaussian', sigmaNm: 1 } },
    { id: 'c', species: 'P', position: [0, 2, 0], electrons: 0 },
  ],
};

describe('coulomb command', () => {
  it('--json prints { order, elements, dofs, iterations, sites, pairs, seconds } first and in order, then meetsTarget, estimatedRelError, notes', async () => {
    const io = capture();
    const code = await coulomb([designFile('two.json', twoSites), '--json']);
    expect(code).toBe(0);
    const j = JSON.parse(io.out.join('\n'));
    expect(Object.keys(j).slice(0, 7).sort()).toEqual(['dofs', 'elements', 'iterations', 'order', 'pairs', 'seconds', 'sites']);
    expect(Object.keys(j)).toEqual(['order', 'elements', 'dofs', 'iterations', 'sites', 'pairs', 'seconds', 'meetsTarget', 'estimatedRelError', 'notes', 'method']);
    expect(['split', 'full']).toContain(j.method);
    expect(j.meetsTarget).toBe(true);
    expect(j.estimatedRelError).toBeLessThanOrEqual(twoSites.refinement.targetRelError);
    expect(Array.isArray(j.notes)).toBe(true);
    expect(j.notes.join(' ')).toMatch(/c/); // the site without electrons is named in a note
    expect(io.err).toHaveLength(0);
    expect(j.order).toBe(2);
    expect(j.sites.map((s: { id: string }) => s.id)).toEqual(['a', 'b']);
    for (const s of j.sites) expect(Object.keys(s).sort()).toEqual(['id', 'uErrorEv', 'uEv']);
    expect(j.pairs).toHaveLength(1);
    expect(Object.keys(j.pairs[0]).sort()).toEqual(['a', 'b', 'distanceNm', 'vErrorEv', 'vEv']);
    expect(j.pairs[0].distanceNm).toBeCloseTo(3, 12);
  });

  it('readable output states the model assumptions and that values are estimates', async () => {
    const io = capture();
    const code = await coulomb([designFile('one.json', base), '--order', '1']);
    expect(code).toBe(0);
    const text = io.out.join('\n');
    expect(text).toMatch(/P1 elements/);
    expect(text).toMatch(/Model assumptions/);
    expect(text).toMatch(/estimates to be confirmed by your group's own validated methods/);
  });

  it('a site without electrons asked for U: exit 1, a plain message, no numbers', async () => {
    const io = capture();
    const code = await coulomb([designFile('two2.json', twoSites), '--site', 'c', '--json']);
    expect(code).toBe(1);
    expect(io.err.join('\n')).toMatch(/site "c" has no electrons/);
    expect(io.out).toHaveLength(0);
  });

  it('a budget that cannot reach the tolerance (adaptive): exit 3 with the reason, no numbers', async () => {
    const io = capture();
    const tight = oneSite({ model: 'gaussian', sigmaNm: 1 }, { half: 10, order: 1, tol: 1e-6, maxElements: 20_000 });
    const code = await coulomb([designFile('tight.json', tight), '--adaptive', '--json']);
    expect(code).toBe(3);
    expect(io.err.join('\n')).toMatch(/budget .* spent/);
    expect(io.out).toHaveLength(0);
  });

  it('graded mode missing the target: numbers with meetsTarget false and notes, a one-line warning, exit 3', async () => {
    const io = capture();
    // a grounded box of half-width 10σ: the boundary shifts U by roughly 1/(εr L) against
    // U = 1/(εr σ√π) (standard Gaussian self-energy), i.e. about 18 %, far above 1e-2
    const grounded = oneSite({ model: 'gaussian', sigmaNm: 1 }, { half: 10, order: 2, tol: 1e-2, boundary: { kind: 'grounded' } });
    const code = await coulomb([designFile('grounded.json', grounded), '--json']);
    expect(code).toBe(3);
    const j = JSON.parse(io.out.join('\n'));
    expect(j.meetsTarget).toBe(false);
    expect(j.estimatedRelError).toBeGreaterThan(1e-2);
    expect(j.notes.join(' ')).toMatch(/does not meet targetRelError/);
    expect(io.err).toHaveLength(1);
    expect(io.err[0]).toMatch(/^warning: .*does not meet targetRelError/);
    expect(io.err[0]).not.toMatch(/\n/);
  });

  it('usage errors exit 2; invalid documents exit 1 with field paths', async () => {
    const io = capture();
    expect(await coulomb([designFile('x.json', base), '--order', '3'])).toBe(2);
    expect(await coulomb([])).toBe(2);
    expect(await coulomb([designFile('bad.json', { ...base, host: { ...base.host, epsilonR: -1 } })])).toBe(1);
    expect(io.err.join('\n')).toMatch(/epsilonR/);
  });
});

describe('convergence command', () => {
  it('--kind refinement --json prints rows, plots and the fitted rate', async () => {
    const io = capture();
    const coarse = oneSite({ model: 'gaussian', sigmaNm: 1 }, { half: 8, order: 1, tol: 5e-2 });
    const code = await convergence([designFile('s.json', coarse), '--kind', 'refinement', '--json']);
    expect(code).toBe(0);
    const j = JSON.parse(io.out.join('\n'));
    expect(j.kind).toBe('refinement');
    expect(j.rows).toHaveLength(3);
    expect(typeof j.fittedRate).toBe('number');
    expect(j.plots[1].logX).toBe(true);
  });
  it('a missing or wrong --kind is a usage error', async () => {
    capture();
    expect(await convergence([designFile('s2.json', base)])).toBe(2);
    expect(await convergence([designFile('s3.json', base), '--kind', 'sideways'])).toBe(2);
  });
});
