/**
 * A group's runs list: filters, one sort column with the run's id as tiebreak, and pages. Each sort and
 * each filter with the default sort has an index ending in id (drizzle/0009_runs_list_indexes.sql), so a
 * page is read from an index range; bench/runs/runs-list.bench.ts times every combination.
 *
 * The page is found in two steps: first the ids of the page (narrow rows, joins only for a sort by a
 * related name), then the summaries of those ids. Sorting never carries a run's spec and plan.
 */
import { and, count, eq, gte, inArray, lt, lte, type SQL, sql } from "drizzle-orm";
import {
  RUN_LIST_PAGE_SIZE_DEFAULT,
  type RunList,
  type RunListQuery,
  type RunListSort,
} from "../../shared/schemas/runs";
import type { Principal } from "../auth/principal";
import type { Database } from "../db/client";
import { hosts, recipes, runs, targets, users } from "../db/schema";
import { requireGroupRole } from "./access";
import { selectSummaries, toSummary } from "./run-reads.service";

const DAY_MS = 86_400_000;
const isCalendarDate = (value: string) => value.length === 10;

/** The filters as one condition; a calendar-date bound covers its whole day (UTC). */
export function runListConditions(groupId: string, query: RunListQuery): SQL {
  const conditions: SQL[] = [eq(runs.groupId, groupId)];
  if (query.state && query.state.length > 0) conditions.push(inArray(runs.state, [...new Set(query.state)]));
  if (query.targetId) conditions.push(eq(runs.targetId, query.targetId));
  if (query.recipeId) conditions.push(eq(runs.recipeId, query.recipeId));
  if (query.hostId) conditions.push(eq(runs.hostId, query.hostId));
  if (query.submittedById) conditions.push(eq(runs.submittedBy, query.submittedById));
  if (query.createdFrom) conditions.push(gte(runs.createdAt, new Date(query.createdFrom)));
  if (query.createdTo) {
    conditions.push(
      isCalendarDate(query.createdTo)
        ? lt(runs.createdAt, new Date(Date.parse(query.createdTo) + DAY_MS))
        : lte(runs.createdAt, new Date(query.createdTo)),
    );
  }
  return and(...conditions)!;
}

/** What a sort orders by, and the table it needs joined (for a related name). */
const sortColumns: Record<RunListSort, { key: SQL; join?: "target" | "recipe" | "host" | "submitter" }> = {
  createdAt: { key: sql`${runs.createdAt}` },
  updatedAt: { key: sql`${runs.updatedAt}` },
  state: { key: sql`${runs.state}` },
  name: { key: sql`${runs.name}` },
  target: { key: sql`${targets.name}`, join: "target" },
  recipe: { key: sql`${recipes.name}`, join: "recipe" },
  host: { key: sql`${hosts.name}`, join: "host" },
  submittedBy: { key: sql`${users.displayName}`, join: "submitter" },
};

/**
 * ORDER BY for a sort. The indexes are `DESC NULLS LAST`; a descending sort says so and an ascending one
 * says `NULLS FIRST` (the index read backwards), or PostgreSQL would not use them for the order. Runs
 * without a target (or whose submitter's account is gone) come first ascending, last descending.
 */
function orderBy(sort: RunListSort, order: "asc" | "desc"): SQL {
  const { key } = sortColumns[sort];
  return order === "desc"
    ? sql`${key} desc nulls last, ${runs.id} desc nulls last`
    : sql`${key} asc nulls first, ${runs.id} asc nulls first`;
}

/** The statement that picks a page's ids (exported for the benchmark's EXPLAIN). */
export function runListPageIdsQuery(db: Database, groupId: string, query: RunListQuery) {
  const pageSize = query.pageSize ?? query.limit ?? RUN_LIST_PAGE_SIZE_DEFAULT;
  const page = query.limit !== undefined ? 1 : query.page;
  const { join } = sortColumns[query.sort];
  const base = db.select({ id: runs.id }).from(runs);
  const joined =
    join === "target"
      ? base.leftJoin(targets, eq(targets.id, runs.targetId))
      : join === "recipe"
        ? base.innerJoin(recipes, eq(recipes.id, runs.recipeId))
        : join === "host"
          ? base.innerJoin(hosts, eq(hosts.id, runs.hostId))
          : join === "submitter"
            ? base.leftJoin(users, eq(users.id, runs.submittedBy))
            : base;
  return {
    page,
    pageSize,
    statement: joined
      .where(runListConditions(groupId, query))
      .orderBy(orderBy(query.sort, query.order))
      .limit(pageSize)
      .offset((page - 1) * pageSize),
  };
}

export async function listRuns(
  db: Database,
  principal: Principal,
  groupId: string,
  query: RunListQuery,
): Promise<RunList> {
  await requireGroupRole(db, principal, groupId, "collaborator");
  const { page, pageSize, statement } = runListPageIdsQuery(db, groupId, query);
  const [ids, [counted]] = await Promise.all([
    statement,
    db.select({ total: count() }).from(runs).where(runListConditions(groupId, query)),
  ]);
  if (ids.length === 0) return { runs: [], total: counted?.total ?? 0, page, pageSize };
  const rows = await selectSummaries(db).where(
    inArray(
      runs.id,
      ids.map((row) => row.id),
    ),
  );
  const byId = new Map(rows.map((row) => [row.run.id, row]));
  const summaries = ids.flatMap(({ id }) => {
    const row = byId.get(id);
    // A run deleted between the two reads (its group's deletion) is left out rather than failing.
    return row ? [toSummary(row)] : [];
  });
  return { runs: summaries, total: counted?.total ?? 0, page, pageSize };
}
