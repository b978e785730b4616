/**
 * Rotational excitation and de-excitation of a polar linear or symmetric-top molecule by electron impact
 * in the dipole Born approximation (point dipole, first Born, rigid rotor).
 *
 * In hartree atomic units (μ in e·a₀, k in bohr⁻¹, σ in a₀²), for J → J' = J ± 1 at fixed K:
 *   σ(J → J') = (8π/3) (μ²/k²) · F(J, J', K) · ln[(k + k') / |k − k'|],
 *   F(J, J+1, K) = [(J+1)² − K²] / [(J+1)(2J+1)],   F(J, J−1, K) = (J² − K²) / [J(2J+1)],
 * so that for a linear molecule (K = 0) F = J_> / (2J + 1) with J_> = max(J, J').
 * k² = 2E/E_h and k'² = 2(E − ΔE)/E_h with ΔE = E_J' − E_J, E_J = B·J(J+1) (the K-dependent term of a
 * symmetric top cancels since K is conserved). σ = 0 for E ≤ ΔE.
 * Detailed balance (2J+1) k² σ(J → J') = (2J'+1) k'² σ(J' → J) holds identically.
 * Reference: Y. Itikawa and N. Mason, Phys. Rep. 414, 1 (2005), §3 (dipole Born cross section);
 * O. H. Crawford, J. Chem. Phys. 47, 1100 (1967) (citation from memory).
 */
import { type DipoleBornRequest, dipoleBornRequestSchema } from "../../schemas/science-rotational";
import { parseScienceInput } from "../../schemas/science-scattering";
import { ANGSTROM2_PER_BOHR2, debyeToAtomicUnits, EV_PER_CM1, HARTREE_EV } from "../constants";
import { ScienceInputError } from "../errors";

/**
 * Rigid-rotor level energy E_J = B·J(J+1).
 *
 * @param j - rotational quantum number (≥ 0)
 * @param rotationalConstantCm1 - B in cm⁻¹
 * @returns E_J in eV
 */
export function rotationalLevelEnergyEv(j: number, rotationalConstantCm1: number): number {
  return rotationalConstantCm1 * j * (j + 1) * EV_PER_CM1;
}

/** Parameters of one rotational transition. */
export interface RotationalTransition {
  dipoleDebye: number;
  rotationalConstantCm1: number;
  j: number;
  jFinal: number;
  /** K projection of a symmetric top; 0 for linear molecules. */
  kProjection?: number;
}

/**
 * Angular factor F(J, J', K) of the dipole Born cross section (see the module comment).
 *
 * @returns F ≥ 0
 * @throws ScienceInputError when |J' − J| ≠ 1 or |K| exceeds J or J'
 */
export function dipoleAngularFactor(j: number, jFinal: number, kProjection = 0): number {
  if (
    !Number.isInteger(j) ||
    !Number.isInteger(jFinal) ||
    j < 0 ||
    jFinal < 0 ||
    Math.abs(jFinal - j) !== 1
  ) {
    throw new ScienceInputError(`Dipole transitions connect J to J ± 1; got J = ${j} → J' = ${jFinal}.`);
  }
  if (Math.abs(kProjection) > Math.min(j, jFinal)) {
    throw new ScienceInputError(
      `|K| = ${Math.abs(kProjection)} exceeds min(J, J') = ${Math.min(j, jFinal)}.`,
    );
  }
  const k2 = kProjection * kProjection;
  return jFinal > j ? ((j + 1) ** 2 - k2) / ((j + 1) * (2 * j + 1)) : (j * j - k2) / (j * (2 * j + 1));
}

/**
 * Dipole Born cross section of one rotational transition at one incident energy.
 *
 * @param transition - dipole (debye), B (cm⁻¹), J, J' = J ± 1, optional K
 * @param energyEv - incident electron energy E in eV (> 0)
 * @returns σ(J → J') in Å² (0 below the excitation threshold)
 * @throws ScienceInputError for a forbidden transition or a non-positive energy
 */
export function dipoleBornCrossSectionA2(transition: RotationalTransition, energyEv: number): number {
  if (!(energyEv > 0) || !Number.isFinite(energyEv)) {
    throw new ScienceInputError(`The incident energy must be > 0 eV; got ${energyEv}.`);
  }
  const factor = dipoleAngularFactor(transition.j, transition.jFinal, transition.kProjection ?? 0);
  const deltaEv =
    rotationalLevelEnergyEv(transition.jFinal, transition.rotationalConstantCm1) -
    rotationalLevelEnergyEv(transition.j, transition.rotationalConstantCm1);
  if (energyEv <= deltaEv) return 0;
  const mu = debyeToAtomicUnits(transition.dipoleDebye);
  const k2 = (2 * energyEv) / HARTREE_EV;
  const kFinal2 = (2 * (energyEv - deltaEv)) / HARTREE_EV;
  const k = Math.sqrt(k2);
  const kFinal = Math.sqrt(kFinal2);
  // ln[(k + k')/|k − k'|] = ln[(k + k')² / |k² − k'²|] with k² − k'² = 2ΔE/E_h exactly, which avoids the
  // cancellation in k − k' far above threshold.
  const logarithm = Math.log(((k + kFinal) * (k + kFinal)) / Math.abs((2 * deltaEv) / HARTREE_EV));
  return ((8 * Math.PI) / 3) * ((mu * mu) / k2) * factor * logarithm * ANGSTROM2_PER_BOHR2;
}

/** Cross sections of one transition on an energy list. */
export interface DipoleBornSeries {
  j: number;
  jFinal: number;
  kProjection: number;
  /** Excitation threshold ΔE in eV (negative for de-excitation). */
  thresholdEv: number;
  energiesEv: Float64Array;
  crossSectionA2: Float64Array;
}

/**
 * Dipole Born cross sections of one transition on a list of energies.
 *
 * @param request - validated with `dipoleBornRequestSchema` (jFinal defaults to J + 1, K to 0)
 * @returns σ(J → J') in Å² at each energy
 * @throws ScienceInputError for a malformed request or a forbidden transition
 */
export function dipoleBornCrossSections(request: DipoleBornRequest): DipoleBornSeries {
  const parsed = parseScienceInput(dipoleBornRequestSchema, request, "rotational excitation request");
  const jFinal = parsed.jFinal ?? parsed.j + 1;
  const transition: RotationalTransition = { ...parsed, jFinal };
  const energiesEv = Float64Array.from(parsed.energiesEv);
  return {
    j: parsed.j,
    jFinal,
    kProjection: parsed.kProjection,
    thresholdEv:
      rotationalLevelEnergyEv(jFinal, parsed.rotationalConstantCm1) -
      rotationalLevelEnergyEv(parsed.j, parsed.rotationalConstantCm1),
    energiesEv,
    crossSectionA2: energiesEv.map((energyEv) => dipoleBornCrossSectionA2(transition, energyEv)),
  };
}
