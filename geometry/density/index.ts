/**
 * Analytic orbital densities of the design document, each normalised to one electron, through one
 * registry of models (models.ts: density, closed-form potential where one exists, self- and pair
 * energies, moments, tails, and the one rule for the length of an orbital). The functions below
 * are the registry's answers for any orbital; callers never branch on `orbital.model`.
 *
 * Potentials are for εr = 1 and a unit charge, in nm⁻¹ (geometry/units.ts); divide by εr and
 * multiply by COULOMB_EV_NM for eV.
 */
import type { Orbital, Vec3 } from '../design/types';
import { ORBITAL_MODELS, orbitalModel, profileRadius } from './models';

export { ORBITAL_MODELS, orbitalModel, orbitalLengths, profileRadius } from './models';
export type { OrbitalLengths, OrbitalModel, OrbitalModelName } from './models';
export { erf, erfc } from './erf';
export { gaussLegendre, legendreP } from './quadrature';

/** Electron density (nm⁻³) of a unit-normalised orbital centred at `center`, at (x, y, z). */
export function densityAt(orbital: Orbital, center: Vec3, x: number, y: number, z: number): number {
  return orbitalModel(orbital).density(orbital, x - center[0], y - center[1], z - center[2]);
}

/** Exact free-space potential of a spherical model at distance r (εr = 1, unit charge, nm⁻¹), or null without a closed radial form. */
export function radialPotential(orbital: Orbital, r: number): number | null {
  return orbitalModel(orbital).radialPotential(orbital, r);
}

/** Charge of the unit density within radius r of its centre for a spherical model; NaN for a model without a radial form. */
export function enclosedCharge(orbital: Orbital, r: number): number {
  return orbitalModel(orbital).enclosedCharge(orbital, r) ?? Number.NaN;
}

/** Exact free-space potential (εr = 1, unit charge, nm⁻¹) of the orbital centred at `center`. */
export function potentialAt(orbital: Orbital, center: Vec3, x: number, y: number, z: number): number {
  return orbitalModel(orbital).potential(orbital, x - center[0], y - center[1], z - center[2]);
}

/** Self-repulsion ∫∫ρρ′/|x−x′| of the unit density (εr = 1, nm⁻¹); U[eV] = COULOMB_EV_NM·selfEnergy/εr. */
export function selfEnergy(orbital: Orbital): number {
  return orbitalModel(orbital).selfEnergy(orbital);
}

/**
 * Interaction ∫∫ρ₁ρ₂/|x−x′| (εr = 1, nm⁻¹) of two unit densities whose centres are R apart, where
 * a closed form exists (two Gaussians; two 1s of one radius); otherwise null (callers then use
 * the point-charge 1/R). Either entry may know the closed form with the other.
 */
export function pairEnergy(o1: Orbital, o2: Orbital, R: number): number | null {
  return orbitalModel(o1).pairEnergy(o1, o2, R) ?? orbitalModel(o2).pairEnergy(o2, o1, R);
}

/** Axial multipole moment q_l = ∫ρ r^l P_l(cosθ) about the orbital's own centre (z axis). */
export function axialMoment(orbital: Orbital, l: number): number {
  return orbitalModel(orbital).axialMoment(orbital, l);
}

/**
 * Fraction of the orbital's unit charge lying outside the axis-aligned box (boxCenter ± half):
 * exact for a Gaussian, an upper bound within 1 % or the face rule for the 1s envelopes
 * (outside.ts). A centre outside the box gives 1, a centre on a face 0.5.
 */
export function chargeOutsideBox(orbital: Orbital, center: Vec3, boxCenter: Vec3, half: Vec3, n = 8): number {
  return orbitalModel(orbital).outsideBox(orbital, center, boxCenter, half, n);
}

/** Share of the unit charge beyond a plane normal to z at distance d ≥ 0 from the centre. */
export function chargeBeyondPlaneZ(orbital: Orbital, d: number): number {
  return orbitalModel(orbital).beyondPlaneZ(orbital, d);
}

/** A string equal for two orbitals exactly when they are the same density (for caches). */
export function orbitalKey(orbital: Orbital): string {
  return orbitalModel(orbital).key(orbital);
}

/** True when the two orbitals are the same density (same model, equal sizes). */
export function sameOrbital(p: Orbital, q: Orbital): boolean {
  if (p === q) return true;
  if (p.model !== q.model) return false;
  const m = orbitalModel(p);
  const sp = m.sizes(p);
  const sq = m.sizes(q);
  return sp.length === sq.length && sp.every((v, i) => v === sq[i]);
}

/**
 * Kept for tests/geometry/farfield (another engineer's folder during issue 11; drop both once it
 * imports `profileRadius` and the registry's `profileTail`): the unit of the profile tail, and the
 * tail itself by model name.
 */
export const orbitalScale = (orbital: Orbital): number => profileRadius(orbital);
export const radialTail = (model: Orbital['model'], R: number): number => ORBITAL_MODELS[model].profileTail(R);
