/**
 * Physical constants and unit conversions, in one place.
 * Source: CODATA 2018 recommended values (NIST, https://physics.nist.gov/cuu/Constants/).
 */

/** Reduced Planck constant, J s (CODATA 2018, exact via h). */
export const HBAR_J_S = 1.054571817e-34;
/** Electron rest mass, kg (CODATA 2018). */
export const ELECTRON_MASS_KG = 9.1093837015e-31;
/** Elementary charge, C (CODATA 2018, exact). */
export const ELEMENTARY_CHARGE_C = 1.602176634e-19;
/** Hartree energy, eV (CODATA 2018). */
export const HARTREE_EV = 27.211386245988;
/** Rydberg energy, eV (CODATA 2018): half a Hartree. */
export const RYDBERG_EV = 13.605693122994;
/** Bohr radius, Å (CODATA 2018). */
export const BOHR_ANGSTROM = 0.529177210903;
/** Boltzmann constant, eV/K (CODATA 2018, exact). */
export const BOLTZMANN_EV_PER_K = 8.617333262e-5;

/**
 * ħ²/m_e in eV·Å², derived from the constants above:
 * ħ² / (m_e · e) in J·m²/… → eV·m², times 1e20 for Å².  ≈ 7.6199642 eV·Å².
 */
export const HBAR2_OVER_ME_EV_A2 = ((HBAR_J_S * HBAR_J_S) / (ELECTRON_MASS_KG * ELEMENTARY_CHARGE_C)) * 1e20;

/** Convert a band curvature d²E/dk² (eV·Å²) to an effective mass in units of m_e. */
export function curvatureToMass(d2EdK2: number): number {
  return HBAR2_OVER_ME_EV_A2 / d2EdK2;
}

/** Convert an effective mass (m_e) to the curvature d²E/dk² (eV·Å²) of the parabola it describes. */
export function massToCurvature(mass: number): number {
  return HBAR2_OVER_ME_EV_A2 / mass;
}

export const hartreeToEv = (x: number): number => x * HARTREE_EV;
export const bohrToAngstrom = (x: number): number => x * BOHR_ANGSTROM;

/** Thermal energy k_B·T in eV. */
export function thermalEnergyEv(kelvin: number): number {
  return BOLTZMANN_EV_PER_K * kelvin;
}
