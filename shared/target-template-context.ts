/**
 * What code templates receive as `target`, from a target version's identity and the science core's
 * inspection of it: atoms in the standard orientation of the Abelian subgroup (centre of mass at the
 * origin, Å) with their isotopes and masses, and the subgroup's irreducible representations in the order
 * the science core lists them (Cotton order). Used by the server when it plans a run, and by tests that
 * render templates without a server.
 */
import {
  type TargetDerived,
  type TargetTemplateContext,
  targetTemplateContextSchema,
} from "./schemas/targets";

/** The parts of a target inspection (shared/science inspectTarget, or a stored version's) templates use. */
type InspectionForTemplates = Pick<
  TargetDerived,
  | "formula"
  | "electronCount"
  | "pointGroup"
  | "irreps"
  | "atoms"
  | "rotationalConstantsCm1"
  | "rotationalConstantsMHz"
  | "totalMassU"
  | "nuclearRepulsionHartree"
> & { abelianSubgroup: string };

export function buildTargetTemplateContext(
  identity: {
    id: string;
    versionId: string;
    version: number;
    name: string;
    charge: number;
    multiplicity: number;
  },
  derived: InspectionForTemplates,
): TargetTemplateContext {
  return targetTemplateContextSchema.parse({
    ...identity,
    formula: derived.formula,
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
