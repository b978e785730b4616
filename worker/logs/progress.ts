/**
 * Where a followed log has got to, carried from one poll to the next in runs.progress: the stage of the
 * last stage marker read so far (which decides the output rules for the next bytes) and the latest
 * progress line of that stage. A progress line never decides the stage: the last one read may belong to
 * a stage whose exit and the next stage's start were read after it.
 */

import { type RunStageProgress, runStageProgressSchema } from "../../shared/schemas/runs";
import type { LogParseResult } from "./output-rules";

/** The stored progress of a run, or null before the log reached its first stage (or if unreadable). */
export function storedProgress(value: unknown): RunStageProgress | null {
  const parsed = runStageProgressSchema.safeParse(value);
  return parsed.success ? parsed.data : null;
}

/** The progress after one more chunk of the log, parsed starting from `previous.stage`. */
export function advanceProgress(
  previous: RunStageProgress | null,
  parsed: Pick<LogParseResult, "stage" | "progress">,
): RunStageProgress | null {
  if (parsed.stage === null) return previous;
  if (parsed.progress && parsed.progress.stage === parsed.stage) return { ...parsed.progress };
  if (previous && previous.stage === parsed.stage) return previous;
  return { stage: parsed.stage };
}
