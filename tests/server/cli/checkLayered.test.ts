/**
 * `npm run cli -- check` on a layered design with electrodes (issue 11): exit code, the words of
 * the layered section and the findings, the assumptions, and the `--json` keys (imageEffect,
 * boundKind, boundReason). The physics behind the numbers is tested in
 * tests/geometry/farfield/layered.test.ts (Jackson's images); here one figure is checked against
 * Jackson's image charge directly so the printed value is the right one.
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { siliconOxideVacuum } from '../../fixtures/stacks';

const root = fileURLToPath(new URL('../../..', import.meta.url));
const dir = mkdtempSync(join(tmpdir(), 'tetrawell-check-layered-'));

function cli(doc: unknown, ...args: string[]) {
  const file = join(dir, `d${Math.random().toString(36).slice(2)}.json`);
  writeFileSync(file, JSON.stringify(doc));
  const r = spawnSync(process.execPath, ['--import', 'tsx', 'server/cli/index.ts', 'check', file, ...args], { cwd: root, encoding: 'utf8', timeout: 120_000 });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

/** An invented device: two P donors 10 nm under 5 nm of oxide, a gate on the oxide, a lead half outside the box. */
function device(boundary: { kind: 'grounded' } | { kind: 'multipole'; order: number }, half: number) {
  return {
    format: 'tetrawell-design',
    version: 2,
    name: 'Invented buried pair under an oxide with a gate',
    host: {
      material: 'Si',
      epsilonR: 11.7,
      latticeConstantNm: 0.5431020511,
      layers: siliconOxideVacuum(),
    },
    sites: [
      { id: 'd1', species: 'P', position: [-2.172408204, 0, -10.317], electrons: 1, orbital: { model: 'gaussian', sigmaNm: 1 } },
      { id: 'd2', species: 'P', position: [2.172408204, 0, -10.317], electrons: 1, orbital: { model: 'gaussian', sigmaNm: 1 } },
    ],
    domain: { center: [0, 0, 0], halfExtentsNm: [half, half, half], boundary },
    electrodes: [
      { name: 'gate', minNm: [-5, -5, 5], maxNm: [5, 5, 8], voltageV: 0.5 },
      { name: 'lead', minNm: [half - 5, -2, -11], maxNm: [half + 5, 2, -9], voltageV: 0 },
    ],
    refinement: { order: 2, targetRelError: 0.001, maxElements: 2_000_000 },
  };
}

describe('npm run cli -- check on a layered design with electrodes', () => {
  it('--json adds imageEffect after the existing keys and boundKind/boundReason to each site; a far grounded box misses 0.1 % → exit 3', () => {
    const r = cli(device({ kind: 'grounded' }, 40), '--json');
    expect(r.code).toBe(3);
    const j = JSON.parse(r.out);
    expect(Object.keys(j)).toEqual(['boundary', 'tolerance', 'sites', 'pairs', 'worstRelBound', 'recommendedHalfExtentsNm', 'recommendedElements', 'warnings', 'recommendedElementsIsLowerBound', 'imageEffect']);
    expect(Object.keys(j.sites[0])).toEqual(['id', 'chargeOutside', 'uBoundEv', 'uRelBound', 'boundKind', 'boundReason']);
    expect(j.sites[0].boundKind).toBe('rigorous');
    expect(j.sites[0].boundReason).toBe('image-series');
    expect(Object.keys(j.imageEffect)).toEqual(['worstURel', 'worstUSite', 'worstVRel', 'worstVPair', 'tailBoundEv', 'maxLeak', 'findings']);
    expect(j.worstRelBound).toBeGreaterThan(j.tolerance);
    // Far below the interface a Gaussian's reaction is its image charge's: ΔU/U ≈ q′/(2d) ÷ 1/(σ√π) with
    // q′ = (ε₁ − ε₂)/(ε₁ + ε₂) (Jackson 3rd ed. §4.4). The oxide slab changes this (the vacuum above it
    // adds a far image), so only the sign and size are checked here: between the Si/SiO₂ and the Si/vacuum images.
    const d = 10.317, sigma = 1;
    const bySiO2 = ((11.7 - 3.9) / (11.7 + 3.9) / (2 * d)) * sigma * Math.sqrt(Math.PI);
    const byVacuum = ((11.7 - 1) / (11.7 + 1) / (2 * d)) * sigma * Math.sqrt(Math.PI);
    expect(j.imageEffect.worstURel).toBeGreaterThan(bySiO2);
    expect(j.imageEffect.worstURel).toBeLessThan(byVacuum);
    expect(j.imageEffect.worstVPair).toEqual(['d1', 'd2']);
    const codes = j.imageEffect.findings.map((f: { code: string }) => f.code);
    expect(codes).toEqual(expect.arrayContaining(['electrode-not-plane', 'electrode-clipped']));
    expect(j.imageEffect.findings).toContainEqual({ code: 'electrode-clipped', index: 1, value: 0.5 });
  });

  it('the readable report words the stack, the image effect, the bound kinds, the findings and the assumptions', () => {
    const r = cli(device({ kind: 'multipole', order: 2 }, 25));
    expect([0, 3]).toContain(r.code);
    expect(r.out).toMatch(/stack \(bottom to top\): silicon εr = 11\.7 \(−∞ to 0 nm\); oxide εr = 3\.9 \(0 to 5 nm\); vacuum εr = 1 \(5 to \+∞ nm\)/);
    expect(r.out).toMatch(/Image-charge effect against an infinite silicon host \(εr = 11\.7/);
    expect(r.out).toMatch(/worst change of U: \d[\d.]*% \(site d[12]\)/);
    expect(r.out).toMatch(/worst change of V: \d[\d.]*% \(pair d1–d2\)/);
    expect(r.out).toMatch(/Electrodes that are not planes .* are left out of this closed form/);
    // a multipole box with a finite gate: the bound is an estimate, and the words say why
    expect(r.out).toMatch(/2 site\(s\): estimated: the multipole walls take their values from the stack without the finite electrodes/);
    expect(r.out).toMatch(/electrode "lead" reaches outside the domain box and is clipped to it \(50\.0% of its volume is kept\)/);
    expect(r.out).toMatch(/electrode "gate" does not span the domain's x–y cross-section/);
    expect(r.out).toMatch(/Layers are planar and infinite in x and y/);
    expect(r.out).toMatch(/Electrodes are ideal metal at a fixed voltage; a heavily doped lead is modelled as such a metal box/);
    expect(r.out).toMatch(/estimates to be confirmed by your group's own validated methods/);
  });

  it('an electrode outside the domain and a site near an electrode are named in words', () => {
    const doc = device({ kind: 'grounded' }, 40);
    doc.electrodes.push({ name: 'stray', minNm: [100, 100, 0], maxNm: [110, 110, 5], voltageV: 0 });
    doc.electrodes.push({ name: 'finger', minNm: [-4, -1, -14], maxNm: [-1, 1, -13], voltageV: 0.1 });
    const r = cli(doc);
    expect(r.code).toBe(3);
    expect(r.out).toMatch(/electrode "stray" lies wholly outside the domain box: clipped to nothing/);
    expect(r.out).toMatch(/site d1 is 2\.68 nm from an electrode, within a few orbital sizes/);
  });

  it('a homogeneous design prints no layered section and no new keys', () => {
    const doc = device({ kind: 'multipole', order: 2 }, 40) as Record<string, unknown> & { host: Record<string, unknown> };
    delete doc.host.layers;
    delete doc.electrodes;
    const j = JSON.parse(cli(doc, '--json').out);
    expect(j.imageEffect).toBeUndefined();
    expect(Object.keys(j.sites[0])).toEqual(['id', 'chargeOutside', 'uBoundEv', 'uRelBound']);
    expect(cli(doc).out).not.toMatch(/Image-charge effect/);
  });
});
