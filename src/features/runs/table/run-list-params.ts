/**
 * The runs list's view (filters, sort, page) as it lives in the page's address, so a view can be shared
 * and survives a reload. The parameter names are the API's (runListQuerySchema): the address's query is
 * what the list asks the server for, minus the defaults.
 */
import {
  RUN_LIST_PAGE_SIZE_DEFAULT,
  type RunListQuery,
  type RunListQueryInput,
  type RunListSort,
  type RunState,
  type RunSummary,
  runListQuerySchema,
  runStateSchema,
} from "@shared/schemas";

/** A view as the page holds it: every field present, defaults applied. */
export type RunListView = {
  state: RunState[];
  targetId?: string;
  recipeId?: string;
  hostId?: string;
  submittedById?: string;
  createdFrom?: string;
  createdTo?: string;
  sort: RunListSort;
  order: "asc" | "desc";
  page: number;
  pageSize: number;
};

export const DEFAULT_VIEW: RunListView = {
  state: [],
  sort: "createdAt",
  order: "desc",
  page: 1,
  pageSize: RUN_LIST_PAGE_SIZE_DEFAULT,
};

const SINGLE_KEYS = [
  "targetId",
  "recipeId",
  "hostId",
  "submittedById",
  "createdFrom",
  "createdTo",
  "sort",
  "order",
  "page",
  "pageSize",
] as const;

/**
 * Reads a view from the address. A parameter the API would refuse (edited by hand, or from an older
 * link) is left out rather than breaking the page; `ignored` names them so the page can say so.
 */
export function viewFromSearch(search: URLSearchParams): { view: RunListView; ignored: string[] } {
  const ignored: string[] = [];
  const raw: Record<string, unknown> = {};
  const states = search.getAll("state").flatMap((value) => value.split(","));
  const validStates = states.filter((state): state is RunState => runStateSchema.safeParse(state).success);
  if (validStates.length !== states.length) ignored.push("state");
  if (validStates.length > 0) raw.state = validStates;
  for (const key of SINGLE_KEYS) {
    const value = search.get(key);
    if (value === null || value === "") continue;
    const alone = runListQuerySchema.safeParse({ [key]: value });
    if (alone.success) raw[key] = value;
    else ignored.push(key);
  }
  let parsed = runListQuerySchema.safeParse(raw);
  if (!parsed.success) {
    // Valid alone but not together (a range whose start is after its end): drop the range.
    ignored.push("createdFrom", "createdTo");
    delete raw.createdFrom;
    delete raw.createdTo;
    parsed = runListQuerySchema.safeParse(raw);
  }
  const query: RunListQuery = parsed.success ? parsed.data : runListQuerySchema.parse({});
  return {
    view: {
      ...DEFAULT_VIEW,
      ...query,
      state: query.state ?? [],
      pageSize: query.pageSize ?? RUN_LIST_PAGE_SIZE_DEFAULT,
    },
    ignored,
  };
}

/** The address's query for a view: only what differs from the default, states repeated. */
export function searchFromView(view: RunListView): URLSearchParams {
  const search = new URLSearchParams();
  for (const state of view.state) search.append("state", state);
  for (const key of SINGLE_KEYS) {
    const value = view[key];
    if (value === undefined || value === DEFAULT_VIEW[key as keyof RunListView]) continue;
    search.set(key, String(value));
  }
  return search;
}

/** What the list asks the server for (the query key holds exactly this). */
export function queryFromView(view: RunListView): RunListQueryInput {
  const { state, ...rest } = view;
  return Object.fromEntries(
    Object.entries({ ...rest, state: state.length > 0 ? state : undefined }).filter(
      ([, value]) => value !== undefined,
    ),
  ) as RunListQueryInput;
}

/** Whether a run belongs in a view's filters (the live feed's new runs go only where they belong). */
export function runMatchesView(run: RunSummary, view: RunListView): boolean {
  if (view.state.length > 0 && !view.state.includes(run.state)) return false;
  if (view.targetId && run.targetId !== view.targetId) return false;
  if (view.recipeId && run.recipeId !== view.recipeId) return false;
  if (view.hostId && run.hostId !== view.hostId) return false;
  if (view.submittedById && run.submittedById !== view.submittedById) return false;
  const created = Date.parse(run.createdAt);
  if (view.createdFrom && created < Date.parse(view.createdFrom)) return false;
  if (view.createdTo) {
    const end =
      view.createdTo.length === 10 ? Date.parse(view.createdTo) + 86_400_000 : Date.parse(view.createdTo) + 1;
    if (created >= end) return false;
  }
  return true;
}

/** The view a list query's key holds (queryFromView undone). */
export function viewFromQuery(query: RunListQueryInput | undefined): RunListView {
  const input = (query ?? {}) as Partial<RunListView>;
  return { ...DEFAULT_VIEW, ...input, state: input.state ?? [] };
}

/** The default order (newest first) on the first page: where a new run appears at the top. */
export const showsNewestFirst = (view: RunListView) =>
  view.page === 1 && view.sort === "createdAt" && view.order === "desc";
