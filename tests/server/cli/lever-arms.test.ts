/** `coulomb --lever-arms`, and U and V of a design with electrodes carrying its lever arms (invented designs). */
import { describe, expect, it } from 'vitest';
import { capture, designFiles, restoreConsoleAfterEach } from './cliHelpers';
import { run as coulomb } from '../../../server/cli/coulomb';

const designFile = designFiles('lever');
restoreConsoleAfterEach();

const plates = {
  format: 'tetrawell-design',
  version: 2,
  name: 'Two plates around a donor (invented)',
  host: { material: 'Si', epsilonR: 11.7, latticeConstantNm: 0.5431020511 },
  sites: [{ id: 'd1', species: 'P', position: [0.3, -0.2, -2], electrons: 1, orbital: { model: 'gaussian', sigmaNm: 0.5 } }],
  domain: { center: [0, 0, 0], halfExtentsNm: [4, 4, 10], boundary: { kind: 'grounded' }, electrodeWalls: 'zero-normal-field' },
  electrodes: [
    { name: 'top', minNm: [-4, -4, 8], maxNm: [4, 4, 10], voltageV: 0.5 },
    { name: 'back', minNm: [-4, -4, -10], maxNm: [4, 4, -8], voltageV: 0 },
  ],
  refinement: { order: 1, targetRelError: 0.3, maxElements: 2_000_000 },
};

describe('coulomb --lever-arms', () => {
  it('--json prints the lever arms in meV/V and the site energies in eV; the plate case is exact (parallel-plate capacitor, Jackson §1.13)', async () => {
    const io = capture();
    const code = await coulomb([designFile('plates.json', plates), '--lever-arms', '--json']);
    expect(code).toBe(0);
    const j = JSON.parse(io.out.join('\n'));
    expect(Object.keys(j)).toEqual(['order', 'walls', 'siteEnergies', 'leverArms', 'siteEnergyErrors', 'levels', 'seconds', 'notes']);
    expect(j.leverArms.map((a: { electrode: string }) => a.electrode)).toEqual(['top', 'back']);
    // −1000·(z − z_back)/(z_top − z_back) with z = −2, z_back = −8, z_top = 8; 1e-3 meV/V: the load's charge tolerance (load.ts)
    expect(Math.abs(j.leverArms[0].meVPerV - -375)).toBeLessThan(1e-3);
    expect(Math.abs(j.siteEnergies[0].eV - (-375 * 0.5) / 1000)).toBeLessThan(1e-6);
  });

  it('readable output gives units, the assumptions and the estimate reminder', async () => {
    const io = capture();
    const code = await coulomb([designFile('plates2.json', plates), '--lever-arms']);
    expect(code).toBe(0);
    const text = io.out.join('\n');
    expect(text).toMatch(/meV\/V/);
    expect(text).toMatch(/ideal metal/);
    expect(text).toMatch(/planar and infinite/);
    expect(text).toMatch(/estimates, to be confirmed by the group's own validated methods/);
  });

  it('without --lever-arms a design with electrodes prints U and V, then siteEnergies and leverArms (the agreed keys, last)', async () => {
    const io = capture();
    const code = await coulomb([designFile('plates3.json', plates), '--json']);
    expect([0, 3]).toContain(code);
    const out = JSON.parse(io.out.join('\n')) as Record<string, unknown> & { leverArms: { site: string; electrode: string; meVPerV: number; errorMeVPerV: number }[]; siteEnergies: { id: string; eV: number }[] };
    expect(Object.keys(out).slice(0, 6)).toEqual(['order', 'elements', 'dofs', 'iterations', 'sites', 'pairs']);
    expect(Object.keys(out).slice(-2)).toEqual(['siteEnergies', 'leverArms']);
    expect(Object.keys(out.leverArms[0])).toEqual(['site', 'electrode', 'meVPerV', 'errorMeVPerV']);
    expect(Object.keys(out.siteEnergies[0])).toEqual(['id', 'eV']);
  });

  it('--lever-arms on a design without electrodes is a plain refusal', async () => {
    const io = capture();
    const code = await coulomb([designFile('none.json', { ...plates, electrodes: undefined }), '--lever-arms']);
    expect(code).toBe(1);
    expect(io.err.join('\n')).toMatch(/no(ne)? electrodes|has none/);
  });
});
