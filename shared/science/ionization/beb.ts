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
 */
import {
  type BebOrbital,
  type BebRequest,
  type BebVariant,
  bebRequestSchema,
} from "../../schemas/science-ionization";
import { parseScienceInput } from "../../schemas/science-scattering";
import { ANGSTROM2_PER_BOHR2, RYDBERG_EV } from "../constants";

/**
 * BEB ionization cross section of one orbital at one incident energy.
 *
 * @param orbital - binding energy `bindingEv` (> 0), kinetic energy `kineticEv` (≥ 0), occupation
 * @param incidentEnergyEv - electron kinetic energy T in eV
 * @param variant - "neutral" (default) or "singly-charged-ion"
 * @returns σ in Å² (0 at and below threshold T ≤ B)
 */
export function bebOrbitalCrossSectionA2(
  orbital: Pick<BebOrbital, "bindingEv" | "kineticEv" | "occupation">,
  incidentEnergyEv: number,
  variant: BebVariant = "neutral",
): number {
  const b = orbital.bindingEv;
  if (!(incidentEnergyEv > b)) return 0;
  const t = incidentEnergyEv / b;
  const u = orbital.kineticEv / b;
  const s = 4 * Math.PI * ANGSTROM2_PER_BOHR2 * orbital.occupation * (RYDBERG_EV / b) ** 2;
  const lnT = Math.log(t);
  const bracket = (lnT / 2) * (1 - 1 / (t * t)) + 1 - 1 / t - lnT / (t + 1);
  const denominator = variant === "neutral" ? t + u + 1 : t + (u + 1) / 2;
  return (s / denominator) * bracket;
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
 * @throws ScienceInputError for a malformed request (non-positive binding energy, negative energy...)
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
  return { energiesEv: Float64Array.from(energiesEv), variant, totalA2, orbitalA2, orbitals };
}
