/**
 * Results: tables the science core derives from a run's collected files after `collect` (the worker's
 * `postprocess` step). One row per (kind, process, irrep, label); its columns are arrays of equal length
 * whose names carry their unit (`energy_eV`, `cross_section_A2`, `temperature_K`, `rate_cm3_per_s`…).
 */
import { z } from "zod";
import { isoDateTimeSchema, uuidSchema } from "./common";

export const resultKindSchema = z.enum([
  /** σ vs collision energy. */
  "cross-section",
  /** Sum of eigenphases vs energy, per irrep (and summed over irreps when `irrep` is null). */
  "eigenphase-sum",
  /** Maxwellian rate coefficient vs electron temperature, with its modified-Arrhenius fit. */
  "rate-coefficient",
  /** The orbital table an ionization model used (binding and kinetic energies, occupations). */
  "orbital-table",
  /** Properties of the target the chemistry code computed: energies, dipole, rotational constants, frequencies. */
  "target-properties",
]);
export type ResultKind = z.infer<typeof resultKindSchema>;

export const resultProcessSchema = z.enum(["elastic", "momentum-transfer", "ionization", "orbitals"]);
export type ResultProcess = z.infer<typeof resultProcessSchema>;

/** Column names: lowercase words joined by `_`, ending in the unit (`energy_eV`, `sigma_A2`, `phase_rad`). */
export const resultColumnNameSchema = z.string().regex(/^[a-z][a-z0-9]*(_[A-Za-z0-9]+)+$/);

/** k(T) = α (T/300 K)^β exp(−γ/T) fitted over [minTemperatureK, maxTemperatureK]. */
export const arrheniusFitResultSchema = z.object({
  alpha_cm3_per_s: z.number(),
  beta: z.number(),
  gamma_K: z.number(),
  minTemperatureK: z.number(),
  maxTemperatureK: z.number(),
  /** Largest relative deviation of the fit from the computed rates over the fitted range. */
  maxRelativeDeviation: z.number(),
});
export type ArrheniusFitResult = z.infer<typeof arrheniusFitResultSchema>;

export const resultSchema = z.object({
  id: uuidSchema,
  runId: uuidSchema,
  kind: resultKindSchema,
  process: resultProcessSchema,
  /** The irreducible representation a result belongs to; null for a sum over all of them. */
  irrep: z.string().nullable(),
  /** Which part when a kind has several (an orbital such as "1b1" for BEB per orbital); "" for the whole. */
  label: z.string(),
  /** Equal-length numeric columns, units in the names. The first column is the independent variable. */
  columns: z.record(resultColumnNameSchema, z.array(z.number())),
  /** Order of the columns as derived (JSON object order is not relied on). */
  columnOrder: z.array(resultColumnNameSchema),
  fit: arrheniusFitResultSchema.nullable(),
  /** How the result was derived: model, method, source of inputs, overrides used. */
  method: z.string(),
  createdAt: isoDateTimeSchema,
});
export type Result = z.infer<typeof resultSchema>;

/** Whether the postprocess step has turned the run's collected files into results. */
export const resultsStateSchema = z.enum(["pending", "derived", "none", "failed"]);
export type ResultsState = z.infer<typeof resultsStateSchema>;

export const runResultsSchema = z.object({
  runId: uuidSchema,
  state: resultsStateSchema.nullable(),
  /** Why no results were derived, or the reason deriving them failed ("results could not be derived: …"). */
  message: z.string().nullable(),
  /** Shown with every result: computed data are model results. */
  caution: z.string(),
  results: z.array(resultSchema),
});
export type RunResults = z.infer<typeof runResultsSchema>;

/**
 * Options of the postprocess step a run spec may carry. Everything has a default; a resubmission can
 * change them (they do not change the run's raw outputs, so they are not part of its fingerprint).
 */
export const runAnalysisSchema = z.strictObject({
  /** Replaces the first (lowest) binding energy of the BEB model by a measured ionization energy, eV. */
  firstIonizationEnergyEv: z.number().positive().max(1000).optional(),
  /** Collision energies of the BEB cross section, eV (log-spaced from threshold). */
  ionizationEnergyMaxEv: z.number().positive().max(100_000).default(5000),
  /** Electron temperatures of the rate coefficients, K (log-spaced). */
  temperatureMinK: z.number().positive().max(1e7).default(1000),
  temperatureMaxK: z.number().positive().max(1e7).default(100_000),
});
export type RunAnalysis = z.infer<typeof runAnalysisSchema>;

/** The caution every result view shows. */
export const RESULTS_CAUTION =
  "Computed cross sections and rates are model results. Validate them against measurements or " +
  "higher-level calculations before use in plasma, reactor or process design, and defer to your " +
  "group's local practice.";
