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
 *
 * Evaluation. With k_< = min(k, k'), k_> = max(k, k') and k_>² − k_<² = 2|ΔE|/E_h exactly,
 *   ln[(k + k')/|k − k'|] = ln[(k_> + k_<)/(k_> − k_<)] = log1p(2 k_< / (k_> − k_<))
 *                         = log1p(z),   z = 2 k_< (k_< + k_>) / (k_>² − k_<²) = 2√E_< (√E_< + √E_>) / |ΔE|,
 * (E_< = min(E, E − ΔE), E_> = max(...), all in eV; the 2/E_h of k² cancels). Neither a difference of close
 * numbers nor a ratio close to 1 is formed: far above threshold (k ≈ k') z is large, and near zero energy
 * of a de-excitation (k ≪ k') log1p keeps every digit of z ≈ 2k/k', where ln[(k + k')²/|k² − k'²|] rounds
 * its argument towards 1 and loses all digits once k/k' nears 1e-16 (E ≈ 1e-35 eV for B ≈ 1 cm⁻¹). When z
 * overflows (B tiny), ln z is summed from logarithms instead. σ = (8π/3) μ² F · (E_h/2) · log1p(z)/E is
 * formed without k², which would underflow below ~1e-322 eV.
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

/**
 * Transition energy ΔE = E_J' − E_J = B·[J'(J'+1) − J(J+1)] of a rigid rotor.
 *
 * @param j - initial rotational quantum number
 * @param jFinal - final rotational quantum number
 * @param rotationalConstantCm1 - B in cm⁻¹
 * @returns ΔE in eV (negative for de-excitation); the level difference is formed in exact integer
 *   arithmetic before it is multiplied by B
 */
export function rotationalTransitionEnergyEv(
  j: number,
  jFinal: number,
  rotationalConstantCm1: number,
): number {
  return rotationalConstantCm1 * (jFinal * (jFinal + 1) - j * (j + 1)) * EV_PER_CM1;
}

/**
 * ln[(k + k')/|k − k'|] of the dipole Born cross section as log1p(z) (see the module comment).
 *
 * @param lowerEnergyEv - E_< = min(E, E − ΔE) in eV (> 0)
 * @param higherEnergyEv - E_> = max(E, E − ΔE) in eV
 * @param levelGap - |J'(J'+1) − J(J+1)| (an integer ≥ 2)
 * @param rotationalConstantCm1 - B in cm⁻¹; |ΔE| = levelGap · B · EV_PER_CM1
 * @returns the logarithm, accurate to a few ulps from threshold to E ≫ |ΔE| and from E ≪ |ΔE| upwards
 */
function dipoleBornLogarithm(
  lowerEnergyEv: number,
  higherEnergyEv: number,
  levelGap: number,
  rotationalConstantCm1: number,
): number {
  const sqrtLower = Math.sqrt(lowerEnergyEv);
  const sqrtSum = sqrtLower + Math.sqrt(higherEnergyEv);
  // Divided by B last, so that a tiny B overflows z (handled below) instead of making |ΔE| subnormal.
  const z = (2 * sqrtLower * sqrtSum) / (levelGap * EV_PER_CM1) / rotationalConstantCm1;
  if (Number.isFinite(z)) return Math.log1p(z);
  // z beyond the double range: ln(1 + z) = ln z to far better than double precision.
  return (
    Math.LN2 +
    Math.log(sqrtLower) +
    Math.log(sqrtSum) -
    Math.log(levelGap * EV_PER_CM1) -
    Math.log(rotationalConstantCm1)
  );
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
 * @returns σ(J → J') in Å² (0 below the excitation threshold); not finite only when the true σ lies beyond
 *   the double range (E and B both near the smallest doubles), which {@link dipoleBornCrossSections} refuses
 * @throws ScienceInputError for a forbidden transition or a non-positive energy
 */
export function dipoleBornCrossSectionA2(transition: RotationalTransition, energyEv: number): number {
  if (!(energyEv > 0) || !Number.isFinite(energyEv)) {
    throw new ScienceInputError(`The incident energy must be > 0 eV; got ${energyEv}.`);
  }
  const factor = dipoleAngularFactor(transition.j, transition.jFinal, transition.kProjection ?? 0);
  const deltaEv = rotationalTransitionEnergyEv(
    transition.j,
    transition.jFinal,
    transition.rotationalConstantCm1,
  );
  if (energyEv <= deltaEv) return 0;
  const finalEnergyEv = energyEv - deltaEv;
  const logarithm = dipoleBornLogarithm(
    Math.min(energyEv, finalEnergyEv),
    Math.max(energyEv, finalEnergyEv),
    Math.abs(transition.jFinal * (transition.jFinal + 1) - transition.j * (transition.j + 1)),
    transition.rotationalConstantCm1,
  );
  const mu = debyeToAtomicUnits(transition.dipoleDebye);
  // μ²/k² · ln(…) with 1/k² = (E_h/2)/E: k² itself underflows for E below ~1e-322 eV.
  const inverseK2TimesLogarithm = (HARTREE_EV / 2) * (logarithm / energyEv);
  return ((8 * Math.PI) / 3) * mu * mu * factor * inverseK2TimesLogarithm * ANGSTROM2_PER_BOHR2;
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
 * @throws ScienceInputError for a malformed request, a forbidden transition, or a σ beyond the double
 *   range (energies and rotational constant both near the smallest doubles)
 */
export function dipoleBornCrossSections(request: DipoleBornRequest): DipoleBornSeries {
  const parsed = parseScienceInput(dipoleBornRequestSchema, request, "rotational excitation request");
  const jFinal = parsed.jFinal ?? parsed.j + 1;
  const transition: RotationalTransition = { ...parsed, jFinal };
  const energiesEv = Float64Array.from(parsed.energiesEv);
  const crossSectionA2 = energiesEv.map((energyEv) => dipoleBornCrossSectionA2(transition, energyEv));
  const overflow = crossSectionA2.findIndex((sigma) => !Number.isFinite(sigma));
  if (overflow >= 0) {
    throw new ScienceInputError(
      `The dipole Born cross section at ${energiesEv[overflow]} eV lies beyond the range of double-precision ` +
        `numbers (dipole ${parsed.dipoleDebye} D, rotational constant ${parsed.rotationalConstantCm1} cm⁻¹). ` +
        "Energies are in eV, the dipole in debye and the rotational constant in cm⁻¹: check their units.",
      { energyEv: energiesEv[overflow] },
    );
  }
  return {
    j: parsed.j,
    jFinal,
    kProjection: parsed.kProjection,
    thresholdEv: rotationalTransitionEnergyEv(parsed.j, jFinal, parsed.rotationalConstantCm1),
    energiesEv,
    crossSectionA2,
  };
}
