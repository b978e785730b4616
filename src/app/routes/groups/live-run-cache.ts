/**
 * Live events applied to the runs feature's cached queries: the page shows a change as soon as the feed
 * reports it, and then reads the run again for what the event does not carry (who acted, charged
 * core-hours, collected files).
 */
import type { RunDetail, RunSummary } from "@shared/schemas";
import type { LiveRunProgress, LiveRunState } from "@shared/schemas/live";
import type { QueryClient } from "@tanstack/react-query";
import { runQueries } from "@/features/runs/api/run-queries";

export function applyRunState(queryClient: QueryClient, event: LiveRunState): void {
  const { queryKey } = runQueries.detail(event.runId);
  queryClient.setQueryData<RunDetail>(queryKey, (run) => {
    if (!run) return run;
    const known = run.events.some((held) => held.at === event.at && held.toState === event.state);
    if (known) return run;
    return {
      ...run,
      state: event.state,
      stateMessage: event.message,
      events: [
        ...run.events,
        {
          at: event.at,
          fromState: run.state,
          toState: event.state,
          actor: "system",
          actorName: null,
          message: event.message,
        },
      ],
    };
  });
  void queryClient.invalidateQueries({ queryKey });
}

export function applyRunProgress(queryClient: QueryClient, event: LiveRunProgress): void {
  queryClient.setQueryData<RunDetail>(runQueries.detail(event.runId).queryKey, (run) =>
    run ? { ...run, progress: event.progress, timings: event.timings } : run,
  );
}

/** A run of the group changed or was created: replaced in place, or added at the top (newest first). */
export function applyGroupRun(queryClient: QueryClient, groupId: string, run: RunSummary): void {
  queryClient.setQueryData(runQueries.list(groupId).queryKey, (list) => {
    if (!list) return list;
    const at = list.runs.findIndex((held) => held.id === run.id);
    if (at === -1) return { runs: [run, ...list.runs] };
    const runs = list.runs.slice();
    runs[at] = run;
    return { runs };
  });
  // A page showing this run reads it again (its events, files and charges are not in the summary).
  const detail = runQueries.detail(run.id).queryKey;
  if (queryClient.getQueryData(detail)?.state !== run.state)
    void queryClient.invalidateQueries({ queryKey: detail });
}
