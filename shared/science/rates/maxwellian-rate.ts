/**
 * Maxwellian rate coefficients from a tabulated cross section.
 *
 *   k(T) = √(8/(π m_e)) (k_B T)^{−3/2} ∫₀^∞ σ(E) E e^{−E/k_BT} dE = v̄ · ∫₀^∞ σ(x k_BT) x e^{−x} dx,
 * with v̄ = √(8 k_B T/(π m_e)) the mean electron speed and x = E/(k_B T).
 * Reference: e.g. M. A. Lieberman and A. J. Lichtenberg, Principles of Plasma Discharges and Materials
 * Processing, 2nd ed. (Wiley, 2005), ch. 3 (rate constants) — common practice.
 *
 * Assumptions beyond the table: σ = 0 below the first tabulated energy (the first point is the threshold;
 * a non-zero σ there is a step); linear between points; above the last point σ follows the chosen tail
 * (`zero` by default). The fraction of the Maxwellian population above the last point is reported for each
 * temperature so that callers can warn when the table is too short for the temperature.
 */
import {
  type CrossSectionTable,
  type MaxwellianRateRequest,
  maxwellianRateRequestSchema,
  type TailExtrapolation,
} from "../../schemas/science-rates";
import { parseScienceInput } from "../../schemas/science-scattering";
import { BOLTZMANN_EV_PER_K, CM2_PER_ANGSTROM2, ELECTRON_MASS_KG, ELEMENTARY_CHARGE_C } from "../constants";
import { linearTimesXExponentialWeights } from "../quadrature/exponential-moments";
import { regularizedUpperGamma } from "../quadrature/incomplete-gamma";

/**
 * Mean speed of a Maxwellian electron, v̄ = √(8 k_B T / (π m_e)).
 *
 * @param temperatureK - electron temperature in K (> 0)
 * @returns v̄ in cm/s
 */
export function meanElectronSpeedCmPerS(temperatureK: number): number {
  const thermalEnergyJ = BOLTZMANN_EV_PER_K * temperatureK * ELEMENTARY_CHARGE_C;
  return Math.sqrt((8 * thermalEnergyJ) / (Math.PI * ELECTRON_MASS_KG)) * 100;
}

/** Rate coefficients of one table at several temperatures. */
export interface MaxwellianRates {
  temperaturesK: Float64Array;
  rateCm3PerS: Float64Array;
  tail: TailExtrapolation;
  /** Q(3/2, E_N/k_BT): Maxwellian population fraction above the last tabulated energy E_N. */
  maxwellianFractionBeyondTable: Float64Array;
}

/**
 * Maxwellian rate coefficient at one temperature (no validation; see {@link maxwellianRateCoefficients}).
 *
 * Method: on each interval σ is linear, so ∫ σ x e^{−x} dx is evaluated exactly from the end values with
 * {@link linearTimesXExponentialWeights} (stable for intervals short or long compared with k_BT); the loop
 * stops once e^{−x} underflows. The tail adds σ_N (1 + x_N) e^{−x_N} (`constant`) or σ_N x_N e^{−x_N}
 * (`inverse-energy`), exact for those forms.
 *
 * @param table - increasing energies (eV, ≥ 0) and cross sections (Å², ≥ 0)
 * @param temperatureK - electron temperature in K (> 0)
 * @param tail - extrapolation above the last point
 * @param scratch - optional reusable buffers (length ≥ 3 and ≥ 2)
 * @returns k(T) in cm³/s
 */
export function maxwellianRateCoefficient(
  table: { energiesEv: ArrayLike<number>; crossSectionsA2: ArrayLike<number> },
  temperatureK: number,
  tail: TailExtrapolation = "zero",
  scratch: { moments: Float64Array; weights: Float64Array } = {
    moments: new Float64Array(3),
    weights: new Float64Array(2),
  },
): number {
  const thermalEv = BOLTZMANN_EV_PER_K * temperatureK;
  const energies = table.energiesEv;
  const sigma = table.crossSectionsA2;
  const last = energies.length - 1;
  let integral = 0;
  for (let i = 0; i < last; i++) {
    const xa = energies[i]! / thermalEv;
    const decay = Math.exp(-xa);
    if (decay === 0) break;
    const h = (energies[i + 1]! - energies[i]!) / thermalEv;
    const w = linearTimesXExponentialWeights(xa, h, scratch.moments, scratch.weights);
    integral += decay * (sigma[i]! * w[0]! + sigma[i + 1]! * w[1]!);
  }
  if (tail !== "zero") {
    const xLast = energies[last]! / thermalEv;
    const decay = Math.exp(-xLast);
    integral += sigma[last]! * (tail === "constant" ? 1 + xLast : xLast) * decay;
  }
  return meanElectronSpeedCmPerS(temperatureK) * integral * CM2_PER_ANGSTROM2;
}

/**
 * Maxwellian rate coefficients of a tabulated cross section at several temperatures.
 *
 * @param request - `{ table, temperaturesK, tail? }` validated with `maxwellianRateRequestSchema`
 * @returns k(T) in cm³/s and the population fraction beyond the table per temperature
 * @throws ScienceInputError for a malformed table (unsorted or negative energies, negative σ, length
 *   mismatch) or non-positive temperatures
 */
export function maxwellianRateCoefficients(request: MaxwellianRateRequest): MaxwellianRates {
  const { table, temperaturesK, tail } = parseScienceInput(
    maxwellianRateRequestSchema,
    request,
    "rate coefficient request",
  );
  const typed: CrossSectionTable = table;
  const scratch = { moments: new Float64Array(3), weights: new Float64Array(2) };
  const lastEv = typed.energiesEv[typed.energiesEv.length - 1]!;
  const temperatures = Float64Array.from(temperaturesK);
  return {
    temperaturesK: temperatures,
    rateCm3PerS: temperatures.map((t) => maxwellianRateCoefficient(typed, t, tail, scratch)),
    tail,
    maxwellianFractionBeyondTable: temperatures.map((t) =>
      regularizedUpperGamma(1.5, lastEv / (BOLTZMANN_EV_PER_K * t)),
    ),
  };
}
