/**
 * The one unit convention of the numerical core.
 *
 * Lengths in nm, energies in eV. For a unit-charge density ρ (∫ρ = 1, in nm⁻³) we solve
 *
 *     −∇·(εr ∇φ) = 4π ρ          (φ in nm⁻¹)
 *
 * so that a point charge in vacuum has φ = 1/r. An energy in eV is then
 *
 *     E = COULOMB_EV_NM × ∫ ρ' φ.
 */

/** e²/(4πε₀) in eV·nm: α·ħc, CODATA 2018. */
export const COULOMB_EV_NM = 1.439964547;

/** Bohr radius a₀ in nm, CODATA 2018. */
export const BOHR_RADIUS_NM = 0.0529177210903;

/** Hartree energy in eV, CODATA 2018. */
export const HARTREE_EV = 27.211386245988;

/** Silicon lattice constant in nm at 22.5 °C, CODATA 2018. */
export const SI_LATTICE_CONSTANT_NM = 0.5431020511;

/** Static relative permittivity of silicon: common practice (some handbooks give 11.9); from memory. */
export const SI_EPSILON_R = 11.7;

/** Elementary charge in C, exact in the SI since 2019 (CODATA 2018). */
export const ELEMENTARY_CHARGE_C = 1.602176634e-19;

/** Vacuum permittivity ε₀ in F/m, CODATA 2018. e²/(4πε₀) from these two equals COULOMB_EV_NM to 1e-9. */
export const VACUUM_PERMITTIVITY_F_M = 8.8541878128e-12;
