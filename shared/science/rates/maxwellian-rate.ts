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
 *
 * Range: σ is converted to cm² before it is weighted and summed, so tables up to the largest double
 * (~1.8e308 Å²) integrate without overflow; a rate coefficient beyond the double range is refused.
 */
import {
  type CrossSectionTable,
  type MaxwellianRateRequest,
  maxwellianRateRequestSchema,
  type TailExtrapolation,
} from "../../schemas/science-rates";
import { parseScienceInput } from "../../schemas/science-scattering";
import { BOLTZMANN_EV_PER_K, BOLTZMANN_J_PER_K, CM2_PER_ANGSTROM2, ELECTRON_MASS_KG } from "../constants";
import { ScienceInputError } from "../errors";
import { linearTimesXExponentialWeights } from "../quadrature/exponential-moments";
import { regularizedUpperGamma } from "../quadrature/incomplete-gamma";

/** √(8 k_B / (π m_e)) in cm/(s·K^½): v̄ = MEAN_SPEED_CM_PER_S_SQRT_K · √T. */
const MEAN_SPEED_CM_PER_S_SQRT_K = Math.sqrt((8 * BOLTZMANN_J_PER_K) / (Math.PI * ELECTRON_MASS_KG)) * 100;

/**
 * Mean speed of a Maxwellian electron, v̄ = √(8 k_B T / (π m_e)).
 *
 * @param temperatureK - electron temperature in K (> 0)
 * @returns v̄ in cm/s (√T taken separately, so no product underflows or overflows)
 */
export function meanElectronSpeedCmPerS(temperatureK: number): number {
  return MEAN_SPEED_CM_PER_S_SQRT_K * Math.sqrt(temperatureK);
}

/** E/(k_B T); 0 for E = 0 even where k_B T underflows to 0 (T below ~1e-319 K). */
function reducedEnergy(energyEv: number, thermalEv: number): number {
  return energyEv === 0 ? 0 : energyEv / thermalEv;
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
 * @returns k(T) in cm³/s; +Infinity only when the true rate exceeds the double range, which
 *   {@link maxwellianRateCoefficients} refuses
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
  // In cm²: σ up to ~1.8e308 Å² times weights of order 1 to 1e3 stays finite (1e16 of headroom).
  let integralCm2 = 0;
  for (let i = 0; i < last; i++) {
    const xa = reducedEnergy(energies[i]!, thermalEv);
    const decay = Math.exp(-xa);
    if (decay === 0) break;
    const h = (energies[i + 1]! - energies[i]!) / thermalEv;
    const w = linearTimesXExponentialWeights(xa, h, scratch.moments, scratch.weights);
    const sigmaACm2 = sigma[i]! * CM2_PER_ANGSTROM2;
    const sigmaBCm2 = sigma[i + 1]! * CM2_PER_ANGSTROM2;
    integralCm2 += decay * (sigmaACm2 * w[0]! + sigmaBCm2 * w[1]!);
  }
  if (tail !== "zero") {
    const xLast = reducedEnergy(energies[last]!, thermalEv);
    const decay = Math.exp(-xLast);
    if (decay > 0) {
      integralCm2 += sigma[last]! * CM2_PER_ANGSTROM2 * (tail === "constant" ? 1 + xLast : xLast) * decay;
    }
  }
  return meanElectronSpeedCmPerS(temperatureK) * integralCm2;
}

/**
 * Maxwellian rate coefficients of a tabulated cross section at several temperatures.
 *
 * @param request - `{ table, temperaturesK, tail? }` validated with `maxwellianRateRequestSchema`
 * @returns k(T) in cm³/s and the population fraction beyond the table per temperature
 * @throws ScienceInputError for a malformed table (unsorted or negative energies, negative σ, length
 *   mismatch), non-positive temperatures, or a rate coefficient beyond the double range
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
  const rateCm3PerS = temperatures.map((t) => maxwellianRateCoefficient(typed, t, tail, scratch));
  const overflow = rateCm3PerS.findIndex((rate) => !Number.isFinite(rate));
  if (overflow >= 0) {
    const largestA2 = typed.crossSectionsA2.reduce((largest, sigma) => Math.max(largest, sigma), 0);
    throw new ScienceInputError(
      `The rate coefficient at ${temperatures[overflow]} K exceeds the largest representable number ` +
        `(largest cross section in the table: ${largestA2} Å²). Cross sections are ` +
        "in Å² (1 Å² = 1e-16 cm²) and temperatures in K: check the units of the table and the temperatures.",
      { temperatureK: temperatures[overflow] },
    );
  }
  return {
    temperaturesK: temperatures,
    rateCm3PerS,
    tail,
    maxwellianFractionBeyondTable: temperatures.map((t) =>
      regularizedUpperGamma(1.5, lastEv / (BOLTZMANN_EV_PER_K * t)),
    ),
  };
}
