/**
 * Array generators in the (001) plane: chain, rectangular, square, triangular, honeycomb.
 *
 * An array is a set of target points in the plane z = center[2]: built around the origin,
 * centred on its own centroid, rotated by `angleDeg` about [001] (0° puts the first lattice
 * vector along [100]) and moved to `center`. Each target point then carries a cluster of
 * 1–4 donors: the lattice site nearest to it and, for larger clusters, those of its bonded
 * neighbours nearest to the target (ties by lattice index):
 *
 *   snapped (default): the donors sit on those lattice sites;
 *   free:              the target point itself takes the first donor, and further donors keep
 *                      the same offsets from it as the lattice sites have from the first one.
 *
 *   chain        o--o--o--o                 rectangular/square   o--o--o
 *                                                                |  |  |
 *   triangular    o--o--o                   honeycomb            o--o--o
 *               o--o--o--o                     o--o
 *                                            o      o--o      (two sites per cell,
 *                                              o--o      o     bond length = spacing)
 */
import type { Orbital, Site, Species, Vec3 } from '../design/types';
import { NEAREST_A, sitesInSphere, siteToNm, snapToLattice, type LatticeIndex } from '../lattice';
import { mulberry32 } from './prng';

export type ArrayKind = 'chain' | 'rectangular' | 'square' | 'triangular' | 'honeycomb';

export interface ArraySpec {
  kind: ArrayKind;
  /** number of sites (chain) or cells along the first lattice vector */
  nx: number;
  /** cells along the second lattice vector (ignored for chains) */
  ny?: number;
  /** spacing in nm (nearest-neighbour distance; for honeycomb the bond length) */
  spacingNm: number;
  /** second spacing for rectangular arrays (defaults to spacingNm) */
  spacingYNm?: number;
  /** in-plane orientation, degrees from [100] about [001] */
  angleDeg?: number;
  /** array centroid in nm; z sets the donor plane */
  center?: Vec3;
  /** donors per array site, 1–4 */
  clusterSize?: number;
  /** 'snapped' (default) or 'free' */
  placement?: 'snapped' | 'free';
  species?: Species;
  electrons?: number;
  orbital?: Orbital;
  latticeConstantNm: number;
  /** id prefix, default 's' */
  idPrefix?: string;
}

/** Hard cap on generated donors, matching the design schema's site cap. */
export const MAX_GENERATED_SITES = 100_000;

/** The target points (x, y) of the bare array around the origin, before centring and rotation. */
export function arrayPoints(spec: Pick<ArraySpec, 'kind' | 'nx' | 'ny' | 'spacingNm' | 'spacingYNm'>): number[][] {
  const s = spacingOk(spec.spacingNm, 'spacingNm');
  const nx = countOk(spec.nx, 'nx');
  const ny = spec.kind === 'chain' ? 1 : countOk(spec.ny ?? spec.nx, 'ny');
  const pts: number[][] = [];
  switch (spec.kind) {
    case 'chain':
      for (let i = 0; i < nx; i++) pts.push([i * s, 0]);
      break;
    case 'square':
    case 'rectangular': {
      const sy = spec.kind === 'square' ? s : spacingOk(spec.spacingYNm ?? s, 'spacingYNm');
      for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) pts.push([i * s, j * sy]);
      break;
    }
    case 'triangular':
      // rows offset by half a spacing: a rectangular patch of a triangular lattice
      for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) pts.push([(i + (j % 2) / 2) * s, (j * s * Math.sqrt(3)) / 2]);
      break;
    case 'honeycomb': {
      // Bravais vectors a1 = s(√3, 0), a2 = s(√3/2, 3/2); basis (0, 0) and (0, s)
      const r3 = Math.sqrt(3);
      for (let j = 0; j < ny; j++)
        for (let i = 0; i < nx; i++) {
          const x = s * (r3 * i + (r3 / 2) * j);
          const y = s * 1.5 * j;
          pts.push([x, y], [x, y + s]);
        }
      break;
    }
  }
  return pts;
}

function spacingOk(v: number, name: string): number {
  if (!Number.isFinite(v) || v <= 0) throw new RangeError(`${name} must be a positive number of nm`);
  return v;
}
function countOk(v: number, name: string): number {
  if (!Number.isInteger(v) || v < 1) throw new RangeError(`${name} must be a whole number ≥ 1`);
  return v;
}

/**
 * The lattice sites of a cluster of `size` donors for a target point: the site nearest to the
 * target, then those of its 4 bonded neighbours nearest to the target (ties by (k, j, i)).
 */
export function clusterSites(target: Vec3, size: number, a: number): LatticeIndex[] {
  const s0 = snapToLattice(target, a);
  const sign = (s0[0] & 1) === 0 ? 1 : -1; // bond vectors of B sites are the negatives of A's
  const nb: LatticeIndex[] = NEAREST_A.map((v) => [s0[0] + sign * v[0], s0[1] + sign * v[1], s0[2] + sign * v[2]]);
  const q = a / 4;
  const dist = (s: LatticeIndex) => (s[0] * q - target[0]) ** 2 + (s[1] * q - target[1]) ** 2 + (s[2] * q - target[2]) ** 2;
  nb.sort((u, v) => dist(u) - dist(v) || u[2] - v[2] || u[1] - v[1] || u[0] - v[0]);
  return [s0, ...nb.slice(0, size - 1)];
}

/** Generate the donors of an array as design sites (ids prefix1, prefix2, … in row order). */
export function generateArray(spec: ArraySpec): Site[] {
  const a = spacingOk(spec.latticeConstantNm, 'latticeConstantNm');
  const cluster = spec.clusterSize ?? 1;
  if (!Number.isInteger(cluster) || cluster < 1 || cluster > 4) throw new RangeError('clusterSize must be 1, 2, 3 or 4');
  const pts = arrayPoints(spec);
  if (pts.length * cluster > MAX_GENERATED_SITES) throw new RangeError(`the array would have ${pts.length * cluster} donors; the limit is ${MAX_GENERATED_SITES}`);
  let cx = 0, cy = 0;
  for (const p of pts) {
    cx += p[0];
    cy += p[1];
  }
  cx /= pts.length;
  cy /= pts.length;
  const th = ((spec.angleDeg ?? 0) * Math.PI) / 180;
  const c = Math.cos(th), sn = Math.sin(th);
  const center = spec.center ?? [0, 0, 0];
  const prefix = spec.idPrefix ?? 's';
  const sites: Site[] = [];
  pts.forEach((p, t) => {
    const x = p[0] - cx, y = p[1] - cy;
    const target: Vec3 = [center[0] + c * x - sn * y, center[1] + sn * x + c * y, center[2]];
    const lattice = clusterSites(target, cluster, a).map((ix) => siteToNm(ix, a));
    const positions: Vec3[] =
      spec.placement === 'free'
        ? lattice.map((q) => [target[0] + q[0] - lattice[0][0], target[1] + q[1] - lattice[0][1], target[2] + q[2] - lattice[0][2]] as Vec3)
        : lattice;
    positions.forEach((pos, k) => {
      const site: Site = {
        id: cluster === 1 ? `${prefix}${t + 1}` : `${prefix}${t + 1}${String.fromCharCode(97 + k)}`,
        species: spec.species ?? 'P',
        position: pos,
        electrons: spec.electrons ?? 1,
      };
      if (spec.orbital) site.orbital = spec.orbital;
      if (cluster > 1) site.cluster = `${prefix}${t + 1}`;
      sites.push(site);
    });
  });
  return sites;
}

export interface DisorderOptions {
  /** each donor moves to a lattice site within this distance (nm) of its nominal site */
  radiusNm: number;
  samples: number;
  seed: number;
  latticeConstantNm: number;
}

/** Hard cap on samples × donors of one ensemble (memory guard). */
export const MAX_ENSEMBLE_DONORS = 2_000_000;

/**
 * Placement-disorder ensemble: `samples` copies of `sites`, each donor moved to a lattice site
 * drawn uniformly among those within `radiusNm` of its nominal (snapped) site, from the
 * seeded mulberry32 stream (same seed → same ensemble). Two donors of one sample never share a
 * lattice site: a taken site is redrawn (up to 64 times, then the nearest free candidate).
 */
export function disorderEnsemble(sites: readonly Site[], options: DisorderOptions): Site[][] {
  const a = spacingOk(options.latticeConstantNm, 'latticeConstantNm');
  if (!Number.isFinite(options.radiusNm) || options.radiusNm < 0) throw new RangeError('radiusNm must be ≥ 0');
  const samples = countOk(options.samples, 'samples');
  if (samples * sites.length > MAX_ENSEMBLE_DONORS) throw new RangeError(`samples × donors = ${samples * sites.length}; the limit is ${MAX_ENSEMBLE_DONORS}`);
  const rnd = mulberry32(options.seed);
  const candidates = sites.map((s) => sitesInSphere(siteToNm(snapToLattice(s.position, a), a), options.radiusNm, a));
  const out: Site[][] = [];
  for (let n = 0; n < samples; n++) {
    const taken = new Set<string>();
    const sample: Site[] = sites.map((s, i) => {
      const cand = candidates[i];
      const count = cand.length / 3;
      let pick = -1;
      for (let tries = 0; tries < 64 && pick < 0; tries++) {
        const t = Math.min(count - 1, Math.floor(rnd() * count));
        if (!taken.has(`${cand[3 * t]},${cand[3 * t + 1]},${cand[3 * t + 2]}`)) pick = t;
      }
      if (pick < 0) for (let t = 0; t < count && pick < 0; t++) if (!taken.has(`${cand[3 * t]},${cand[3 * t + 1]},${cand[3 * t + 2]}`)) pick = t;
      if (pick < 0) pick = 0;
      taken.add(`${cand[3 * pick]},${cand[3 * pick + 1]},${cand[3 * pick + 2]}`);
      return { ...s, position: siteToNm([cand[3 * pick], cand[3 * pick + 1], cand[3 * pick + 2]], a) };
    });
    out.push(sample);
  }
  return out;
}
