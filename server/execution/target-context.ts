/**
 * What a run's templates receive as `target`, built from the target version the run uses, and the part
 * of the run's fingerprint that stands for that version. Both read only the stored version (its atoms
 * as entered and the science core's inspection of them), so a run renders the same files whenever it
 * is planned from the same version.
 */
import { createHash } from "node:crypto";
import { canonicalJson } from "../../shared/canonical-json";
import {
  type TargetTemplateContext,
  targetDerivedSchema,
  targetTemplateContextSchema,
} from "../../shared/schemas/targets";
import type { targets, targetVersions } from "../db/schema";

export type RunTarget = {
  target: Pick<typeof targets.$inferSelect, "id" | "name">;
  version: typeof targetVersions.$inferSelect;
};

/**
 * The template context: atoms in the standard orientation of the Abelian subgroup (centre of mass at the
 * origin, Å) with their isotopes and masses, and the subgroup's irreducible representations in the
 * order the science core lists them (Cotton order).
 */
export function targetTemplateContext({ target, version }: RunTarget): TargetTemplateContext {
  const derived = targetDerivedSchema.parse(version.derived);
  return targetTemplateContextSchema.parse({
    id: target.id,
    versionId: version.id,
    version: version.version,
    name: target.name,
    formula: derived.formula,
    charge: version.charge,
    multiplicity: version.multiplicity,
    electronCount: derived.electronCount,
    pointGroup: derived.pointGroup,
    abelianSubgroup: derived.abelianSubgroup,
    irreps: derived.irreps,
    atoms: derived.atoms.map((atom) => ({
      index: atom.index,
      symbol: atom.symbol,
      atomicNumber: atom.atomicNumber,
      massNumber: atom.massNumber,
      massU: atom.massU,
      x: atom.positionAngstrom[0],
      y: atom.positionAngstrom[1],
      z: atom.positionAngstrom[2],
    })),
    rotationalConstantsCm1: derived.rotationalConstantsCm1,
    rotationalConstantsMHz: derived.rotationalConstantsMHz,
    totalMassU: derived.totalMassU,
    nuclearRepulsionHartree: derived.nuclearRepulsionHartree,
  });
}

export type TargetFingerprint = { versionId: string; content: string };

/**
 * The target's share of a run fingerprint: the version's id and a sha256 of what the version is made of
 * (atoms as entered, charge, multiplicity). Notes are left out: they change no result.
 */
export function targetFingerprintPart({ version }: RunTarget): TargetFingerprint {
  const content = canonicalJson({
    atoms: version.atoms,
    charge: version.charge,
    multiplicity: version.multiplicity,
  });
  return { versionId: version.id, content: createHash("sha256").update(content).digest("hex") };
}
