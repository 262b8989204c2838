/**
 * `npm run cli -- mesh --solve`: the potential of each site is written into the .vtu on every node
 * (all ten nodes of a quadratic tetrahedron) and read back by an outside reader (Debian's
 * python3-meshio), where it must match the closed-form potential of a Gaussian charge.
 *
 * Source: a Gaussian density of standard deviation σ per axis has φ(r) = erf(r/(σ√2))/r in units of
 * e/(4πε₀εr) (standard result for Gaussian charge distributions); e²/(4πε₀) = 1.439964547 eV·nm
 * (CODATA 2018), so the potential in volts per elementary charge is 1.439964547/εr · φ.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it, vi } from 'vitest';
import { run } from '../../../server/cli/mesh';

const dir = mkdtempSync(join(tmpdir(), 'tw-mesh-solve-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const SIGMA = 1.2;
const EPS = 11.7;
const design = {
  format: 'tetrawell-design',
  version: 1,
  name: 'Potential export check (invented: one Gaussian site)',
  host: { material: 'Si', epsilonR: EPS, latticeConstantNm: 0.5431020511 },
  sites: [{ id: 'g', species: 'P', position: [0, 0, 0], electrons: 1, orbital: { model: 'gaussian', sigmaNm: SIGMA } }],
  domain: { center: [0, 0, 0], halfExtentsNm: [15, 15, 15], boundary: { kind: 'multipole', order: 0 } },
  refinement: { order: 2, targetRelError: 0.003, maxElements: 400_000 },
};

function erf(x: number): number {
  // Maclaurin series of erf (Abramowitz & Stegun 7.1.5), used only for x < 8/√2 where it converges
  // to double precision; beyond that erf = 1 to double precision.
  let sum = 0;
  let term = x;
  for (let n = 0; n < 200; n++) {
    const t = term / (2 * n + 1);
    sum += t;
    term *= (-x * x) / (n + 1);
    if (Math.abs(t) < 1e-17 * Math.abs(sum)) break;
  }
  return Math.min(1, (2 / Math.sqrt(Math.PI)) * sum);
}
const K = 1.439964547 / EPS; // CODATA 2018, volts per unit φ
const exact = (r: number) => (r < 1e-12 ? (K * Math.sqrt(2 / Math.PI)) / SIGMA : (K * (r < 8 * SIGMA ? erf(r / (SIGMA * Math.SQRT2)) : 1)) / r);

describe('npm run cli -- mesh --solve', () => {
  it('writes Potential_<id> on all P2 nodes, matching the Gaussian closed form when read back by meshio', async () => {
    const file = join(dir, 'g.json');
    const out = join(dir, 'g.vtu');
    writeFileSync(file, JSON.stringify(design));
    const log = vi.spyOn(console, 'log').mockImplementation(() => {});
    const err = vi.spyOn(console, 'error').mockImplementation(() => {});
    let code: number;
    try {
      code = await run([file, '--out', out, '--solve']);
    } finally {
      log.mockRestore();
      err.mockRestore();
    }
    expect(code).toBe(0);

    const py = [
      'import json, sys',
      'try:',
      '    import meshio',
      'except ImportError:',
      '    print(json.dumps({"missing": True})); sys.exit(0)',
      `m = meshio.read(${JSON.stringify(out)})`,
      'p = m.point_data["Potential_g"]',
      'print(json.dumps({"type": m.cells[0].type, "n": len(m.points), "pts": m.points.tolist(), "phi": p.tolist()}))',
    ].join('\n');
    const res = JSON.parse(execFileSync('/usr/bin/python3', ['-c', py], { encoding: 'utf8', maxBuffer: 1 << 28 }));
    expect(res.missing, 'The outside reader is missing: apt-get install -y python3-meshio').toBeUndefined();
    expect(res.type).toBe('tetra10');
    expect(res.phi.length).toBe(res.n);

    // Compare on every node inside the box where the potential is not tiny: a P2 solution on a mesh
    // graded for 0.3 % energy error is well within 2 % pointwise of the exact potential.
    let worst = 0;
    for (let i = 0; i < res.n; i++) {
      const [x, y, z] = res.pts[i];
      const r = Math.hypot(x, y, z);
      const e = exact(r);
      worst = Math.max(worst, Math.abs(res.phi[i] - e) / e);
    }
    console.info(`worst pointwise relative error of the written potential: ${worst.toExponential(2)}`);
    expect(worst).toBeLessThan(0.02);
  });

  it('refuses --solve with the binary format, which has no point data', async () => {
    const err = vi.spyOn(console, 'error').mockImplementation(() => {});
    try {
      expect(await run([join(dir, 'g.json'), '--out', join(dir, 'g.twmesh'), '--solve'])).toBe(2);
      expect(err.mock.calls.flat().join(' ')).toMatch(/--solve writes potentials/);
    } finally {
      err.mockRestore();
    }
  });
});
