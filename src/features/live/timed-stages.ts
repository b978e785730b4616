/**
 * Which stages of a run's recipe report a time per symmetry: those whose code has timing output rules.
 * Only these get the per-symmetry table and the remaining-time estimate while they run; a stage that
 * reports no such times (an orbitals stage, say) has nothing to estimate from.
 */
import { codeSchema, recipeSchema } from "@shared/schemas";
import { queryOptions } from "@tanstack/react-query";
import { api } from "@/lib/api-client";

export async function fetchTimedStages(recipeId: string, signal?: AbortSignal): Promise<string[]> {
  const recipe = await api.get(`/api/recipes/${encodeURIComponent(recipeId)}`, recipeSchema, { signal });
  const stages = await Promise.all(
    recipe.stages.map(async (stage) => {
      const code = await api.get(`/api/codes/${encodeURIComponent(stage.codeId)}`, codeSchema, { signal });
      return code.definition.outputRules.timings.length > 0 ? stage.name : null;
    }),
  );
  return stages.filter((stage): stage is string => stage !== null);
}

export const timedStagesQuery = (recipeId: string) =>
  queryOptions({
    queryKey: ["recipes", recipeId, "timed-stages"],
    queryFn: ({ signal }) => fetchTimedStages(recipeId, signal),
    // A recipe's stages and their codes do not change (a change is a new version).
    staleTime: Number.POSITIVE_INFINITY,
  });

/**
 * Whether the run page has per-symmetry times to show: a timing row exists, or the unfinished run is in
 * a stage that reports them. Unknown timed stages (still loading, or unreadable) count as none.
 */
export function showsSymmetryTimings(
  run: { timings: readonly unknown[]; progress: { stage: string } | null },
  finished: boolean,
  timedStages: readonly string[] | undefined,
): boolean {
  if (run.timings.length > 0) return true;
  if (finished || !run.progress) return false;
  return timedStages?.includes(run.progress.stage) ?? false;
}
