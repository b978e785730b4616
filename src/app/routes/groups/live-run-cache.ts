/**
 * Live events applied to the runs feature's cached queries: the page shows a change as soon as the feed
 * reports it, and then reads the run again for what the event does not carry (who acted, charged
 * core-hours, collected files).
 */
import type { RunDetail, RunList, RunListQueryInput, RunSummary } from "@shared/schemas";
import type { LiveRunProgress, LiveRunState } from "@shared/schemas/live";
import type { QueryClient } from "@tanstack/react-query";
import { runQueries } from "@/features/runs/api/run-queries";
import { runMatchesView, showsNewestFirst, viewFromQuery } from "@/features/runs/table/run-list-params";

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

/**
 * A run of the group changed or was created. Every cached page of the group's list holding it shows the
 * change in place; a new run is added at the top of first pages in the default order whose filters it
 * matches (the last row moves to the next page), and any other page it may belong on reads itself again.
 * Times compare as strings: the API gives them all as ISO 8601 in UTC.
 */
export function applyGroupRun(queryClient: QueryClient, groupId: string, run: RunSummary): void {
  const pages = queryClient.getQueriesData<RunList>({ queryKey: runQueries.lists(groupId) });
  const known = pages.some(([, list]) => list?.runs.some((held) => held.id === run.id));
  for (const [queryKey, list] of pages) {
    if (!list) continue;
    const view = viewFromQuery(queryKey[3] as RunListQueryInput | undefined);
    const at = list.runs.findIndex((held) => held.id === run.id);
    if (at !== -1) {
      const runs = list.runs.slice();
      runs[at] = run;
      queryClient.setQueryData<RunList>(queryKey, { ...list, runs });
      // Left the view's filters (a state filter, say): the page reads itself again.
      if (!runMatchesView(run, view)) void queryClient.invalidateQueries({ queryKey, exact: true });
    } else if (!known && runMatchesView(run, view)) {
      const newest = list.runs[0];
      const oldest = list.runs.at(-1);
      if (!showsNewestFirst(view)) {
        void queryClient.invalidateQueries({ queryKey, exact: true });
      } else if (!newest || run.createdAt >= newest.createdAt) {
        queryClient.setQueryData<RunList>(queryKey, {
          ...list,
          runs: [run, ...list.runs].slice(0, list.pageSize),
          total: list.total + 1,
        });
      } else if (list.runs.length < list.pageSize || (oldest && run.createdAt >= oldest.createdAt)) {
        // An older run that now matches the filters and falls within this page.
        void queryClient.invalidateQueries({ queryKey, exact: true });
      }
    }
  }
  // A page showing this run reads it again (its events, files and charges are not in the summary).
  const detail = runQueries.detail(run.id).queryKey;
  if (queryClient.getQueryData(detail)?.state !== run.state)
    void queryClient.invalidateQueries({ queryKey: detail });
}
