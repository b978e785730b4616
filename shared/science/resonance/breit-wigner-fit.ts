/**
 * Fit of an isolated resonance in an eigenphase sum to the Breit–Wigner form on a linear background.
 *
 *   δ(E) = a + b·E + arctan[(Γ/2) / (E_r − E)],
 *
 * with the arctan taken on its continuous branch, atan2(Γ/2, E_r − E), which rises from 0 well below E_r
 * through π/2 at E_r to π well above: the resonant eigenphase gains π across the resonance.
 * Reference: G. Breit and E. Wigner, Phys. Rev. 49, 519 (1936); for eigenphase-sum fits, A. U. Hazi,
 * Phys. Rev. A 19, 920 (1979).
 */
import { levenbergMarquardt } from "ml-levenberg-marquardt";
import { ScienceInputError } from "../errors";

/** Fitted resonance parameters. */
export interface BreitWignerFit {
  /** E_r in eV. */
  resonanceEnergyEv: number;
  /** Full width Γ in eV. */
  widthEv: number;
  /** Background intercept a in rad (value of the background at E = 0). */
  backgroundInterceptRad: number;
  /** Background slope b in rad/eV. */
  backgroundSlopeRadPerEv: number;
  /** Root-mean-square residual of the fit in rad. */
  rmsResidualRad: number;
  /** Levenberg–Marquardt iterations used. */
  iterations: number;
}

/**
 * Breit–Wigner phase with linear background at one energy (the fitted model).
 *
 * @param energyEv - E in eV
 * @param fit - parameters (position, width, background)
 * @returns δ(E) in rad
 */
export function breitWignerPhase(
  energyEv: number,
  fit: Pick<
    BreitWignerFit,
    "resonanceEnergyEv" | "widthEv" | "backgroundInterceptRad" | "backgroundSlopeRadPerEv"
  >,
): number {
  return (
    fit.backgroundInterceptRad +
    fit.backgroundSlopeRadPerEv * energyEv +
    Math.atan2(fit.widthEv / 2, fit.resonanceEnergyEv - energyEv)
  );
}

const MIN_POINTS = 6;

function median(values: number[]): number {
  const sorted = [...values].sort((p, q) => p - q);
  const middle = sorted.length >> 1;
  return sorted.length % 2 ? sorted[middle]! : (sorted[middle - 1]! + sorted[middle]!) / 2;
}

/**
 * Fits E_r, Γ and a linear background to a continuous eigenphase sum.
 *
 * Method:
 *  1. Sort by energy and map E to s = (E − E_mid)/h (h = half the window) so that all four parameters are
 *     of order one (the damping of the fitter is additive, so scaling matters).
 *  2. Initial guess from central differences dδ/dE: E_r at their maximum, background slope b₀ = their median,
 *     Γ from the full width at half maximum of the derivative peak above b₀ (a Lorentzian of FWHM Γ for the
 *     pure Breit–Wigner term), or 2/(max − b₀) when the half-maximum is not reached on both sides.
 *  3. Levenberg–Marquardt (ml-levenberg-marquardt) with the analytic Jacobian, Γ kept positive.
 *  4. Reject fits whose E_r lies outside the data or whose Γ exceeds the energy window.
 * The data must be continuous (remove π jumps first, e.g. with `unwrapPhases`).
 *
 * @param energiesEv - energies in eV (≥ 6 distinct points)
 * @param eigenphaseSumRad - eigenphase sum at those energies in rad
 * @param options.maxIterations - fitter iteration cap (default 100)
 * @returns position, width, background and RMS residual
 * @throws ScienceInputError for mismatched or too few points, or when the data has no resonance-like rise
 *   (no derivative peak standing above the background, or a fit outside the window)
 */
export function fitBreitWignerResonance(
  energiesEv: ArrayLike<number>,
  eigenphaseSumRad: ArrayLike<number>,
  options: { maxIterations?: number } = {},
): BreitWignerFit {
  if (energiesEv.length !== eigenphaseSumRad.length) {
    throw new ScienceInputError(
      `Got ${energiesEv.length} energies but ${eigenphaseSumRad.length} eigenphase values.`,
    );
  }
  const points = Array.from({ length: energiesEv.length }, (_, i) => ({
    energy: energiesEv[i]!,
    phase: eigenphaseSumRad[i]!,
  }))
    .filter((point) => Number.isFinite(point.energy) && Number.isFinite(point.phase))
    .sort((p, q) => p.energy - q.energy);
  if (points.length !== energiesEv.length) {
    throw new ScienceInputError("Energies and eigenphases must be finite numbers.");
  }
  for (let i = 1; i < points.length; i++) {
    if (points[i]!.energy === points[i - 1]!.energy) {
      throw new ScienceInputError(`Energy ${points[i]!.energy} eV appears twice.`);
    }
  }
  if (points.length < MIN_POINTS) {
    throw new ScienceInputError(`A resonance fit needs at least ${MIN_POINTS} points; got ${points.length}.`);
  }
  const energy = points.map((point) => point.energy);
  const phase = points.map((point) => point.phase);
  const n = energy.length;
  const lowEv = energy[0]!;
  const highEv = energy[n - 1]!;
  const centreEv = (lowEv + highEv) / 2;
  const halfSpanEv = (highEv - lowEv) / 2;
  const spanEv = highEv - lowEv;

  // 2. Initial guess from the derivative peak.
  const slopes: number[] = [];
  for (let i = 1; i < n - 1; i++)
    slopes.push((phase[i + 1]! - phase[i - 1]!) / (energy[i + 1]! - energy[i - 1]!));
  let peak = 0;
  for (let i = 1; i < slopes.length; i++) if (slopes[i]! > slopes[peak]!) peak = i;
  const background = median(slopes);
  const excess = slopes[peak]! - background;
  if (!(excess * spanEv > 2)) {
    throw new ScienceInputError(
      "No resonance-like rise in the eigenphase sum: the steepest slope " +
        `(${slopes[peak]!.toPrecision(3)} rad/eV) does not stand out from the background slope ` +
        `(${background.toPrecision(3)} rad/eV) enough for a width narrower than the ${spanEv} eV window.`,
    );
  }
  const slopeEnergy = (i: number) => energy[i + 1]!;
  const halfLevel = background + excess / 2;
  const crossing = (from: number, step: 1 | -1): number | undefined => {
    for (let i = from; i + step >= 0 && i + step < slopes.length; i += step) {
      const next = i + step;
      if (slopes[next]! < halfLevel) {
        const fraction = (slopes[i]! - halfLevel) / (slopes[i]! - slopes[next]!);
        return slopeEnergy(i) + fraction * (slopeEnergy(next) - slopeEnergy(i));
      }
    }
    return undefined;
  };
  const left = crossing(peak, -1);
  const right = crossing(peak, 1);
  const width0Ev = left !== undefined && right !== undefined ? right - left : 2 / excess;
  const position0Ev = slopeEnergy(peak);
  let intercept0 = 0;
  for (let i = 0; i < n; i++) {
    intercept0 += phase[i]! - background * energy[i]! - Math.atan2(width0Ev / 2, position0Ev - energy[i]!);
  }
  intercept0 /= n;

  // 3. Fit in scaled variables s = (E − centre)/h; parameters [a', b', s_r, g = Γ/(2h)].
  const scaled = energy.map((e) => (e - centreEv) / halfSpanEv);
  const initialValues = [
    intercept0 + background * centreEv,
    background * halfSpanEv,
    (position0Ev - centreEv) / halfSpanEv,
    width0Ev / (2 * halfSpanEv),
  ];
  const model =
    ([a, b, sr, g]: number[]) =>
    (s: number): number =>
      a! + b! * s + Math.atan2(g!, sr! - s);
  const jacobian =
    ([, , sr, g]: number[]) =>
    (s: number): number[] => {
      const x = sr! - s;
      const denominator = x * x + g! * g!;
      return [1, s, -g! / denominator, x / denominator];
    };
  const fitted = levenbergMarquardt({ x: scaled, y: phase }, model, {
    initialValues,
    jacobianFunction: jacobian,
    damping: 1e-2,
    maxIterations: options.maxIterations ?? 100,
    errorTolerance: 1e-15,
    minValues: [-1e9, -1e9, -1e3, 1e-12],
    maxValues: [1e9, 1e9, 1e3, 1e3],
  });
  const [a, b, sr, g] = fitted.parameterValues as [number, number, number, number];
  const resonanceEnergyEv = centreEv + halfSpanEv * sr;
  const widthEv = 2 * halfSpanEv * g;
  const backgroundSlopeRadPerEv = b / halfSpanEv;
  const backgroundInterceptRad = a - (b * centreEv) / halfSpanEv;

  // 4. Plausibility of the fitted resonance.
  if (![resonanceEnergyEv, widthEv, backgroundSlopeRadPerEv, backgroundInterceptRad].every(Number.isFinite)) {
    throw new ScienceInputError("The resonance fit did not converge to finite parameters.");
  }
  if (resonanceEnergyEv < lowEv || resonanceEnergyEv > highEv) {
    throw new ScienceInputError(
      `No resonance-like rise inside the data: the fitted position ${resonanceEnergyEv.toPrecision(4)} eV lies ` +
        `outside ${lowEv}–${highEv} eV.`,
    );
  }
  if (widthEv >= spanEv) {
    throw new ScienceInputError(
      `No resonance-like rise: the fitted width ${widthEv.toPrecision(3)} eV is not narrower than the ` +
        `${spanEv} eV window.`,
    );
  }
  const fit = { resonanceEnergyEv, widthEv, backgroundInterceptRad, backgroundSlopeRadPerEv };
  let sumSquares = 0;
  for (let i = 0; i < n; i++) sumSquares += (phase[i]! - breitWignerPhase(energy[i]!, fit)) ** 2;
  return { ...fit, rmsResidualRad: Math.sqrt(sumSquares / n), iterations: fitted.iterations };
}
