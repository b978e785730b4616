/**
 * Integral cross sections of potential scattering from partial-wave phase shifts (hartree atomic units,
 * electron mass: E = k²/2, k in bohr⁻¹, cross sections in bohr²).
 *
 * Reference: N. F. Mott and H. S. W. Massey, The Theory of Atomic Collisions, 3rd ed. (Oxford, 1965);
 * the momentum-transfer form is standard in swarm and plasma work (e.g. Y. Itikawa, Molecular Processes in
 * Plasmas, Springer, 2007).
 */
import { ANGSTROM2_PER_BOHR2, HARTREE_EV } from "../constants";
import { ScienceInputError } from "../errors";

function checkWavenumber(wavenumberPerBohr: number): void {
  if (!Number.isFinite(wavenumberPerBohr) || wavenumberPerBohr <= 0) {
    throw new ScienceInputError(`wavenumberPerBohr must be positive and finite; got ${wavenumberPerBohr}.`);
  }
}

/**
 * Electron wave number from its kinetic energy: k = √(2E/E_h) in bohr⁻¹.
 *
 * @param energyEv - kinetic energy in eV (≥ 0)
 * @returns k in bohr⁻¹
 */
export function wavenumberPerBohrFromEnergyEv(energyEv: number): number {
  if (!Number.isFinite(energyEv) || energyEv < 0) {
    throw new ScienceInputError(`Energy must be ≥ 0 eV; got ${energyEv}.`);
  }
  return Math.sqrt((2 * energyEv) / HARTREE_EV);
}

/**
 * Elastic integral cross section σ = (4π/k²) Σ_l (2l + 1) sin² δ_l.
 *
 * @param wavenumberPerBohr - k in bohr⁻¹ (> 0)
 * @param phaseShiftsRad - δ_0 … δ_L in radians (higher l taken as 0)
 * @returns σ in bohr² (multiply by `ANGSTROM2_PER_BOHR2` for Å², or use the Å² variant)
 */
export function elasticCrossSectionBohr2(
  wavenumberPerBohr: number,
  phaseShiftsRad: ArrayLike<number>,
): number {
  checkWavenumber(wavenumberPerBohr);
  let sum = 0;
  for (let l = 0; l < phaseShiftsRad.length; l++) sum += (2 * l + 1) * Math.sin(phaseShiftsRad[l]!) ** 2;
  return ((4 * Math.PI) / (wavenumberPerBohr * wavenumberPerBohr)) * sum;
}

/**
 * Momentum-transfer (diffusion) cross section σ_m = (4π/k²) Σ_l (l + 1) sin²(δ_{l+1} − δ_l).
 *
 * The sum runs to l = L with δ_{L+1} = 0, consistent with δ_l = 0 beyond the given set.
 *
 * @param wavenumberPerBohr - k in bohr⁻¹ (> 0)
 * @param phaseShiftsRad - δ_0 … δ_L in radians
 * @returns σ_m in bohr²
 */
export function momentumTransferCrossSectionBohr2(
  wavenumberPerBohr: number,
  phaseShiftsRad: ArrayLike<number>,
): number {
  checkWavenumber(wavenumberPerBohr);
  let sum = 0;
  for (let l = 0; l < phaseShiftsRad.length; l++) {
    const next = l + 1 < phaseShiftsRad.length ? phaseShiftsRad[l + 1]! : 0;
    sum += (l + 1) * Math.sin(next - phaseShiftsRad[l]!) ** 2;
  }
  return ((4 * Math.PI) / (wavenumberPerBohr * wavenumberPerBohr)) * sum;
}

/**
 * Elastic and momentum-transfer cross sections in Å² at an electron energy in eV.
 *
 * @param energyEv - kinetic energy in eV (> 0)
 * @param phaseShiftsRad - δ_0 … δ_L at that energy
 * @returns `{ elasticA2, momentumTransferA2 }`
 */
export function partialWaveCrossSectionsA2(
  energyEv: number,
  phaseShiftsRad: ArrayLike<number>,
): { elasticA2: number; momentumTransferA2: number } {
  const k = wavenumberPerBohrFromEnergyEv(energyEv);
  return {
    elasticA2: elasticCrossSectionBohr2(k, phaseShiftsRad) * ANGSTROM2_PER_BOHR2,
    momentumTransferA2: momentumTransferCrossSectionBohr2(k, phaseShiftsRad) * ANGSTROM2_PER_BOHR2,
  };
}
