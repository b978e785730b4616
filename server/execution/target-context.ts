/**
 * What a run's templates receive as `target`, built from the target version the run uses, and the part
 * of the run's fingerprint that stands for that version. Both read only the stored version (its atoms
 * as entered and the science core's inspection of them), so a run renders the same files whenever it
 * is planned from the same version.
 */
import { createHash } from "node:crypto";
import { canonicalJson } from "../../shared/canonical-json";
import { type TargetTemplateContext, targetDerivedSchema } from "../../shared/schemas/targets";
import { buildTargetTemplateContext } from "../../shared/target-template-context";
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
  return buildTargetTemplateContext(
    {
      id: target.id,
      versionId: version.id,
      version: version.version,
      name: target.name,
      charge: version.charge,
      multiplicity: version.multiplicity,
    },
    targetDerivedSchema.parse(version.derived),
  );
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
