import { type RunResults, runResultsSchema } from "@shared/schemas";
import { queryOptions } from "@tanstack/react-query";
import { api } from "@/lib/api-client";

/** While the postprocess step is still deriving results the section asks again at this pace. */
const REFRESH_WHILE_DERIVING_MS = 3000;

/** Results are being derived: the worker has not yet said "derived", "none" or "failed". */
export const isDeriving = (results: Pick<RunResults, "state">) =>
  results.state === null || results.state === "pending";

export const resultQueries = {
  all: ["results"] as const,
  /** The tables derived from a finished run's collected files, with the state of deriving them. */
  forRun: (runId: string) =>
    queryOptions({
      queryKey: [...resultQueries.all, "run", runId] as const,
      queryFn: ({ signal }) =>
        api.get(`/api/runs/${encodeURIComponent(runId)}/results`, runResultsSchema, { signal }),
      refetchInterval: (query) =>
        query.state.data && isDeriving(query.state.data) ? REFRESH_WHILE_DERIVING_MS : false,
    }),
};
