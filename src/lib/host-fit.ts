/** Whether a host can take a run of a recipe: its key confirmed, and every pinned stage code installed there. */
import type { StageSchema } from "@/lib/stage-schemas";

/** The first stage whose code is pinned to hosts that do not include `hostId`, if any. */
export function stageNotInstalledOn(stages: readonly StageSchema[], hostId: string): StageSchema | undefined {
  return stages.find((stage) => stage.hostIds.length > 0 && !stage.hostIds.includes(hostId));
}

/** Why a host cannot take the run, in the words of the Host select, or undefined when it can. */
export function hostUnfitReason(
  host: { id: string; hostKeyConfirmed: boolean },
  stages: readonly StageSchema[],
): string | undefined {
  if (!host.hostKeyConfirmed) return "host key not confirmed";
  const stage = stageNotInstalledOn(stages, host.id);
  return stage ? `stage ${stage.stage}'s code is not installed here` : undefined;
}
