/**
 * Physical constants and unit conversions used across Sigmaflow's science core.
 *
 * Every value is the CODATA 2018 recommended value (Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021);
 * NIST "Fundamental Physical Constants", physics.nist.gov/constants). Exact SI-defining constants
 * (h, c, e, k_B, N_A) are marked "exact". Conversions are derived from these, never typed twice.
 */

/** Planck constant h in J·s (exact, SI 2019). */
export const PLANCK_J_S = 6.62607015e-34;
/** Reduced Planck constant ħ = h/2π in J·s. */
export const HBAR_J_S = PLANCK_J_S / (2 * Math.PI);
/** Speed of light in vacuum in m/s (exact). */
export const SPEED_OF_LIGHT_M_PER_S = 299_792_458;
/** Elementary charge in C (exact). */
export const ELEMENTARY_CHARGE_C = 1.602176634e-19;
/** Boltzmann constant in J/K (exact). */
export const BOLTZMANN_J_PER_K = 1.380649e-23;
/** Boltzmann constant in eV/K (exact ratio of two exact constants). */
export const BOLTZMANN_EV_PER_K = BOLTZMANN_J_PER_K / ELEMENTARY_CHARGE_C;
/** Avogadro constant in 1/mol (exact). */
export const AVOGADRO_PER_MOL = 6.02214076e23;

/** Hartree energy E_h in eV (CODATA 2018: 27.211 386 245 988(53) eV). */
export const HARTREE_EV = 27.211386245988;
/** Rydberg energy hcR∞ in eV (CODATA 2018: 13.605 693 122 994(26) eV), equal to E_h / 2. */
export const RYDBERG_EV = 13.605693122994;
/** Bohr radius a₀ in m (CODATA 2018: 5.291 772 109 03(80) × 10⁻¹¹ m). */
export const BOHR_RADIUS_M = 5.29177210903e-11;
/** Bohr radius a₀ in Å. */
export const BOHR_RADIUS_ANGSTROM = BOHR_RADIUS_M * 1e10;
/** Electron mass in kg (CODATA 2018: 9.109 383 7015(28) × 10⁻³¹ kg). */
export const ELECTRON_MASS_KG = 9.1093837015e-31;
/** Electron mass in unified atomic mass units u (CODATA 2018: 5.485 799 090 65(16) × 10⁻⁴ u). */
export const ELECTRON_MASS_U = 5.48579909065e-4;
/** Atomic mass constant m_u = 1 u in kg (CODATA 2018: 1.660 539 066 60(50) × 10⁻²⁷ kg). */
export const ATOMIC_MASS_CONSTANT_KG = 1.6605390666e-27;
/** Atomic unit of electric dipole moment e·a₀ in C·m (CODATA 2018: 8.478 353 6255(13) × 10⁻³⁰ C·m). */
export const ATOMIC_UNIT_DIPOLE_C_M = 8.4783536255e-30;
/** One debye in C·m: 10⁻²¹ / c (definition of the debye as 10⁻¹⁸ statC·cm). */
export const DEBYE_C_M = 1e-21 / SPEED_OF_LIGHT_M_PER_S;

// ---- derived conversions ---------------------------------------------------------------------------

/** 1 cm⁻¹ expressed in eV: h·c·(100 m⁻¹) / e. */
export const EV_PER_CM1 = (PLANCK_J_S * SPEED_OF_LIGHT_M_PER_S * 100) / ELEMENTARY_CHARGE_C;
/** 1 K (as k_B·T) expressed in eV. */
export const EV_PER_KELVIN = BOLTZMANN_EV_PER_K;
/** 1 a₀² in Å². */
export const ANGSTROM2_PER_BOHR2 = BOHR_RADIUS_ANGSTROM ** 2;
/** 1 Å² in cm². */
export const CM2_PER_ANGSTROM2 = 1e-16;
/** 1 Å² in m². */
export const M2_PER_ANGSTROM2 = 1e-20;
/** 1 e·a₀ in debye. */
export const DEBYE_PER_ATOMIC_UNIT = ATOMIC_UNIT_DIPOLE_C_M / DEBYE_C_M;

export type EnergyUnit = "eV" | "hartree" | "cm-1" | "K";
export type AreaUnit = "angstrom2" | "bohr2" | "cm2" | "m2";

const EV_PER_ENERGY_UNIT: Record<EnergyUnit, number> = {
  eV: 1,
  hartree: HARTREE_EV,
  "cm-1": EV_PER_CM1,
  K: EV_PER_KELVIN,
};

const ANGSTROM2_PER_AREA_UNIT: Record<AreaUnit, number> = {
  angstrom2: 1,
  bohr2: ANGSTROM2_PER_BOHR2,
  cm2: 1 / CM2_PER_ANGSTROM2,
  m2: 1 / M2_PER_ANGSTROM2,
};

/**
 * Converts an energy between eV, hartree, wavenumber (cm⁻¹) and temperature equivalent (K, as k_B·T).
 *
 * @param value - the energy in unit `from`
 * @param from - unit of `value`
 * @param to - unit of the result
 * @returns the energy in unit `to`
 */
export function convertEnergy(value: number, from: EnergyUnit, to: EnergyUnit): number {
  return (value * EV_PER_ENERGY_UNIT[from]) / EV_PER_ENERGY_UNIT[to];
}

/**
 * Converts an area (a cross section) between Å², a₀², cm² and m².
 *
 * @param value - the area in unit `from`
 * @param from - unit of `value`
 * @param to - unit of the result
 * @returns the area in unit `to`
 */
export function convertArea(value: number, from: AreaUnit, to: AreaUnit): number {
  return (value * ANGSTROM2_PER_AREA_UNIT[from]) / ANGSTROM2_PER_AREA_UNIT[to];
}

/** Converts a dipole moment from debye to atomic units (e·a₀). */
export function debyeToAtomicUnits(dipoleDebye: number): number {
  return dipoleDebye / DEBYE_PER_ATOMIC_UNIT;
}

/** Converts a dipole moment from atomic units (e·a₀) to debye. */
export function atomicUnitsToDebye(dipoleAtomicUnits: number): number {
  return dipoleAtomicUnits * DEBYE_PER_ATOMIC_UNIT;
}
