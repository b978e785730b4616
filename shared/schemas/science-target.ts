/**
 * Boundary schemas for targets: atoms and isotopes, target inspection, symmetry tolerance, R-matrix sphere
 * checks, basis-set coverage and energy grids.
 */
import { z } from "zod";
import { ScienceInputError } from "../science/errors";

/**
 * Validates `input` with `schema`, turning zod issues into a ScienceInputError with a readable message.
 *
 * @param what - what is being validated, for the message ("energy grid")
 */
export function parseTargetInput<T extends z.ZodType>(schema: T, input: unknown, what: string): z.output<T> {
  const result = schema.safeParse(input);
  if (!result.success) {
    throw new ScienceInputError(`Invalid ${what}:\n${z.prettifyError(result.error)}`, result.error.issues);
  }
  return result.data;
}

const finite = z.number().refine(Number.isFinite, { error: "must be a finite number" });
export const vec3Schema = z.tuple([finite, finite, finite]);

/** One atom: element symbol (case-insensitive), optional mass number, position in Å. */
export const atomInputSchema = z.object({
  symbol: z.string().regex(/^[A-Za-z]{1,3}$/, { error: "element symbols are 1 to 3 letters" }),
  massNumber: z.int().min(1).max(300).nullable().optional(),
  positionAngstrom: vec3Schema,
});
export type AtomInputJson = z.infer<typeof atomInputSchema>;

/** Isotope choices by 1-based atom index (JSON object keys are strings). */
export const isotopeOverridesSchema = z.record(z.string().regex(/^[1-9]\d*$/), z.int().min(1).max(300));

/** Distance tolerance of the point-group search, Å. */
export const symmetryToleranceSchema = z.number().min(1e-6).max(0.3);

export const inspectTargetRequestSchema = z.object({
  atoms: z.array(atomInputSchema).min(1).max(2000),
  isotopeOverrides: isotopeOverridesSchema.optional(),
  chargeE: z.int().min(-50).max(200).default(0),
  multiplicity: z.int().min(1).max(99).optional(),
  toleranceAngstrom: symmetryToleranceSchema.optional(),
  partialChargesE: z.array(finite).optional(),
});
export type InspectTargetRequest = z.input<typeof inspectTargetRequestSchema>;

const nullableNumber = z.number().nullable();
const mat3Schema = z.tuple([vec3Schema, vec3Schema, vec3Schema]);

/** Output of `inspectTarget` / `sigmaflow target inspect --json`. */
export const targetInspectionSchema = z.object({
  atomCount: z.int().min(1),
  formula: z.string(),
  totalMassU: z.number().positive(),
  chargeE: z.int(),
  electronCount: z.int().min(0),
  multiplicity: z.int().min(1),
  centreOfMassAngstrom: vec3Schema,
  principalMomentsUAngstrom2: vec3Schema,
  rotationalConstantsCm1: z.tuple([nullableNumber, nullableNumber, nullableNumber]),
  rotationalConstantsMHz: z.tuple([nullableNumber, nullableNumber, nullableNumber]),
  rotorType: z.enum(["atom", "linear", "spherical", "prolate", "oblate", "asymmetric"]),
  rayAsymmetry: nullableNumber,
  nuclearRepulsionHartree: z.number().min(0),
  pointGroup: z.string(),
  groupOrder: z.int().min(1).nullable(),
  abelianSubgroup: z.enum(["D2h", "C2v", "C2h", "D2", "Cs", "Ci", "C2", "C1"]),
  irreps: z.array(z.string()).min(1),
  characterTable: z.array(z.object({ irrep: z.string(), characters: z.array(z.number()) })),
  abelianOperations: z.array(z.string()),
  equivalentAtomSets: z.array(z.array(z.int().min(1))),
  abelianEquivalentAtomSets: z.array(z.array(z.int().min(1))),
  operations: z.array(
    z.object({
      label: z.string(),
      kind: z.enum(["E", "C", "i", "sigma", "S"]),
      n: z.int(),
      k: z.int(),
      axis: vec3Schema.nullable(),
      matrix: mat3Schema,
      permutation: z.array(z.int().min(1)),
      maxDeviationAngstrom: z.number().min(0),
    }),
  ),
  orientationMatrix: mat3Schema,
  toleranceAngstrom: z.number(),
  maxSymmetrizationShiftAngstrom: z.number().min(0),
  atoms: z.array(
    z.object({
      index: z.int().min(1),
      symbol: z.string(),
      atomicNumber: z.int().min(1),
      massNumber: z.int().min(1),
      massU: z.number().positive(),
      positionAngstrom: vec3Schema,
    }),
  ),
  dipole: z
    .object({
      atomicUnits: vec3Schema,
      debye: vec3Schema,
      magnitudeDebye: z.number(),
      originAngstrom: vec3Schema,
    })
    .nullable(),
});
export type TargetInspectionJson = z.infer<typeof targetInspectionSchema>;

/** R-matrix sphere check: geometry plus the most diffuse Gaussian. */
export const sphereRadiusRequestSchema = z.object({
  positionsAngstrom: z.array(vec3Schema).min(1),
  /** Sphere centre in Å; default: the origin of the given coordinates (put the centre of mass there). */
  centreAngstrom: vec3Schema.optional(),
  /** Most diffuse Gaussian exponent α in bohr⁻² (basis function ∝ r^l exp(−α r²)). */
  mostDiffuseExponentBohr2: z.number().positive().max(1e8).optional(),
  /** Angular momentum l of that Gaussian (default 0). */
  angularMomentum: z.int().min(0).max(10).default(0),
  /** Fraction of the Gaussian's charge allowed outside the sphere (default 1e-5). */
  chargeTolerance: z.number().gt(0).lt(1).default(1e-5),
});
export type SphereRadiusRequest = z.input<typeof sphereRadiusRequestSchema>;

const positiveEnergy = z.number().positive({ error: "collision energies must be > 0 eV" });
const pointCount = z.int().min(2).max(1_000_000);

/** Evenly spaced energies from startEv to stopEv inclusive: give `count` or `stepEv`. */
export const linearGridSchema = z
  .object({
    kind: z.literal("linear"),
    startEv: positiveEnergy,
    stopEv: positiveEnergy,
    count: pointCount.optional(),
    stepEv: z.number().positive().optional(),
  })
  .refine((g) => g.stopEv > g.startEv, { error: "stopEv must be greater than startEv" })
  .refine((g) => (g.count === undefined) !== (g.stepEv === undefined), {
    error: "give exactly one of count or stepEv",
  })
  .refine((g) => g.stepEv === undefined || (g.stopEv - g.startEv) / g.stepEv <= 1_000_000, {
    error: "stepEv gives more than 1000000 points",
  });

/** Geometrically spaced energies (constant ratio) from startEv to stopEv inclusive. */
export const logGridSchema = z
  .object({
    kind: z.literal("log"),
    startEv: positiveEnergy,
    stopEv: positiveEnergy,
    count: pointCount,
  })
  .refine((g) => g.stopEv > g.startEv, { error: "stopEv must be greater than startEv" });

/** Consecutive segments, each linear or logarithmic. */
export const piecewiseGridSchema = z.object({
  kind: z.literal("piecewise"),
  segments: z
    .array(z.union([linearGridSchema, logGridSchema]))
    .min(1)
    .max(1000),
});

export const baseGridSchema = z.union([linearGridSchema, logGridSchema, piecewiseGridSchema]);
export type BaseGridSpec = z.input<typeof baseGridSchema>;

/** Extra points around a threshold energy: `pointsPerSide` on each side within ±`halfWidthEv`. */
export const thresholdRefinementSchema = z.object({
  energyEv: positiveEnergy,
  halfWidthEv: z.number().positive().default(0.1),
  pointsPerSide: z.int().min(1).max(10_000).default(10),
  /** Also put a point exactly at the threshold (default false: zero channel momentum there). */
  includeThreshold: z.boolean().default(false),
});
export type ThresholdRefinement = z.input<typeof thresholdRefinementSchema>;

export const energyGridRequestSchema = z.object({
  base: baseGridSchema,
  thresholds: z.array(thresholdRefinementSchema).max(1000).default([]),
});
export type EnergyGridRequest = z.input<typeof energyGridRequestSchema>;

/** Basis-set coverage query: which atoms a basis family does not cover. */
export const basisCoverageRequestSchema = z.object({
  basis: z.string().min(1).max(64),
  symbols: z.array(z.string().regex(/^[A-Za-z]{1,3}$/)).min(1),
});
