/**
 * Layered host (geometry/host): how long the worst image-charge figure takes for arrays under an
 * oxide, with and without a metal plane, and between two plates (the slow image series). Prints
 * wall and CPU time and the worst relative changes; asserts nothing.
 */
import type { Vec3 } from '../../geometry/design/types';
import { imageChargeEffect, type Electrode, type HostLayer, type ImageEffectInput } from '../../geometry/host';
import { SI_EPSILON_R } from '../../geometry/units';

// our own example: donors 20 nm under a 5 nm oxide (εr 3.9, common practice) and vacuum
const LAYERS: HostLayer[] = [
  { name: 'silicon', epsilonR: SI_EPSILON_R, zMinNm: null, zMaxNm: 0 },
  { name: 'oxide', epsilonR: 3.9, zMinNm: 0, zMaxNm: 5 },
  { name: 'vacuum', epsilonR: 1, zMinNm: 5, zMaxNm: null },
];

function square(n: number, spacing: number, z: number): ImageEffectInput['sites'] {
  const sites: { position: Vec3; orbital: { model: 'hydrogenic-1s'; radiusNm: number } }[] = [];
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) sites.push({ position: [i * spacing, j * spacing, z], orbital: { model: 'hydrogenic-1s', radiusNm: 2.5 } });
  return sites;
}

function time(label: string, input: ImageEffectInput): void {
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  const e = imageChargeEffect(input);
  const wall = performance.now() - t0;
  const c = process.cpuUsage(c0);
  const cpu = (c.user + c.system) / 1000;
  const u = e.worstSite >= 0 ? (100 * e.relativeU[e.worstSite]).toFixed(2) : 'n/a';
  const v = e.worstPair >= 0 ? (100 * e.relativeV[e.worstPair]).toFixed(2) : 'n/a';
  console.log(
    `${label.padEnd(46)} sites ${String(input.sites.length).padStart(4)} pairs ${String(e.pairs.length / 2).padStart(6)}  wall ${wall.toFixed(1).padStart(8)} ms  cpu ${cpu.toFixed(1).padStart(8)} ms  worst ΔU/U ${u} %  worst ΔV/V ${v} %`,
  );
}

export async function run(): Promise<void> {
  const domain = { center: [20, 20, -10] as Vec3, halfExtentsNm: [60, 60, 40] as Vec3 };
  const plane: Electrode = { name: 'top gate', minNm: [-40, -40, 5], maxNm: [80, 80, 7], voltageV: 0.3 };
  const back: Electrode = { name: 'back gate', minNm: [-40, -40, -50], maxNm: [80, 80, -40], voltageV: 0 };
  time('10×10 at 4.3 nm, 20 nm under SiO₂/vacuum', { epsilonR: SI_EPSILON_R, layers: LAYERS, sites: square(10, 4.3, -20) });
  time('10×10 at 4.3 nm, 20 nm under SiO₂/top plane', { epsilonR: SI_EPSILON_R, layers: LAYERS, electrodes: [plane], domain, sites: square(10, 4.3, -20) });
  time('16×16 at 4.3 nm, 20 nm under SiO₂/vacuum', { epsilonR: SI_EPSILON_R, layers: LAYERS, sites: square(16, 4.3, -20) });
  time('10×10 at 4.3 nm between plates (Si only)', {
    epsilonR: SI_EPSILON_R,
    layers: [{ name: 'silicon', epsilonR: SI_EPSILON_R, zMinNm: null, zMaxNm: null }],
    electrodes: [{ ...plane, minNm: [-40, -40, 0], maxNm: [80, 80, 2] }, back],
    domain,
    sites: square(10, 4.3, -20),
  });
}
