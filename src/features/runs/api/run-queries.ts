import {
  FINAL_RUN_STATES,
  hostListSchema,
  memberListSchema,
  type RunSummary,
  recipeListSchema,
  runDetailSchema,
  runListSchema,
  runLogSchema,
  targetListSchema,
} from "@shared/schemas";
import { keepPreviousData, queryOptions } from "@tanstack/react-query";
import { api } from "@/lib/api-client";
import { fetchStageSchemas } from "@/lib/stage-schemas";
import { appendLogChunks, bytesFromBase64, EMPTY_LOG_TEXT, type LogText } from "../log-text";
import type { RunFilterOptions } from "../table/run-filters";
import { DEFAULT_VIEW, queryFromView, type RunListView, searchFromView } from "../table/run-list-params";

/** While anything is unfinished the page refreshes itself at this pace (live streaming comes later). */
const REFRESH_WHILE_ACTIVE_MS = 3000;

/** The log as the page holds it: the text so far and the sequence number of its last chunk. */
export type RunLogText = LogText;

export const isFinished = (run: Pick<RunSummary, "state">) => FINAL_RUN_STATES.includes(run.state);

export const runQueries = {
  all: ["runs"] as const,
  /** Every page and view of a group's list (for live updates and invalidation). */
  lists: (groupId: string) => [...runQueries.all, "list", groupId] as const,
  /** One page of a group's runs in a view (filters, sort, page: table/run-list-params.ts). */
  list: (groupId: string, view: RunListView = DEFAULT_VIEW) =>
    queryOptions({
      queryKey: [...runQueries.lists(groupId), queryFromView(view)] as const,
      queryFn: ({ signal }) => {
        const search = searchFromView(view);
        const suffix = search.size > 0 ? `?${search}` : "";
        return api.get(`/api/groups/${encodeURIComponent(groupId)}/runs${suffix}`, runListSchema, {
          signal,
        });
      },
      // The previous page stays on screen while the next one loads (never another group's).
      placeholderData: (previous, previousQuery) =>
        previousQuery?.queryKey[2] === groupId ? keepPreviousData(previous) : undefined,
      refetchInterval: (query) =>
        query.state.data?.runs.some((run) => !isFinished(run)) ? REFRESH_WHILE_ACTIVE_MS : false,
    }),
  /**
   * The group's targets (isotopologues too), recipes, hosts and members, as the list's filters offer
   * them and its recipe and host columns name them. A list the caller may not read is left empty.
   */
  filterOptions: (groupId: string) =>
    queryOptions({
      queryKey: [...runQueries.all, "filter-options", groupId] as const,
      queryFn: async ({ signal }): Promise<RunFilterOptions> => {
        const group = `/api/groups/${encodeURIComponent(groupId)}`;
        const orNone = <T>(request: Promise<T>) => request.catch(() => null);
        const [targets, recipes, hosts, members] = await Promise.all([
          orNone(api.get(`${group}/targets`, targetListSchema, { signal })),
          orNone(api.get(`${group}/recipes`, recipeListSchema, { signal })),
          orNone(api.get(`${group}/hosts`, hostListSchema, { signal })),
          orNone(api.get(`${group}/members`, memberListSchema, { signal })),
        ]);
        const byName = (a: { name: string }, b: { name: string }) => a.name.localeCompare(b.name);
        return {
          targets: (targets?.targets ?? [])
            .flatMap((target) => [target, ...target.isotopologues])
            .map(({ id, name }) => ({ id, name }))
            .sort(byName),
          recipes: (recipes?.recipes ?? []).map(({ id, name }) => ({ id, name })).sort(byName),
          hosts: (hosts?.hosts ?? []).map(({ id, name }) => ({ id, name })).sort(byName),
          submitters: (members?.members ?? [])
            .map((member) => ({ id: member.userId, name: member.displayName }))
            .sort(byName),
        };
      },
      staleTime: 60_000,
    }),
  /** The group's hosts, for choosing where a resubmitted run goes. */
  hosts: (groupId: string) =>
    queryOptions({
      queryKey: [...runQueries.all, "hosts", groupId] as const,
      queryFn: ({ signal }) =>
        api.get(`/api/groups/${encodeURIComponent(groupId)}/hosts`, hostListSchema, { signal }),
      staleTime: 60_000,
    }),
  detail: (runId: string) =>
    queryOptions({
      queryKey: [...runQueries.all, "detail", runId] as const,
      queryFn: ({ signal }) => api.get(`/api/runs/${encodeURIComponent(runId)}`, runDetailSchema, { signal }),
      refetchInterval: (query) =>
        query.state.data && !isFinished(query.state.data) ? REFRESH_WHILE_ACTIVE_MS : false,
    }),
  /**
   * The declared parameters (JSON Schema) of each stage's code in a recipe, for editing a run's
   * parameters before resubmitting it. Codes are immutable per version, so this is fetched once.
   */
  stageParameters: (recipeId: string) =>
    queryOptions({
      queryKey: [...runQueries.all, "stage-parameters", recipeId] as const,
      queryFn: ({ signal }) => fetchStageSchemas(recipeId, signal),
      staleTime: Number.POSITIVE_INFINITY,
    }),
  /**
   * The stored log, read page by page by sequence number and decoded across chunks (log-text.ts). A
   * refresh asks only for chunks after the last one it holds, so following a long log does not download
   * it again every few seconds; once the server says the log is complete, nothing more is asked.
   */
  log: (runId: string, finished: boolean) =>
    queryOptions({
      queryKey: [...runQueries.all, "log", runId] as const,
      queryFn: async ({ signal, client, queryKey }) => {
        const held = client.getQueryData<RunLogText>(queryKey) ?? EMPTY_LOG_TEXT;
        if (held.done) return held;
        // Pages are fetched first and decoded together at the end, so an abandoned fetch changes nothing.
        const chunks: Uint8Array[] = [];
        let lastSeq = held.lastSeq;
        let done = false;
        for (;;) {
          const page = await api.get(
            `/api/runs/${encodeURIComponent(runId)}/log?afterSeq=${lastSeq}`,
            runLogSchema,
            { signal },
          );
          for (const chunk of page.chunks) chunks.push(bytesFromBase64(chunk.dataBase64));
          lastSeq = page.lastSeq;
          done = page.done;
          if (page.done || page.chunks.length === 0) break;
        }
        return appendLogChunks(held, chunks, lastSeq, done);
      },
      refetchInterval: (query) => (finished || query.state.data?.done ? false : REFRESH_WHILE_ACTIVE_MS),
    }),
};
