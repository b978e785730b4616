/**
 * What a run asks for before it is planned: resources filled in from the recipe's codes, and a
 * resubmission's changes applied to the spec of the run it copies.
 */
import type { CodeDefinition } from "../../shared/schemas/codes";
import { runAnalysisSchema } from "../../shared/schemas/results";
import type { RunResources, RunSpec, RunSpecChanges, RunSpecRequest } from "../../shared/schemas/runs";

/** The longest wall time a run may ask for, and the longest run name (runSpecSchema). */
const MAX_WALL_TIME_MINUTES = 43_200;
const MAX_NAME_LENGTH = 120;
const AGAIN = " (again)";

/**
 * Resources for a run of these stages, the requested values first. Left out: the most cores any stage's
 * code asks for by default (one allocation serves each stage in turn), and the sum of the codes' default
 * wall times (the stages run one after another in one scheduler job), capped at the longest allowed.
 */
export function resolveResources(
  requested: Partial<RunResources> | undefined,
  definitions: CodeDefinition[],
): RunResources {
  const cores = Math.max(1, ...definitions.map((definition) => definition.defaults.cores));
  const wallTimeMinutes = definitions.reduce(
    (sum, definition) => sum + definition.defaults.wallTimeMinutes,
    0,
  );
  return {
    cores: requested?.cores ?? cores,
    wallTimeMinutes: requested?.wallTimeMinutes ?? Math.min(MAX_WALL_TIME_MINUTES, wallTimeMinutes),
  };
}

/**
 * The spec of a resubmission: the original's, with only what `changes` names replaced. Parameters merge
 * per stage and per parameter, a null value removing the parameter (RFC 7396); resources and analysis
 * options merge per field. The target stays the original's unless `changes.targetId` names another;
 * either way the spec names the target, not a version, so the new run uses the target's latest version
 * (a resubmission after the target was changed runs on the changed target).
 */
export function applySpecChanges(original: RunSpec, changes: RunSpecChanges): RunSpecRequest {
  const parameters: RunSpec["parameters"] = { ...original.parameters };
  for (const [stage, values] of Object.entries(changes.parameters ?? {})) {
    const merged: Record<string, unknown> = { ...parameters[stage] };
    for (const [name, value] of Object.entries(values)) {
      if (value === null) delete merged[name];
      else merged[name] = value;
    }
    parameters[stage] = merged;
  }
  return {
    name: changes.name ?? `${original.name.slice(0, MAX_NAME_LENGTH - AGAIN.length)}${AGAIN}`,
    recipeId: changes.recipeId ?? original.recipeId,
    hostId: changes.hostId ?? original.hostId,
    targetId: changes.targetId ?? original.targetId,
    analysis:
      original.analysis === undefined && changes.analysis === undefined
        ? undefined
        : runAnalysisSchema.parse({ ...original.analysis, ...changes.analysis }),
    parameters,
    extraFiles: changes.extraFiles ?? original.extraFiles,
    resources: { ...original.resources, ...changes.resources },
    notifyByEmail: changes.notifyByEmail ?? original.notifyByEmail,
  };
}
