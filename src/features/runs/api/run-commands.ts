import { type RunSpecChanges, runSummarySchema } from "@shared/schemas";
import { api } from "@/lib/api-client";

/** Queued: never starts. On the scheduler: cancelled there, then `cancelled` once it confirms. */
export function cancelRun(runId: string) {
  return api.post(`/api/runs/${encodeURIComponent(runId)}/cancel`, {}, runSummarySchema);
}

/**
 * A new run from the same specification, linked to its origin. `changes` merge into the original's spec
 * (parameters per stage and per parameter); left out, the run is repeated as it was.
 */
export function resubmitRun(runId: string, changes: RunSpecChanges = {}) {
  return api.post(`/api/runs/${encodeURIComponent(runId)}/resubmit`, { changes }, runSummarySchema);
}
