/**
 * What every derivation shares: the shape of a derived result row (a stored result without its id, run and
 * time), the temperature grid of rate coefficients and the rate coefficient with its modified-Arrhenius fit.
 */
import type { ArrheniusFitResult, Result, RunAnalysis } from "../../shared/schemas/results";
import { BOLTZMANN_EV_PER_K } from "../../shared/science/constants";
import { ScienceInputError } from "../../shared/science/errors";
import { logGrid } from "../../shared/science/grids";
import { regularizedUpperGamma } from "../../shared/science/quadrature";
import {
  fitModifiedArrhenius,
  maxwellianRateCoefficients,
  modifiedArrheniusRate,
} from "../../shared/science/rates";

/** A result as a derivation produces it; the postprocess step adds the run and stores it. */
export type DerivedResult = Omit<Result, "id" | "runId" | "createdAt">;

/** Results of one collected file plus sentences for the run's results message (what was skipped and why). */
export interface Derivation {
  results: DerivedResult[];
  notes: string[];
}

/** Temperatures of a rate-coefficient table. */
export const RATE_TEMPERATURE_POINTS = 41;

/**
 * One result row from named columns; the first column is the independent variable.
 *
 * @throws ScienceInputError when a value is not finite (JSON cannot hold it and a reader never should
 *   have let it through) or the columns differ in length
 */
export function resultRow(
  head: Pick<DerivedResult, "kind" | "process" | "irrep" | "label" | "method"> & {
    fit?: ArrheniusFitResult | null;
  },
  columns: [string, ArrayLike<number>][],
): DerivedResult {
  const length = columns[0]?.[1].length ?? 0;
  const record: Record<string, number[]> = {};
  for (const [name, values] of columns) {
    if (values.length !== length) {
      throw new Error(`Result column ${name} has ${values.length} values; expected ${length}.`);
    }
    const array = Array.from(values);
    const bad = array.findIndex((value) => !Number.isFinite(value));
    if (bad >= 0) {
      throw new ScienceInputError(
        `${head.kind} (${head.process}${head.irrep ? `, ${head.irrep}` : ""}${head.label ? `, ${head.label}` : ""}): ` +
          `${name} is ${array[bad]} at point ${bad + 1}.`,
      );
    }
    record[name] = array;
  }
  return { ...head, fit: head.fit ?? null, columns: record, columnOrder: columns.map(([name]) => name) };
}

/**
 * The analysis's temperatures, log-spaced from temperatureMinK to temperatureMaxK.
 *
 * @throws ScienceInputError when the range is empty
 */
export function rateTemperaturesK(analysis: RunAnalysis): number[] {
  if (!(analysis.temperatureMaxK > analysis.temperatureMinK)) {
    throw new ScienceInputError(
      `the analysis's temperatureMinK (${analysis.temperatureMinK} K) must be below its temperatureMaxK ` +
        `(${analysis.temperatureMaxK} K)`,
    );
  }
  return logGrid(analysis.temperatureMinK, analysis.temperatureMaxK, RATE_TEMPERATURE_POINTS);
}

/** Significant digits for numbers quoted in method strings. */
export const quote = (value: number, digits = 4) => Number(value.toPrecision(digits)).toString();

/**
 * Maxwellian rate coefficients of a cross section at the analysis's temperatures, with their
 * modified-Arrhenius fit k(T) = α (T/300 K)^β exp(−γ/T).
 *
 * Method: shared/science/rates `maxwellianRateCoefficients` — σ linear between the table's points, 0 below
 * its first energy and 0 above its last (tail "zero": no extrapolation beyond what was computed); the
 * Maxwellian population outside the table is quoted in the method so a reader can judge the truncation.
 * The fit (`fitModifiedArrhenius`: least squares in ln k, refined by Levenberg–Marquardt on relative
 * residuals) uses the temperatures with a positive rate; `maxRelativeDeviation` is its largest
 * |k_fit − k|/k there.
 *
 * @param table - energies (eV, increasing) and σ (Å²)
 * @param firstPointIsThreshold - σ really is 0 below the first energy (an ionization threshold); otherwise
 *   the population below the first energy is quoted as well
 * @returns the row and notes (a fit that could not be made)
 */
export function rateCoefficientResult(
  head: Pick<DerivedResult, "process" | "irrep" | "label"> & { source: string },
  table: { energiesEv: ArrayLike<number>; crossSectionsA2: ArrayLike<number> },
  analysis: RunAnalysis,
  firstPointIsThreshold: boolean,
): Derivation {
  const { source, ...key } = head;
  if (table.energiesEv.length < 2) {
    return {
      results: [],
      notes: [`No ${key.process} rate coefficient: its cross section has a single energy.`],
    };
  }
  const temperaturesK = rateTemperaturesK(analysis);
  const rates = maxwellianRateCoefficients({
    table: { energiesEv: Array.from(table.energiesEv), crossSectionsA2: Array.from(table.crossSectionsA2) },
    temperaturesK,
    tail: "zero",
  });
  const firstEv = table.energiesEv[0]!;
  const lastEv = table.energiesEv[table.energiesEv.length - 1]!;
  const beyond = Math.max(...rates.maxwellianFractionBeyondTable);
  // Fraction of a Maxwellian below E₁ is 1 − Q(3/2, E₁/k_BT), largest at the lowest temperature.
  const below = 1 - regularizedUpperGamma(1.5, firstEv / (BOLTZMANN_EV_PER_K * temperaturesK[0]!));
  const notes: string[] = [];
  const fitted = temperaturesK
    .map((t, i) => ({ t, k: rates.rateCm3PerS[i]! }))
    .filter((point) => point.k > 0 && Number.isFinite(point.k));
  let fit: ArrheniusFitResult | null = null;
  if (fitted.length >= 3) {
    const parameters = fitModifiedArrhenius(
      fitted.map((p) => p.t),
      fitted.map((p) => p.k),
      { refine: true },
    );
    const maxRelativeDeviation = Math.max(
      ...fitted.map((p) => Math.abs(modifiedArrheniusRate(p.t, parameters) - p.k) / p.k),
    );
    if ([parameters.alpha, parameters.beta, parameters.gamma, maxRelativeDeviation].every(Number.isFinite)) {
      fit = {
        alpha_cm3_per_s: parameters.alpha,
        beta: parameters.beta,
        gamma_K: parameters.gamma,
        minTemperatureK: fitted[0]!.t,
        maxTemperatureK: fitted[fitted.length - 1]!.t,
        maxRelativeDeviation,
      };
    }
  }
  if (!fit) {
    notes.push(
      `No modified-Arrhenius fit of the ${key.process} rate coefficient: fewer than 3 temperatures give a positive rate.`,
    );
  }
  const method =
    `Maxwellian rate coefficient k(T) = √(8k_BT/πm_e) ∫ σ(E) (E/k_BT) e^(−E/k_BT) dE/k_BT of the ${key.process} ` +
    `cross section (${source}); σ linear between its points from ${quote(firstEv)} to ${quote(lastEv)} eV, ` +
    `0 above ${quote(lastEv)} eV (no tail; at most ${quote(beyond, 2)} of the Maxwellian population lies above)` +
    (firstPointIsThreshold
      ? `, 0 below the threshold ${quote(firstEv)} eV. `
      : `, taken as 0 below ${quote(firstEv)} eV (at most ${quote(below, 2)} of the population lies below). `) +
    `Fit k = α (T/300 K)^β exp(−γ/T): least squares in ln k refined by Levenberg–Marquardt on relative residuals` +
    (fit ? ` over ${quote(fit.minTemperatureK)}–${quote(fit.maxTemperatureK)} K.` : "; not possible here.");
  return {
    results: [
      resultRow({ kind: "rate-coefficient", ...key, method, fit }, [
        ["temperature_K", temperaturesK],
        ["rate_cm3_per_s", rates.rateCm3PerS],
      ]),
    ],
    notes,
  };
}
