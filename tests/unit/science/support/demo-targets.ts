/**
 * The demo targets (deploy/demo/targets.ts) as code templates receive them: each target and isotopologue
 * inspected by shared/science and turned into a `TargetTemplateContext` (standard orientation of the
 * Abelian subgroup, centre of mass at the origin, Å).
 */

import { createTargetRequestSchema, type TargetTemplateContext } from "@shared/schemas/targets";
import { inspectTarget, type TargetInspection } from "@shared/science/geometry";
import { buildTargetTemplateContext } from "@shared/target-template-context";
import { DEMO_ISOTOPOLOGUES, DEMO_TARGETS, type DemoTarget } from "../../../../deploy/demo/targets";

export interface DemoTargetCase {
  name: string;
  /** The target's own name, or the parent's for an isotopologue. */
  parent: string;
  inspection: TargetInspection;
  context: TargetTemplateContext;
}

function inspect(target: DemoTarget, isotopes: readonly { atom: number; massNumber: number }[]) {
  const parsed = createTargetRequestSchema.parse(target);
  if (!("atoms" in parsed)) throw new Error(`${target.name}: demo targets give atoms as JSON`);
  return inspectTarget({
    atoms: parsed.atoms.map((a) => ({
      symbol: a.symbol,
      massNumber: a.massNumber,
      positionAngstrom: [a.xAngstrom, a.yAngstrom, a.zAngstrom],
    })),
    isotopeOverrides: Object.fromEntries(isotopes.map((i) => [i.atom, i.massNumber])),
    chargeE: parsed.charge,
    multiplicity: parsed.multiplicity,
  });
}

function context(name: string, index: number, inspection: TargetInspection): TargetTemplateContext {
  const id = `00000000-0000-4000-8000-${String(index + 1).padStart(12, "0")}`;
  return buildTargetTemplateContext(
    {
      id,
      versionId: id,
      version: 1,
      name,
      charge: inspection.chargeE,
      multiplicity: inspection.multiplicity,
    },
    inspection,
  );
}

/** Every demo target, then every demo isotopologue, as template contexts. */
export function demoTargetCases(): DemoTargetCase[] {
  const byName = new Map(DEMO_TARGETS.map((t) => [t.name, t]));
  const cases: DemoTargetCase[] = DEMO_TARGETS.map((t) => ({
    name: t.name,
    parent: t.name,
    inspection: inspect(t, []),
  }))
    .concat(
      DEMO_ISOTOPOLOGUES.map((iso) => {
        const parent = byName.get(iso.parent);
        if (!parent) throw new Error(`isotopologue ${iso.name}: no demo target named ${iso.parent}`);
        return { name: iso.name, parent: iso.parent, inspection: inspect(parent, iso.isotopes) };
      }),
    )
    .map((c, index) => ({ ...c, context: context(c.name, index, c.inspection) }));
  return cases;
}
