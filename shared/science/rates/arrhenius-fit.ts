/**
 * Fit of rate coefficients to the modified Arrhenius form k(T) = α (T/300 K)^β exp(−γ/T), the form used by
 * astrochemical and plasma-chemistry reaction networks (e.g. the UMIST Database for Astrochemistry,
 * McElroy et al., Astron. Astrophys. 550, A36 (2013)).
 */
import { levenbergMarquardt } from "ml-levenberg-marquardt";
import { ScienceInputError } from "../errors";
import { solveLeastSquares } from "../linear-algebra/least-squares";

/** Modified Arrhenius parameters and fit quality. */
export interface ArrheniusFit {
  /** α in cm³/s (the rate at 300 K when γ = 0). */
  alpha: number;
  /** β, dimensionless temperature exponent. */
  beta: number;
  /** γ in K (activation temperature). */
  gamma: number;
  /** √(mean of ((k_fit − k)/k)²) over the points. */
  rmsRelativeResidual: number;
  /** Whether the Levenberg–Marquardt refinement ran (and was kept). */
  refined: boolean;
}

/**
 * Modified Arrhenius rate α (T/300)^β exp(−γ/T).
 *
 * @param temperatureK - T in K
 * @param parameters - α (cm³/s), β, γ (K)
 * @returns k in cm³/s
 */
export function modifiedArrheniusRate(
  temperatureK: number,
  parameters: { alpha: number; beta: number; gamma: number },
): number {
  return (
    parameters.alpha * (temperatureK / 300) ** parameters.beta * Math.exp(-parameters.gamma / temperatureK)
  );
}

function rmsRelative(
  temperaturesK: number[],
  rates: number[],
  fit: { alpha: number; beta: number; gamma: number },
) {
  let sum = 0;
  for (let i = 0; i < rates.length; i++) {
    sum += ((modifiedArrheniusRate(temperaturesK[i]!, fit) - rates[i]!) / rates[i]!) ** 2;
  }
  return Math.sqrt(sum / rates.length);
}

/**
 * Fits α, β, γ to rate coefficients.
 *
 * Method:
 *  1. ln k = ln α + β ln(T/300) − γ/T is linear in (ln α, β, γ): solve it by Householder least squares
 *     (this minimises the squared logarithmic residuals, i.e. approximately the relative errors).
 *  2. Optionally (`refine`), minimise the squared relative residuals Σ((k_fit − k)/k)² exactly with
 *     Levenberg–Marquardt (ml-levenberg-marquardt, analytic Jacobian) starting from step 1; the result is
 *     kept only if it lowers the relative RMS.
 *
 * @param temperaturesK - temperatures in K (> 0, at least 3 distinct)
 * @param rateCm3PerS - rate coefficients in cm³/s (> 0)
 * @param options.refine - run step 2 (default false)
 * @returns α (cm³/s), β, γ (K) and the relative RMS residual
 * @throws ScienceInputError for mismatched lengths, fewer than 3 points, non-positive values, or a
 *   degenerate temperature set
 */
export function fitModifiedArrhenius(
  temperaturesK: ArrayLike<number>,
  rateCm3PerS: ArrayLike<number>,
  options: { refine?: boolean } = {},
): ArrheniusFit {
  const m = temperaturesK.length;
  if (rateCm3PerS.length !== m) {
    throw new ScienceInputError(`Got ${m} temperatures but ${rateCm3PerS.length} rate coefficients.`);
  }
  if (m < 3) throw new ScienceInputError(`An Arrhenius fit needs at least 3 temperatures; got ${m}.`);
  const temperatures = Array.from(temperaturesK);
  const rates = Array.from(rateCm3PerS);
  temperatures.forEach((t, i) => {
    if (!(t > 0) || !Number.isFinite(t)) throw new ScienceInputError(`Temperature ${t} K is not > 0.`);
    if (!(rates[i]! > 0) || !Number.isFinite(rates[i]!)) {
      throw new ScienceInputError(
        `The rate coefficient at ${t} K is ${rates[i]}; an Arrhenius fit needs positive rates (take the logarithm).`,
      );
    }
  });
  const design = new Float64Array(m * 3);
  const logRates = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    design[i * 3] = 1;
    design[i * 3 + 1] = Math.log(temperatures[i]! / 300);
    design[i * 3 + 2] = -1 / temperatures[i]!;
    logRates[i] = Math.log(rates[i]!);
  }
  const { solution } = solveLeastSquares(design, m, 3, logRates);
  const linear = { alpha: Math.exp(solution[0]!), beta: solution[1]!, gamma: solution[2]! };
  const linearRms = rmsRelative(temperatures, rates, linear);
  if (!options.refine) return { ...linear, rmsRelativeResidual: linearRms, refined: false };

  // Fit the ratios k_fit(T_i)/k_i to 1, with γ scaled by the mean temperature to keep parameters O(1).
  const temperatureScale = temperatures.reduce((s, t) => s + t, 0) / m;
  const ratio =
    ([logAlpha, beta, gammaScaled]: number[]) =>
    (index: number): number =>
      Math.exp(
        logAlpha! +
          beta! * Math.log(temperatures[index]! / 300) -
          (gammaScaled! * temperatureScale) / temperatures[index]! -
          logRates[index]!,
      );
  const jacobian = (parameters: number[]) => {
    const value = ratio(parameters);
    return (index: number): number[] => {
      const f = value(index);
      return [f, f * Math.log(temperatures[index]! / 300), (-f * temperatureScale) / temperatures[index]!];
    };
  };
  const refined = levenbergMarquardt({ x: temperatures.map((_, i) => i), y: new Array(m).fill(1) }, ratio, {
    initialValues: [solution[0]!, solution[1]!, solution[2]! / temperatureScale],
    jacobianFunction: jacobian,
    damping: 1e-3,
    maxIterations: 200,
    errorTolerance: 1e-20,
  });
  const [logAlpha, beta, gammaScaled] = refined.parameterValues as [number, number, number];
  const candidate = { alpha: Math.exp(logAlpha), beta, gamma: gammaScaled * temperatureScale };
  const candidateRms = rmsRelative(temperatures, rates, candidate);
  if (Number.isFinite(candidateRms) && candidateRms < linearRms) {
    return { ...candidate, rmsRelativeResidual: candidateRms, refined: true };
  }
  return { ...linear, rmsRelativeResidual: linearRms, refined: false };
}
