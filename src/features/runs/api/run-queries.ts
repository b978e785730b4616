import {
  FINAL_RUN_STATES,
  type RunSummary,
  runDetailSchema,
  runListSchema,
  runLogSchema,
} from "@shared/schemas/execution";
import { queryOptions } from "@tanstack/react-query";
import { api } from "@/lib/api-client";

/** While anything is unfinished the page refreshes itself at this pace (live streaming comes later). */
const REFRESH_WHILE_ACTIVE_MS = 3000;

export const isFinished = (run: Pick<RunSummary, "state">) => FINAL_RUN_STATES.includes(run.state);

export const runQueries = {
  all: ["runs"] as const,
  list: (groupId: string) =>
    queryOptions({
      queryKey: [...runQueries.all, "list", groupId] as const,
      queryFn: ({ signal }) =>
        api.get(`/api/groups/${encodeURIComponent(groupId)}/runs`, runListSchema, { signal }),
      refetchInterval: (query) =>
        query.state.data?.runs.some((run) => !isFinished(run)) ? REFRESH_WHILE_ACTIVE_MS : false,
    }),
  detail: (runId: string) =>
    queryOptions({
      queryKey: [...runQueries.all, "detail", runId] as const,
      queryFn: ({ signal }) => api.get(`/api/runs/${encodeURIComponent(runId)}`, runDetailSchema, { signal }),
      refetchInterval: (query) =>
        query.state.data && !isFinished(query.state.data) ? REFRESH_WHILE_ACTIVE_MS : false,
    }),
  /** The whole stored log, read page by page by sequence number. */
  log: (runId: string, finished: boolean) =>
    queryOptions({
      queryKey: [...runQueries.all, "log", runId] as const,
      queryFn: async ({ signal }) => {
        let afterSeq = 0;
        let text = "";
        for (;;) {
          const page = await api.get(
            `/api/runs/${encodeURIComponent(runId)}/log?afterSeq=${afterSeq}`,
            runLogSchema,
            { signal },
          );
          if (page.chunks.length === 0) return text;
          text += page.chunks.map((chunk) => chunk.text).join("");
          afterSeq = page.lastSeq;
        }
      },
      refetchInterval: finished ? false : REFRESH_WHILE_ACTIVE_MS,
    }),
};
