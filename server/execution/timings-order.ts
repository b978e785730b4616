/**
 * The order a run's per-symmetry timings are shown and sent in: stages as the recipe runs them, and
 * within a stage the symmetries as the point group's character table lists them (Cotton order).
 */
import { irrepComparator } from "../../shared/science/symmetry";
import type { RunPlan } from "./run-plan";

export function orderTimings<T extends { stage: string; symmetry: string }>(
  timings: readonly T[],
  plan: Pick<RunPlan, "stages">,
): T[] {
  const stageOrder = plan.stages.map((stage) => stage.name);
  const stageRank = (stage: string) => {
    const index = stageOrder.indexOf(stage);
    return index < 0 ? stageOrder.length : index;
  };
  const symmetriesByStage = new Map<string, string[]>();
  for (const timing of timings) {
    const list = symmetriesByStage.get(timing.stage) ?? [];
    list.push(timing.symmetry);
    symmetriesByStage.set(timing.stage, list);
  }
  const comparators = new Map(
    [...symmetriesByStage].map(([stage, symmetries]) => [stage, irrepComparator(symmetries)]),
  );
  return [...timings].sort(
    (a, b) =>
      stageRank(a.stage) - stageRank(b.stage) ||
      a.stage.localeCompare(b.stage) ||
      comparators.get(a.stage)!(a.symmetry, b.symmetry),
  );
}
