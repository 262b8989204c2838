/**
 * The registry of orbital models: one entry per `Orbital['model']` of the design document, and
 * the only place in the core that asks which model an orbital is. Everything else asks the entry: its density, closed-form potential
 * (null where none exists), self- and pair energies, moments, tails, and lengths.
 *
 *   hydrogenic-1s   ρ = exp(−2r/a) / (π a³)                         a = radiusNm
 *   anisotropic-1s  ρ = exp(−2m) / (π a² b),  m² = (x²+y²)/a² + z²/b²   a = radiusNm, b = radiusZNm
 *   gaussian        ρ = exp(−r²/2σ²) / ((2π)^{3/2} σ³)             σ = sigmaNm
 *
 * Every density is a spherical profile f(|u|) of the stretched coordinate u = A⁻¹(x − c),
 * A = diag(a, a, b) (A = a·I or σ·I for the spherical models): `axes` gives A, `profileTail` the
 * share of the unit profile beyond |u| = R. Most closed forms follow from that single fact.
 *
 * Potentials are for εr = 1 and a unit charge, in nm⁻¹, in the convention of geometry/units.ts
 * (−∇·(εr∇φ) = 4πρ, so a point charge has φ = 1/r). Divide by εr and multiply by COULOMB_EV_NM
 * for eV.
 *
 * THE LENGTH OF AN ORBITAL (one rule). Along each axis, the length ℓ is the distance from the
 * centre at which the density has fallen to e⁻² of its peak: a for a 1s envelope (e^{−2r/a} at
 * r = a, its radius), 2σ for a Gaussian (e^{−r²/2σ²} at r = 2σ). Reason: it compares the models at
 * one density contrast, it is the radius a everybody quotes for a 1s envelope, and it is the
 * length the mesh's core-size constants were measured with (geometry/mesh/sizefield.ts header:
 * hydrogenic, Gaussian and anisotropic cases at this ℓ fell in one band of C_p). From it:
 *   core length   = the smallest ℓ over the axes: where the density changes fastest, what the
 *                   mesh core must resolve (size field);
 *   extent        = the largest ℓ: how far the charge reaches (tables and search ranges);
 *   decay lengths = ℓ/2 (smallest, largest): for a 1s envelope the e-fold length of the density,
 *                   for a Gaussian σ, the length in its exp(−r²/2σ²) (the quadrature of the load).
 * Before this registry three rules were in use: the size field's (this one), the load's decay
 * lengths (ℓ/2, the same numbers) and the far field's "largest radius" (a, max(a, b), σ). The
 * last one was not a length rule but the unit of the profile tail it multiplied (`profileTail`
 * is written in the stretched coordinate, so the clearance is that many largest stretch axes,
 * σ for a Gaussian): it is `profileRadius` below, named for what it is, and every number stays
 * as it was.
 */
import type { Orbital, Vec3 } from '../design/types';
import { anisotropicAxialMoment, anisotropicPotential, stretchFactor } from './anisotropic';
import { erf, erfc } from './erf';
import { expOutsideBox, expTail, gaussianOutside, gaussTail, halfSpaceTail1s, type ProfileTail } from './outside';

export type OrbitalModelName = Orbital['model'];
type OrbitalOf<M extends OrbitalModelName> = Extract<Orbital, { model: M }>;

/** The lengths of an orbital by the one rule above (nm). */
export interface OrbitalLengths {
  /** smallest e⁻² length over the axes: what the mesh core resolves */
  core: number;
  /** largest e⁻² length over the axes: how far the charge reaches */
  extent: number;
  /** core / 2: the shortest decay length of the density */
  decayMin: number;
  /** extent / 2: the longest decay length of the density */
  decayMax: number;
}

export interface OrbitalModel<M extends OrbitalModelName = OrbitalModelName> {
  readonly model: M;
  /** the radial profile of the stretched coordinate: 'exp' e^{−2|u|}/π, 'gauss' e^{−|u|²/2}/(2π)^{3/2} */
  readonly profile: 'exp' | 'gauss';
  /** true when the density is spherical, so it has a closed-form radial potential */
  readonly spherical: boolean;
  /** true when the density has a cusp at its centre (the 1s envelopes) */
  readonly cusp: boolean;
  /** true for the single-valley envelope, which the UI and check must qualify (physics notes: a real donor sums six valleys) */
  readonly singleValley: boolean;
  /** Q(R): share of the unit profile beyond stretched radius R (R in units of the stretch axes) */
  readonly profileTail: ProfileTail;
  /** the stretch A = (a_x, a_y, a_z) of the profile, nm */
  axes(o: OrbitalOf<M>): Vec3;
  /** the lengths the user gave for this model, in the document's order (radiusNm, radiusZNm or sigmaNm) */
  sizes(o: OrbitalOf<M>): number[];
  /** a string equal for two orbitals exactly when they are the same density (cache keys) */
  key(o: OrbitalOf<M>): string;
  /** e⁻² length along x, y and z by the one rule (see the header), nm */
  lengthsAlongAxes(o: OrbitalOf<M>): Vec3;
  /** ρ (nm⁻³) at offset (dx, dy, dz) from the centre */
  density(o: OrbitalOf<M>, dx: number, dy: number, dz: number): number;
  /** ρ at the centre (nm⁻³) */
  peak(o: OrbitalOf<M>): number;
  /** an upper bound of ρ at every point at distance ≥ dist from the centre (nm⁻³) */
  densityBeyond(o: OrbitalOf<M>, dist: number): number;
  /** exact potential at distance r of a spherical model; null for a model without one */
  radialPotential(o: OrbitalOf<M>, r: number): number | null;
  /** exact free-space potential at offset (dx, dy, dz) */
  potential(o: OrbitalOf<M>, dx: number, dy: number, dz: number): number;
  /** Q(r): charge of the unit density within radius r of its centre, for a spherical model (∇φ = −Q(r)/r² r̂, Gauss's law); null otherwise */
  enclosedCharge(o: OrbitalOf<M>, r: number): number | null;
  /** 1/r − φ(r) (r > 0) of a spherical model: what a multipole expansion of any order leaves out; null otherwise */
  penetratingPotential(o: OrbitalOf<M>, r: number): number | null;
  /** ∫∫ρρ′/|x − x′| (εr = 1, nm⁻¹) */
  selfEnergy(o: OrbitalOf<M>): number;
  /** ∫∫ρ₁ρ₂/|x − x′| at centre distance R where a closed form exists with `other`; null otherwise */
  pairEnergy(o: OrbitalOf<M>, other: Orbital, R: number): number | null;
  /** q_l = ∫ρ r^l P_l(cos θ) about the centre (z axis) */
  axialMoment(o: OrbitalOf<M>, l: number): number;
  /** share of the unit charge outside the box boxCenter ± half (n: face-rule order where one is needed) */
  outsideBox(o: OrbitalOf<M>, center: Vec3, boxCenter: Vec3, half: Vec3, n: number): number;
  /** share of the unit charge beyond a plane normal to z at distance d from the centre (interfaces of a planar stack) */
  beyondPlaneZ(o: OrbitalOf<M>, d: number): number;
}

const INV_PI = 1 / Math.PI;
const GAUSS_NORM = 1 / Math.pow(2 * Math.PI, 1.5);
const SQRT_PI = Math.sqrt(Math.PI);
const SQRT2 = Math.SQRT2;

/**
 * φ = 1/r − (1/a + 1/r) e^{−2r/a}: the potential of the hydrogen 1s density (physics texts, e.g.
 * Griffiths, Introduction to Quantum Mechanics, problem on the hydrogen charge cloud; from memory).
 */
function hydrogenicPotential(a: number, r: number): number {
  const t = (2 * r) / a;
  if (t < 1e-2) {
    // series of 1 − (1 + t/2)e^{−t} = Σ_{n≥1} (−1)^{n+1}(2 − n) tⁿ / (2·n!) to dodge cancellation
    let sum = 0;
    let fact = 1;
    let pw = 1; // t^{n-1}
    for (let n = 1; n <= 8; n++) {
      fact *= n;
      sum += (((n % 2 === 1 ? 1 : -1) * (2 - n)) / (2 * fact)) * pw;
      pw *= t;
    }
    return (2 / a) * sum;
  }
  return (-Math.expm1(-t) - (t / 2) * Math.exp(-t)) / r;
}

/** φ = erf(r/(σ√2))/r: the potential of a Gaussian charge (standard result). */
function gaussianPotential(s: number, r: number): number {
  const w = r / (s * SQRT2);
  if (w < 1e-4) return (2 / (SQRT_PI * s * SQRT2)) * (1 - (w * w) / 3);
  return erf(w) / r;
}

const sphericalMoment = (l: number) => (l === 0 ? 1 : 0);

/** Beyond these (t = 2r/a for 1s, w = r/(σ√2) for a Gaussian) the enclosed charge is 1 to double precision. */
const ENCLOSED_ONE_T = 50;
const ENCLOSED_ONE_W = 7;
/** From this t on the 1s enclosed charge takes one exponential (see hydrogenicEnclosed). */
const ENCLOSED_ONE_EXP_T = 2;

/** Q(r) = 1 − e^{−t}(1 + t + t²/2), t = 2r/a: the 1s charge within r (integrate 4πr²ρ; standard). */
function hydrogenicEnclosed(a: number, r: number): number {
  const t = (2 * r) / a;
  // beyond t = 50 the tail e^{−t}(1 + t + t²/2) < 1e-18 is below double precision: Q = 1 exactly
  // in floating point, without the two exponentials (the split's reaction right-hand side's hot loop)
  if (t > ENCLOSED_ONE_T) return 1;
  // one exponential where 1 − e^{−t}(1 + t + t²/2) cancels little (Q ≥ 0.08 for t ≥ 2: the
  // rounding of the subtraction stays below 3e-16 absolute); expm1 keeps the small-t digits
  if (t >= ENCLOSED_ONE_EXP_T) return 1 - Math.exp(-t) * (1 + t + 0.5 * t * t);
  return -Math.expm1(-t) - Math.exp(-t) * (t + 0.5 * t * t);
}

/** Q(r) = erf(w) − (2/√π) w e^{−w²}, w = r/(σ√2): the Gaussian charge within r (standard). */
function gaussianEnclosed(s: number, r: number): number {
  const w = r / (s * SQRT2);
  // beyond w = 7, erfc(w) + (2/√π) w e^{−w²} < 1e-20: Q = 1 in double precision
  if (w > ENCLOSED_ONE_W) return 1;
  return erf(w) - (2 / SQRT_PI) * w * Math.exp(-w * w);
}

const hydrogenic: OrbitalModel<'hydrogenic-1s'> = {
  model: 'hydrogenic-1s',
  profile: 'exp',
  spherical: true,
  cusp: true,
  singleValley: false,
  profileTail: expTail,
  axes: (o) => [o.radiusNm, o.radiusNm, o.radiusNm],
  sizes: (o) => [o.radiusNm],
  key: (o) => `h${o.radiusNm}`,
  lengthsAlongAxes: (o) => [o.radiusNm, o.radiusNm, o.radiusNm],
  density(o, dx, dy, dz) {
    const a = o.radiusNm;
    return (Math.exp((-2 * Math.sqrt(dx * dx + dy * dy + dz * dz)) / a) * INV_PI) / (a * a * a);
  },
  peak: (o) => 1 / (Math.PI * o.radiusNm * o.radiusNm * o.radiusNm),
  densityBeyond(o, dist) {
    const peak = 1 / (Math.PI * o.radiusNm * o.radiusNm * o.radiusNm);
    return dist <= 0 ? peak : peak * Math.exp(-dist / (o.radiusNm / 2));
  },
  radialPotential: (o, r) => hydrogenicPotential(o.radiusNm, r),
  potential: (o, dx, dy, dz) => hydrogenicPotential(o.radiusNm, Math.sqrt(dx * dx + dy * dy + dz * dz)),
  enclosedCharge: (o, r) => hydrogenicEnclosed(o.radiusNm, r),
  penetratingPotential: (o, d) => (1 / o.radiusNm + 1 / d) * Math.exp((-2 * d) / o.radiusNm),
  /** 5/(8a): the first-order helium integral, 5/8 Hartree at a = a₀ (Griffiths, Introduction to Quantum Mechanics, the helium ground state, §7.2 in the 2nd edition; section number from memory) */
  selfEnergy: (o) => 5 / (8 * o.radiusNm),
  /**
   * Two 1s of equal radius a (w = R/a): [1 − e^{−2w}(1 + 11w/8 + 3w²/4 + w³/6)] / R, the 1s–1s
   * Coulomb integral of the hydrogen molecule (e.g. Slater, Quantum Theory of Molecules and
   * Solids vol. 1; from memory, checked by quadrature in the tests).
   */
  pairEnergy(o, other, R) {
    if (other.model !== 'hydrogenic-1s' || other.radiusNm !== o.radiusNm) return null;
    const a = o.radiusNm;
    const w = R / a;
    if (w < 1e-3) return 5 / (8 * a);
    return (1 - Math.exp(-2 * w) * (1 + (11 * w) / 8 + (3 * w * w) / 4 + (w * w * w) / 6)) / R;
  },
  axialMoment: (_o, l) => sphericalMoment(l),
  outsideBox: (o, center, boxCenter, half, n) => expOutsideBox(o.radiusNm, o.radiusNm, center, boxCenter, half, n),
  beyondPlaneZ: (o, d) => halfSpaceTail1s(d / o.radiusNm),
};

const anisotropic: OrbitalModel<'anisotropic-1s'> = {
  model: 'anisotropic-1s',
  profile: 'exp',
  spherical: false,
  cusp: true,
  singleValley: true,
  profileTail: expTail,
  axes: (o) => [o.radiusNm, o.radiusNm, o.radiusZNm],
  sizes: (o) => [o.radiusNm, o.radiusZNm],
  key: (o) => `a${o.radiusNm},${o.radiusZNm}`,
  lengthsAlongAxes: (o) => [o.radiusNm, o.radiusNm, o.radiusZNm],
  density(o, dx, dy, dz) {
    const a = o.radiusNm;
    const b = o.radiusZNm;
    const m = Math.sqrt((dx * dx + dy * dy) / (a * a) + (dz * dz) / (b * b));
    return (Math.exp(-2 * m) * INV_PI) / (a * a * b);
  },
  peak: (o) => 1 / (Math.PI * o.radiusNm * o.radiusNm * o.radiusZNm),
  /** ρ ≤ peak·e^{−2|x|/max(a, b)}, since m ≥ |x|/max(a, b) */
  densityBeyond(o, dist) {
    const peak = 1 / (Math.PI * o.radiusNm * o.radiusNm * o.radiusZNm);
    return dist <= 0 ? peak : peak * Math.exp(-dist / (Math.max(o.radiusNm, o.radiusZNm) / 2));
  },
  radialPotential: () => null,
  potential: (o, dx, dy, dz) => anisotropicPotential(o.radiusNm, o.radiusZNm, dx, dy, dz),
  enclosedCharge: () => null,
  penetratingPotential: () => null,
  /** (5/8)·G(a/b)/b: the stretch of the hydrogenic result (anisotropic.ts stretchFactor) */
  selfEnergy: (o) => ((5 / 8) * stretchFactor(o.radiusNm / o.radiusZNm)) / o.radiusZNm,
  pairEnergy: () => null,
  axialMoment: (o, l) => anisotropicAxialMoment(o.radiusNm, o.radiusZNm, l),
  outsideBox: (o, center, boxCenter, half, n) => expOutsideBox(o.radiusNm, o.radiusZNm, center, boxCenter, half, n),
  beyondPlaneZ: (o, d) => halfSpaceTail1s(d / o.radiusZNm),
};

const gaussian: OrbitalModel<'gaussian'> = {
  model: 'gaussian',
  profile: 'gauss',
  spherical: true,
  cusp: false,
  singleValley: false,
  profileTail: gaussTail,
  axes: (o) => [o.sigmaNm, o.sigmaNm, o.sigmaNm],
  sizes: (o) => [o.sigmaNm],
  key: (o) => `g${o.sigmaNm}`,
  lengthsAlongAxes: (o) => [2 * o.sigmaNm, 2 * o.sigmaNm, 2 * o.sigmaNm],
  density(o, dx, dy, dz) {
    const s = o.sigmaNm;
    return (Math.exp(-(dx * dx + dy * dy + dz * dz) / (2 * s * s)) * GAUSS_NORM) / (s * s * s);
  },
  peak: (o) => 1 / (Math.pow(2 * Math.PI, 1.5) * o.sigmaNm * o.sigmaNm * o.sigmaNm),
  densityBeyond(o, dist) {
    const s = o.sigmaNm;
    const peak = 1 / (Math.pow(2 * Math.PI, 1.5) * s * s * s);
    return dist <= 0 ? peak : peak * Math.exp(-(dist * dist) / (2 * s * s));
  },
  radialPotential: (o, r) => gaussianPotential(o.sigmaNm, r),
  potential: (o, dx, dy, dz) => gaussianPotential(o.sigmaNm, Math.sqrt(dx * dx + dy * dy + dz * dz)),
  enclosedCharge: (o, r) => gaussianEnclosed(o.sigmaNm, r),
  penetratingPotential: (o, d) => erfc(d / (o.sigmaNm * SQRT2)) / d,
  /** 1/(σ√π): standard result for a Gaussian charge (its potential at the centre is √(2/π)/σ, halved by the convolution) */
  selfEnergy: (o) => 1 / (o.sigmaNm * SQRT_PI),
  /** two Gaussians: erf(R/√(2(σ₁²+σ₂²)))/R (the convolution of Gaussians is Gaussian) */
  pairEnergy(o, other, R) {
    if (other.model !== 'gaussian') return null;
    const s = Math.sqrt(o.sigmaNm * o.sigmaNm + other.sigmaNm * other.sigmaNm);
    if (R < 1e-9 * s) return SQRT2 / (s * SQRT_PI);
    return erf(R / (s * SQRT2)) / R;
  },
  axialMoment: (_o, l) => sphericalMoment(l),
  outsideBox: (o, center, boxCenter, half) => gaussianOutside(o.sigmaNm, center, boxCenter, half),
  /** ½ erfc(d/(σ√2)): the normal marginal of a Gaussian is a Gaussian */
  beyondPlaneZ: (o, d) => 0.5 * erfc(d / (o.sigmaNm * SQRT2)),
};

/** The registry: one entry per model of the design document. */
export const ORBITAL_MODELS: { readonly [M in OrbitalModelName]: OrbitalModel<M> } = {
  'hydrogenic-1s': hydrogenic,
  'anisotropic-1s': anisotropic,
  gaussian,
};

/** The registry entry of an orbital's model. */
export function orbitalModel(o: Orbital): OrbitalModel {
  // one lookup; the cast widens the entry so callers pass the orbital they hold
  return ORBITAL_MODELS[o.model] as unknown as OrbitalModel;
}

/** The lengths of an orbital by the one rule (see the header). */
export function orbitalLengths(o: Orbital): OrbitalLengths {
  const l = orbitalModel(o).lengthsAlongAxes(o);
  const core = Math.min(l[0], l[1], l[2]);
  const extent = Math.max(l[0], l[1], l[2]);
  return { core, extent, decayMin: core / 2, decayMax: extent / 2 };
}

/** Largest stretch axis: the unit of `profileTail` (not a length rule; see the header). */
export function profileRadius(o: Orbital): number {
  const A = orbitalModel(o).axes(o);
  return Math.max(A[0], A[1], A[2]);
}

/**
 * Batch form: `points` holds 3n coordinates (x0,y0,z0,x1,…); writes n densities into `out`
 * (allocated when omitted) and returns it. Same values as densityAt, bit for bit.
 */
export function densityBatch(orbital: Orbital, center: Vec3, points: Float64Array, out?: Float64Array): Float64Array {
  const n = Math.floor(points.length / 3);
  const res = out ?? new Float64Array(n);
  if (res.length < n) throw new RangeError(`densityBatch: output holds ${res.length} values, need ${n}`);
  const m = orbitalModel(orbital);
  const [cx, cy, cz] = center;
  for (let i = 0; i < n; i++) res[i] = m.density(orbital, points[3 * i] - cx, points[3 * i + 1] - cy, points[3 * i + 2] - cz);
  return res;
}

/**
 * Share of the unit charge outside the ball of radius r (nm) about the centre: exact for the
 * spherical models, an upper bound for a stretched one (the ball holds the stretched ball
 * |A⁻¹x| ≤ r / largest axis, whose outside is the profile tail there).
 */
export function chargeBeyondRadius(o: Orbital, r: number): number {
  return orbitalModel(o).profileTail(r / profileRadius(o));
}
