/**
 * Species presets: the charge of the ionised core, the ground-state binding energy and the
 * default orbital used when a site gives none. These are model assumptions the user can
 * override per site; the UI must say so.
 */
import type { Orbital, Site, Species } from './types';

interface SpeciesPreset {
  species: Species;
  kind: 'donor' | 'acceptor';
  /** charge of the ionised core in units of e (+1 for a donor, −1 for an acceptor) */
  coreCharge: number;
  /** ground-state binding energy in eV */
  bindingEnergyEv: number;
  bindingSource: string;
  orbital: Orbital;
  orbitalSource: string;
}

// Binding energies: Ramdas & Rodriguez, Rep. Prog. Phys. 44, 1297 (1981); values from memory.
// Default envelope: a hydrogenic 1s of radius 2.5 nm, the in-plane radius of the Kohn–Luttinger
// variational envelope for P in Si (Kohn & Luttinger 1955); from memory. The same radius is used
// for every species as a starting point, not as a measured property of that species.
const KL_RADIUS_NM = 2.5;
const KL_SOURCE = 'Kohn & Luttinger (1955) envelope radius for P in Si, from memory; a model assumption';

export const SPECIES_PRESETS: Record<Species, SpeciesPreset> = {
  P: { species: 'P', kind: 'donor', coreCharge: 1, bindingEnergyEv: 0.04559, bindingSource: 'Ramdas & Rodriguez 1981, from memory', orbital: { model: 'hydrogenic-1s', radiusNm: KL_RADIUS_NM }, orbitalSource: KL_SOURCE },
  As: { species: 'As', kind: 'donor', coreCharge: 1, bindingEnergyEv: 0.05376, bindingSource: 'Ramdas & Rodriguez 1981, from memory', orbital: { model: 'hydrogenic-1s', radiusNm: KL_RADIUS_NM }, orbitalSource: KL_SOURCE },
  Sb: { species: 'Sb', kind: 'donor', coreCharge: 1, bindingEnergyEv: 0.04274, bindingSource: 'Ramdas & Rodriguez 1981, from memory', orbital: { model: 'hydrogenic-1s', radiusNm: KL_RADIUS_NM }, orbitalSource: KL_SOURCE },
  Bi: { species: 'Bi', kind: 'donor', coreCharge: 1, bindingEnergyEv: 0.07098, bindingSource: 'Ramdas & Rodriguez 1981, from memory', orbital: { model: 'hydrogenic-1s', radiusNm: KL_RADIUS_NM }, orbitalSource: KL_SOURCE },
  B: { species: 'B', kind: 'acceptor', coreCharge: -1, bindingEnergyEv: 0.045, bindingSource: 'from memory', orbital: { model: 'hydrogenic-1s', radiusNm: KL_RADIUS_NM }, orbitalSource: KL_SOURCE },
};

/** The orbital a site actually uses: its own, or its species preset. */
export function resolveOrbital(site: Pick<Site, 'species' | 'orbital'>): Orbital {
  return site.orbital ?? SPECIES_PRESETS[site.species].orbital;
}

/** Text the UI and CLI show beside species defaults. */
export const PRESET_ASSUMPTION_NOTE =
  'Species defaults (core charge, binding energy, envelope radius) are model assumptions taken from the literature (some values from memory); override them per site where your own data differ.';
