/**
 * The group's runs list (`GET /api/groups/:groupId/runs`, contract runListQuerySchema in
 * shared/schemas/runs.ts) against PostgreSQL: every filter, every sort both ways, pages walked end to end,
 * bad parameters answered 400 naming the parameter, and another group's runs never listed.
 *
 * The expected pages come from an oracle written here: the seeded runs filtered and sorted in
 * JavaScript (ties by id, uuids compared as lowercase hex, which is PostgreSQL's uuid order; a missing
 * target first ascending and last descending, as the list documents). Names are chosen so that code-unit
 * order and the database's collation agree (one capitalised word, "run", a number).
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import {
  type RunListSort,
  type RunState,
  runListSortSchema,
  runStateSchema,
} from "../../shared/schemas/runs";
import { type Api, apiClient } from "./support/api-client";
import { createUser, tokenFor } from "./support/people";
import {
  insertRuns,
  type SeededGroup,
  type SeedRun,
  seedRunListGroup,
  spreadRuns,
} from "./support/run-list-seed";
import { startTestApp } from "./support/test-app";
import { createTestDatabase, type TestDatabase } from "./support/test-database";

type Seeded = SeedRun & { id: string };

let database: TestDatabase;
let app: Awaited<ReturnType<typeof startTestApp>>;
let api: Api;
let outsiderApi: Api;
let mine: SeededGroup;
let theirs: SeededGroup;
let seeded: Seeded[];
let theirIds: Set<string>;

beforeAll(async () => {
  database = await createTestDatabase("runs_list");
  app = await startTestApp(database);
  mine = await seedRunListGroup(database.db, "runs-list-mine");
  theirs = await seedRunListGroup(database.db, "runs-list-theirs");
  const list = spreadRuns(mine, 300, { seed: 7 });
  // Two runs either side of midnight, for the inclusive end of a date range.
  list.push(
    { ...list[0]!, name: "Water run 901", createdAt: new Date("2026-03-10T23:59:59.999Z") },
    { ...list[0]!, name: "Water run 902", createdAt: new Date("2026-03-11T00:00:00.000Z") },
  );
  const ids = await insertRuns(database.db, mine, list);
  seeded = list.map((run, i) => ({ ...run, id: ids[i]! }));
  theirIds = new Set(await insertRuns(database.db, theirs, spreadRuns(theirs, 60, { seed: 8 })));
  api = apiClient(app.baseUrl, await tokenFor(database.db, mine.submitters[0]!));
  const outsider = await createUser(database.db, "runs-list-outsider");
  outsiderApi = apiClient(app.baseUrl, await tokenFor(database.db, outsider));
}, 60_000);

afterAll(async () => {
  await app?.close();
  await database?.drop();
});

const list = (query: string) => api("GET", `/api/groups/${mine.group.id}/runs${query ? `?${query}` : ""}`);

const compare = (a: string | number | null, b: string | number | null): number => {
  if (a === b) return 0;
  if (a === null) return -1; // nulls first ascending (and, reversed, last descending)
  if (b === null) return 1;
  return a < b ? -1 : 1;
};

function sortKey(run: Seeded, sort: RunListSort): string | number | null {
  switch (sort) {
    case "createdAt":
      return run.createdAt.getTime();
    case "updatedAt":
      return run.updatedAt.getTime();
    case "state":
      return runStateSchema.options.indexOf(run.state);
    case "name":
      return run.name;
    case "target":
      return run.targetIndex === null ? null : mine.targets[run.targetIndex]!.name;
    case "recipe":
      return mine.recipes[run.recipeIndex]!.name;
    case "host":
      return mine.hosts[run.hostIndex]!.name;
    case "submittedBy":
      return mine.submitters[run.submitterIndex]!.displayName;
  }
}

function oracle(
  filter: (run: Seeded) => boolean,
  sort: RunListSort = "createdAt",
  order: "asc" | "desc" = "desc",
): string[] {
  const sign = order === "asc" ? 1 : -1;
  return seeded
    .filter(filter)
    .sort((a, b) => sign * (compare(sortKey(a, sort), sortKey(b, sort)) || compare(a.id, b.id)))
    .map((run) => run.id);
}

const idsOf = (body: { runs: { id: string }[] }) => body.runs.map((run) => run.id);

describe("the group's runs list", () => {
  it("gives the newest 50 first, with the total", async () => {
    const response = await list("");
    expect(response.status).toBe(200);
    expect(response.body.total).toBe(seeded.length);
    expect(response.body.page).toBe(1);
    expect(response.body.pageSize).toBe(50);
    expect(idsOf(response.body)).toEqual(oracle(() => true).slice(0, 50));
    // The rows are full summaries: names joined in.
    const first = response.body.runs[0];
    const run = seeded.find((held) => held.id === first.id)!;
    expect(first.submittedByName).toBe(mine.submitters[run.submitterIndex]!.displayName);
    expect(first.targetName).toBe(run.targetIndex === null ? null : mine.targets[run.targetIndex]!.name);
  });

  it.each(runListSortSchema.options.flatMap((sort) => [[sort, "asc"] as const, [sort, "desc"] as const]))(
    "sorts by %s %s with the id as tiebreak",
    async (sort, order) => {
      const response = await list(`sort=${sort}&order=${order}&pageSize=25&page=2`);
      expect(response.status).toBe(200);
      expect(idsOf(response.body)).toEqual(oracle(() => true, sort, order).slice(25, 50));
    },
  );

  it("walks every page once, in order, with nothing twice", async () => {
    const walked: string[] = [];
    for (let page = 1; page <= 9; page++) {
      const response = await list(`sort=state&order=asc&pageSize=40&page=${page}`);
      expect(response.status).toBe(200);
      walked.push(...idsOf(response.body));
    }
    expect(walked).toEqual(oracle(() => true, "state", "asc"));
    const beyond = await list("pageSize=40&page=10");
    expect(beyond.body.runs).toEqual([]);
    expect(beyond.body.total).toBe(seeded.length);
  });

  it("filters by several states, written repeated or comma-separated", async () => {
    const wanted: RunState[] = ["running", "held"];
    const expected = oracle((run) => wanted.includes(run.state));
    expect(expected.length).toBeGreaterThan(0);
    const repeated = await list("state=running&state=held&pageSize=200");
    expect(repeated.body.total).toBe(expected.length);
    expect(idsOf(repeated.body)).toEqual(expected.slice(0, 200));
    const commas = await list("state=running,held&pageSize=200");
    expect(idsOf(commas.body)).toEqual(idsOf(repeated.body));
  });

  it("filters by target, recipe, host and submitter, alone and together", async () => {
    const target = mine.targets[2]!;
    const recipe = mine.recipes[1]!;
    const host = mine.hosts[0]!;
    const submitter = mine.submitters[3]!;
    const cases: [string, (run: Seeded) => boolean][] = [
      [`targetId=${target.id}`, (run) => run.targetIndex === 2],
      [`recipeId=${recipe.id}`, (run) => run.recipeIndex === 1],
      [`hostId=${host.id}`, (run) => run.hostIndex === 0],
      [`submittedById=${submitter.id}`, (run) => run.submitterIndex === 3],
      [
        `recipeId=${recipe.id}&hostId=${host.id}&state=done`,
        (run) => run.recipeIndex === 1 && run.hostIndex === 0 && run.state === "done",
      ],
    ];
    for (const [query, filter] of cases) {
      const expected = oracle(filter, "name", "asc");
      expect(expected.length, query).toBeGreaterThan(0);
      const response = await list(`${query}&sort=name&order=asc&pageSize=200`);
      expect(response.status, query).toBe(200);
      expect(response.body.total, query).toBe(expected.length);
      expect(idsOf(response.body), query).toEqual(expected.slice(0, 200));
    }
  });

  it("filters by creation date, both days included, or by exact instants", async () => {
    const from = new Date("2026-03-01T00:00:00Z").getTime();
    const toExclusive = new Date("2026-03-11T00:00:00Z").getTime();
    const expected = oracle(
      (run) => run.createdAt.getTime() >= from && run.createdAt.getTime() < toExclusive,
    );
    expect(expected).toContain(seeded.find((run) => run.name === "Water run 901")!.id);
    expect(expected).not.toContain(seeded.find((run) => run.name === "Water run 902")!.id);
    const days = await list("createdFrom=2026-03-01&createdTo=2026-03-10&pageSize=200");
    expect(days.status).toBe(200);
    expect(days.body.total).toBe(expected.length);
    expect(idsOf(days.body)).toEqual(expected);

    const instant = "2026-03-11T00:00:00.000Z";
    const upTo = await list(`createdTo=${encodeURIComponent(instant)}&createdFrom=2026-03-10&pageSize=200`);
    expect(upTo.status).toBe(200);
    expect(idsOf(upTo.body)).toEqual(
      oracle(
        (run) =>
          run.createdAt.getTime() >= Date.parse("2026-03-10T00:00:00Z") &&
          run.createdAt.getTime() <= Date.parse(instant),
      ),
    );
  });

  it("never lists another group's runs, whatever the filter", async () => {
    const all: string[] = [];
    for (let page = 1; page <= 2; page++) all.push(...idsOf((await list(`pageSize=200&page=${page}`)).body));
    expect(all).toHaveLength(seeded.length);
    expect(all.filter((id) => theirIds.has(id))).toEqual([]);
    const theirHost = await list(`hostId=${theirs.hosts[0]!.id}`);
    expect(theirHost.status).toBe(200);
    expect(theirHost.body).toMatchObject({ runs: [], total: 0 });
    const theirSubmitter = await list(`submittedById=${theirs.submitters[0]!.id}`);
    expect(theirSubmitter.body).toMatchObject({ runs: [], total: 0 });
    // Someone outside the group learns nothing, filtered or not.
    const outside = await outsiderApi("GET", `/api/groups/${mine.group.id}/runs?state=done&sort=host`);
    expect(outside.status).toBe(404);
  });

  it("keeps the command line's limit as the first page's size", async () => {
    const response = await list("state=done&limit=7");
    expect(response.status).toBe(200);
    expect(response.body.pageSize).toBe(7);
    expect(idsOf(response.body)).toEqual(oracle((run) => run.state === "done").slice(0, 7));
  });

  it.each([
    ["state=finished", "state"],
    ["targetId=not-a-uuid", "targetId"],
    ["recipeId=1234", "recipeId"],
    ["hostId=", "hostId"],
    ["submittedById=someone", "submittedById"],
    ["createdFrom=yesterday", "createdFrom"],
    ["createdTo=2026-13-01", "createdTo"],
    ["createdFrom=2026-05-02&createdTo=2026-05-01", "createdFrom"],
    ["sort=colour", "sort"],
    ["order=up", "order"],
    ["page=0", "page"],
    ["page=1.5", "page"],
    ["pageSize=201", "pageSize"],
    ["pageSize=ten", "pageSize"],
    ["pageSize=10&limit=10", "limit"],
    ["colour=blue", "colour"],
  ])("answers %s with a 400 naming %s", async (query, parameter) => {
    const response = await list(query);
    expect(response.status).toBe(400);
    expect(response.body.error.code).toBe("invalid_query");
    expect(response.body.error.message).toContain(parameter);
  });
});
