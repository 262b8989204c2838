import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { COULOMB_EV_NM } from '../../../geometry/units';
import { meshDesign } from '../../../geometry/mesh/index';

const root = fileURLToPath(new URL('../../..', import.meta.url));
const fixture = join(root, 'tests/fixtures/designs/plaquette.json');
const dir = mkdtempSync(join(tmpdir(), 'tetrawell-check-'));

function cli(...args: string[]) {
  const r = spawnSync(process.execPath, ['--import', 'tsx', 'server/cli/index.ts', 'check', ...args], { cwd: root, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

describe('npm run cli -- check', () => {
  it('--json prints exactly the issue\'s object for the README example', () => {
    const r = cli(fixture, '--json');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(Object.keys(j)).toEqual(['boundary', 'tolerance', 'sites', 'pairs', 'worstRelBound', 'recommendedHalfExtentsNm', 'recommendedElements', 'warnings', 'recommendedElementsIsLowerBound']);
    expect(Object.keys(j.sites[0])).toEqual(['id', 'chargeOutside', 'uBoundEv', 'uRelBound']);
    expect(Object.keys(j.pairs[0])).toEqual(['a', 'b', 'vBoundEv', 'vRelBound']);
    expect(j.sites).toHaveLength(4);
    expect(j.pairs).toHaveLength(6);
    expect(j.boundary).toBe('multipole(order 2)');
    expect(j.worstRelBound).toBeLessThan(j.tolerance);
    expect(j.recommendedHalfExtentsNm).toHaveLength(3);
    // The element count for the recommended box: the mesher's estimate, which must be within ±30 %
    // of the mesh actually built for that box (the accuracy the mesh issue asks of the estimate).
    const doc = JSON.parse(readFileSync(fixture, 'utf8'));
    doc.domain.halfExtentsNm = j.recommendedHalfExtentsNm;
    const built = meshDesign(doc).mesh.tets.length / 4;
    expect(j.recommendedElements / built).toBeGreaterThan(0.7);
    expect(j.recommendedElements / built).toBeLessThan(1.3);
  });
  it('grounded: the bound for each site is e²/(4πε0 εr d) up to the exponential tail (Newton; CODATA e²/4πε0)', () => {
    const doc = JSON.parse(readFileSync(fixture, 'utf8'));
    doc.domain.boundary = { kind: 'grounded' };
    const f = join(dir, 'grounded.json');
    writeFileSync(f, JSON.stringify(doc));
    const j = JSON.parse(cli(f, '--json').out);
    const d = 40 - 2.172408204;
    expect(Math.abs(j.sites[0].uBoundEv / (COULOMB_EV_NM / (11.7 * d)) - 1)).toBeLessThan(1e-5);
    expect(j.warnings.map((w: { code: string }) => w.code)).toContain('boundary-too-close');
  });
  it('--moments adds each site\'s and the array\'s moments to order 4 (monopole = electrons; Racah addition theorem Σ_m Q_2m² = d⁴ for a point charge)', () => {
    const j = JSON.parse(cli(fixture, '--json', '--moments').out);
    const doc = JSON.parse(readFileSync(fixture, 'utf8'));
    expect(j.moments.sites).toHaveLength(doc.sites.length);
    const electrons = doc.sites.reduce((n: number, s: { electrons: number }) => n + s.electrons, 0);
    expect(j.moments.values[0]).toBeCloseTo(electrons, 10);
    // a spherical (hydrogenic) site acts as a point charge at its position (shell theorem)
    const d2 = doc.sites[0].position.reduce((t: number, x: number) => t + x * x, 0);
    const q2 = j.moments.sites[0].values.slice(4, 9).reduce((t: number, x: number) => t + x * x, 0);
    expect(q2).toBeCloseTo(d2 * d2, 8);
    expect(cli(fixture, '--moments').out).toMatch(/multipole moments about/);
  });
  it('exits 3 when the report holds an error-level warning (site outside the box), still printing the report', () => {
    const doc = JSON.parse(readFileSync(fixture, 'utf8'));
    doc.sites[0].position = [45, 0, 0];
    const f = join(dir, 'outside.json');
    writeFileSync(f, JSON.stringify(doc));
    const r = cli(f, '--json');
    expect(r.code).toBe(3);
    expect(JSON.parse(r.out).warnings.map((w: { code: string }) => w.code)).toContain('site-outside-domain');
  });
  it('exits 3 when the worst bound misses the design\'s target, e.g. a 6 nm grounded box against a 0.1 % target', () => {
    // The grounded bound is e²/(4πε0 εr d) for a site d from the nearest wall (maximum principle; physics notes):
    // with d ≈ 3.8 nm it is about 0.03 eV, far above 0.1 % of U (order 0.01 eV): a script watching the status
    // must stop here. The report is still printed in full.
    const doc = JSON.parse(readFileSync(fixture, 'utf8'));
    doc.domain.boundary = { kind: 'grounded' };
    doc.domain.halfExtentsNm = [6, 6, 6];
    doc.refinement.targetRelError = 1e-3;
    const f = join(dir, 'grounded-small.json');
    writeFileSync(f, JSON.stringify(doc));
    const r = cli(f, '--json');
    const j = JSON.parse(r.out);
    expect(j.worstRelBound).toBeGreaterThan(j.tolerance);
    expect(j.warnings.map((w: { code: string }) => w.code)).not.toContain('site-outside-domain');
    expect(r.code).toBe(3);
    expect(cli(f).code).toBe(3);
  });
  it('the readable table states the assumptions and that figures are estimates', () => {
    const r = cli(fixture);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/worst relative bound/);
    expect(r.out).toMatch(/estimates to be confirmed by your group's own validated methods/);
  });
  it('invalid documents exit non-zero with field paths in plain words and no stack trace', () => {
    const doc = JSON.parse(readFileSync(fixture, 'utf8'));
    doc.sites[0].position[1] = null;
    doc.sites[1].species = 'Xe';
    const f = join(dir, 'bad.json');
    writeFileSync(f, JSON.stringify(doc));
    const r = cli(f);
    expect(r.code).toBe(1);
    expect(r.err).toContain('sites[0].position[1]: must be a number, not null');
    expect(r.err).toContain('sites[1].species: must be one of');
    expect(r.err).not.toMatch(/\n\s+at /);
    const j = cli(f, '--json');
    expect(j.code).toBe(1);
    expect(JSON.parse(j.out).valid).toBe(false);
  });
  it('unreadable input and bad usage get one plain line', () => {
    const missing = cli(join(dir, 'nope.json'));
    expect(missing.code).toBe(1);
    expect(missing.err).toMatch(/cannot read .*no such file/);
    const f = join(dir, 'broken.json');
    writeFileSync(f, '{ "format": ');
    const broken = cli(f);
    expect(broken.code).toBe(1);
    expect(broken.err).toMatch(/is not valid JSON/);
    expect(cli().code).toBe(2);
    expect(cli(fixture, '--frobnicate').code).toBe(2);
  });
});
