/**
 * Targets as a group stores them: a named molecule with versions (atoms, charge, multiplicity, notes and
 * the properties `shared/science` derives from them) and isotopologues (variants of one target with other
 * isotopes on some atoms, listed under it). Runs keep the target version they used.
 */
import { z } from "zod";
import { isoDateTimeSchema, uuidSchema } from "./common";
import { targetInspectionSchema } from "./science-target";

const finiteCoordinate = z
  .number()
  .refine(Number.isFinite, { error: "must be a finite number" })
  .refine((v) => Math.abs(v) <= 1e4, { error: "coordinates are in Å and at most 10 000 Å from the origin" });

/** One atom as entered: element, mass number (null: the natural mixture), position in Å in the entered frame. */
export const targetAtomSchema = z.strictObject({
  symbol: z.string().regex(/^[A-Za-z]{1,3}$/, { error: "element symbols are 1 to 3 letters" }),
  /** Mass number of the isotope; null or left out for the natural isotopic mixture's most common isotope. */
  massNumber: z.int().min(1).max(300).nullable().default(null),
  xAngstrom: finiteCoordinate,
  yAngstrom: finiteCoordinate,
  zAngstrom: finiteCoordinate,
  /** Partial charge in e, when known (gives the dipole about the centre of mass). */
  partialChargeE: z.number().min(-20).max(20).nullable().default(null),
});
export type TargetAtom = z.infer<typeof targetAtomSchema>;

export const targetNameSchema = z
  .string()
  .trim()
  .min(1, { error: "Give the target a name." })
  .max(120)
  .refine((name) => ![...name].some((c) => c.charCodeAt(0) < 0x20 || c.charCodeAt(0) === 0x7f), {
    error: "Names cannot contain control characters.",
  });

/** Largest XYZ text accepted (bytes of UTF-8). */
export const MAX_XYZ_BYTES = 256 * 1024;
/** Most atoms in one target. */
export const MAX_TARGET_ATOMS = 500;

/** What a version is made of: either atoms as JSON or the text of an XYZ file. */
const targetContentFields = {
  charge: z.int().min(-10).max(10).default(0),
  /** 2S + 1; left out: the lowest the electron count allows. */
  multiplicity: z.int().min(1).max(20).optional(),
  notes: z.string().max(10_000).default(""),
};

export const targetAtomsSourceSchema = z.union([
  z.strictObject({ atoms: z.array(targetAtomSchema).min(1).max(MAX_TARGET_ATOMS) }),
  z.strictObject({
    /** The text of an XYZ file (count line, comment line, one atom per line: symbol or symbol@A, x, y, z in Å). */
    xyz: z.string().min(1).max(MAX_XYZ_BYTES),
  }),
]);

export const createTargetRequestSchema = z.intersection(
  z.strictObject({ name: targetNameSchema, ...targetContentFields }).partial({ charge: true, notes: true }),
  targetAtomsSourceSchema,
);
export type CreateTargetRequest = z.input<typeof createTargetRequestSchema>;

/** An update makes a new version; what is left out keeps the current version's value. */
export const updateTargetRequestSchema = z.strictObject({
  name: targetNameSchema.optional(),
  atoms: z.array(targetAtomSchema).min(1).max(MAX_TARGET_ATOMS).optional(),
  xyz: z.string().min(1).max(MAX_XYZ_BYTES).optional(),
  charge: z.int().min(-10).max(10).optional(),
  multiplicity: z.int().min(1).max(20).nullable().optional(),
  notes: z.string().max(10_000).optional(),
});
export type UpdateTargetRequest = z.input<typeof updateTargetRequestSchema>;

/** An isotopologue: the parent's current geometry with other mass numbers on some atoms (1-based index). */
export const createIsotopologueRequestSchema = z.strictObject({
  name: targetNameSchema,
  isotopes: z
    .array(z.strictObject({ atom: z.int().min(1), massNumber: z.int().min(1).max(300) }))
    .min(1, { error: "Choose at least one atom's isotope." })
    .max(MAX_TARGET_ATOMS),
  notes: z.string().max(10_000).default(""),
});
export type CreateIsotopologueRequest = z.input<typeof createIsotopologueRequestSchema>;

/** Derived properties stored with each version (the science core's inspection of it). */
export const targetDerivedSchema = targetInspectionSchema;
export type TargetDerived = z.infer<typeof targetDerivedSchema>;

export const targetVersionSchema = z.object({
  id: uuidSchema,
  targetId: uuidSchema,
  version: z.int().min(1),
  atoms: z.array(targetAtomSchema),
  charge: z.int(),
  multiplicity: z.int(),
  notes: z.string(),
  derived: targetDerivedSchema,
  createdAt: isoDateTimeSchema,
  createdByName: z.string().nullable(),
});
export type TargetVersion = z.infer<typeof targetVersionSchema>;

export const targetSummarySchema = z.object({
  id: uuidSchema,
  groupId: uuidSchema,
  name: z.string(),
  /** The target this one is an isotopologue of; null for a target entered on its own. */
  parentTargetId: uuidSchema.nullable(),
  latestVersion: z.int().min(1),
  formula: z.string(),
  pointGroup: z.string(),
  abelianSubgroup: z.string(),
  /** Runs (of any version) that refer to this target. */
  runCount: z.int().min(0),
  createdAt: isoDateTimeSchema,
  updatedAt: isoDateTimeSchema,
});
export type TargetSummary = z.infer<typeof targetSummarySchema>;

/** A target with its isotopologues nested under it (the list leaves isotopologues out of the top level). */
export const targetListItemSchema = targetSummarySchema.extend({
  isotopologues: z.array(targetSummarySchema),
});
export const targetListSchema = z.object({ targets: z.array(targetListItemSchema) });

export const targetDetailSchema = targetSummarySchema.extend({
  current: targetVersionSchema,
  versions: z.array(
    z.object({
      id: uuidSchema,
      version: z.int(),
      createdAt: isoDateTimeSchema,
      createdByName: z.string().nullable(),
    }),
  ),
  isotopologues: z.array(targetSummarySchema),
});
export type TargetDetail = z.infer<typeof targetDetailSchema>;

/**
 * What a code's templates receive as `target`: the version a run uses, in the standard orientation of its
 * Abelian subgroup (centre of mass at the origin, Å), with masses and the subgroup's irreducible
 * representations in the usual (Cotton) order.
 */
export const targetTemplateContextSchema = z.object({
  id: uuidSchema,
  versionId: uuidSchema,
  version: z.int(),
  name: z.string(),
  formula: z.string(),
  charge: z.int(),
  multiplicity: z.int(),
  electronCount: z.int(),
  pointGroup: z.string(),
  abelianSubgroup: z.string(),
  irreps: z.array(z.string()),
  atoms: z.array(
    z.object({
      index: z.int().min(1),
      symbol: z.string(),
      atomicNumber: z.int(),
      massNumber: z.int(),
      massU: z.number(),
      x: z.number(),
      y: z.number(),
      z: z.number(),
    }),
  ),
  rotationalConstantsCm1: z.array(z.number().nullable()),
  rotationalConstantsMHz: z.array(z.number().nullable()),
  totalMassU: z.number(),
  nuclearRepulsionHartree: z.number(),
});
export type TargetTemplateContext = z.infer<typeof targetTemplateContextSchema>;
