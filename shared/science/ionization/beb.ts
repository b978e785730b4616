/**
 * Electron-impact total ionization cross sections in the Binary-Encounter-Bethe (BEB) model.
 *
 * For an orbital with binding energy B, orbital kinetic energy U and occupation N, at incident energy T:
 *   t = T/B, u = U/B, S = 4π a₀² N (R/B)²  (R the Rydberg energy),
 *   σ_BEB = S / (t + u + 1) · [ (ln t / 2)(1 − 1/t²) + 1 − 1/t − ln t / (t + 1) ]  for T > B, else 0.
 * Reference: Y.-K. Kim and M. E. Rudd, Phys. Rev. A 50, 3954 (1994), doi:10.1103/PhysRevA.50.3954.
 *
 * Singly charged molecular ions (`variant: "singly-charged-ion"`): the denominator t + u + 1 becomes
 * t + (u + 1)/2. Source: Y.-K. Kim, K. K. Irikura and M. A. Ali, J. Res. Natl. Inst. Stand. Technol. 105,
 * 285 (2000), doi:10.6028/jres.105.032, "modified BEB for molecular ions" — the factor 1/2 is quoted from
 * memory and has not been checked against the paper; treat ion results as provisional.
 * The (u + 1)/n scaling used for heavy-atom inner orbitals is not implemented.
 *
 * Evaluation without spurious overflow: S/(t + u + 1) = 4π a₀² N · (R/B) · R/(T + U + B), so (R/B)² is
 * never formed (it overflows for B below ~1e-153 eV although σ itself is representable), T + U + B is
 * summed after dividing by the largest of the three, and ln t = ln T − ln B when t = T/B itself overflows.
 * A σ beyond the double range is refused, never returned as Infinity.
 */
import {
  type BebOrbital,
  type BebRequest,
  type BebVariant,
  bebRequestSchema,
} from "../../schemas/science-ionization";
import { parseScienceInput } from "../../schemas/science-scattering";
import { ANGSTROM2_PER_BOHR2, RYDBERG_EV } from "../constants";
import { ScienceInputError } from "../errors";

/**
 * BEB ionization cross section of one orbital at one incident energy.
 *
 * @param orbital - binding energy `bindingEv` (> 0), kinetic energy `kineticEv` (≥ 0), occupation
 * @param incidentEnergyEv - electron kinetic energy T in eV
 * @param variant - "neutral" (default) or "singly-charged-ion"
 * @returns σ in Å² (0 at and below threshold T ≤ B); +Infinity only when the true σ exceeds the double
 *   range (B far below any real binding energy), which {@link bebCrossSections} refuses
 */
export function bebOrbitalCrossSectionA2(
  orbital: Pick<BebOrbital, "bindingEv" | "kineticEv" | "occupation">,
  incidentEnergyEv: number,
  variant: BebVariant = "neutral",
): number {
  const b = orbital.bindingEv;
  const energy = incidentEnergyEv;
  if (!(energy > b)) return 0;
  const kinetic = orbital.kineticEv;
  const t = energy / b;
  const lnT = Number.isFinite(t) ? Math.log(t) : Math.log(energy) - Math.log(b);
  const inverseT = b / energy;
  const bracket = (lnT / 2) * (1 - inverseT * inverseT) + 1 - inverseT - (lnT * inverseT) / (1 + inverseT);
  // B·(t + u + 1) = T + U + B (neutral) or T + (U + B)/2 (ion), summed in units of the largest term.
  const largest = Math.max(energy, kinetic, b);
  const scaledSum =
    variant === "neutral"
      ? energy / largest + kinetic / largest + b / largest
      : energy / largest + (kinetic / largest + b / largest) / 2;
  const rydbergOverDenominator = RYDBERG_EV / largest / scaledSum;
  const prefactorA2 = 4 * Math.PI * ANGSTROM2_PER_BOHR2 * orbital.occupation * bracket;
  // Divided by B last: R/B alone overflows for B below ~1e-307 eV even where σ is representable.
  return (prefactorA2 * rydbergOverDenominator * RYDBERG_EV) / b;
}

/** Total and per-orbital BEB cross sections on an energy list. */
export interface BebCrossSections {
  energiesEv: Float64Array;
  variant: BebVariant;
  /** Σ over orbitals, Å², per energy. */
  totalA2: Float64Array;
  /** Per orbital (input order), Å², per energy. */
  orbitalA2: Float64Array[];
  orbitals: BebOrbital[];
}

/**
 * BEB cross sections of a set of orbitals on a list of incident energies.
 *
 * @param request - `{ orbitals, energiesEv, variant? }`, validated with `bebRequestSchema`
 * @returns total and per-orbital σ in Å² at each energy (0 below each orbital's threshold)
 * @throws ScienceInputError for a malformed request (non-positive binding energy, negative energy...) or
 *   a cross section beyond the double range (a binding energy of ~1e-300 eV: a units error)
 */
export function bebCrossSections(request: BebRequest): BebCrossSections {
  const { orbitals, energiesEv, variant } = parseScienceInput(bebRequestSchema, request, "BEB request");
  const n = energiesEv.length;
  const totalA2 = new Float64Array(n);
  const orbitalA2 = orbitals.map((orbital) => {
    const values = new Float64Array(n);
    for (let e = 0; e < n; e++) {
      const sigma = bebOrbitalCrossSectionA2(orbital, energiesEv[e]!, variant);
      values[e] = sigma;
      totalA2[e]! += sigma;
    }
    return values;
  });
  for (let e = 0; e < n; e++) {
    if (Number.isFinite(totalA2[e]!)) continue;
    const orbital = orbitals.findIndex((_, i) => !Number.isFinite(orbitalA2[i]![e]!));
    const named = orbital >= 0 ? orbitals[orbital]! : undefined;
    throw new ScienceInputError(
      `The BEB cross section at ${energiesEv[e]} eV exceeds the largest representable number` +
        (named
          ? ` (orbital ${orbital + 1}${named.label ? ` "${named.label}"` : ""}, binding energy ${named.bindingEv} eV)`
          : "") +
        ". Binding energies are in eV (valence orbitals of neutral molecules are bound by several eV): check " +
        "the units of the orbital file.",
      { energyEv: energiesEv[e], orbital: orbital >= 0 ? orbital + 1 : null },
    );
  }
  return { energiesEv: Float64Array.from(energiesEv), variant, totalA2, orbitalA2, orbitals };
}
