/**
 * The group's runs list (server/services/run-list.service.ts) with 10 000 runs in one group: server time
 * of the service function for the first page, every sort both ways, every filter, a combination and a
 * deep page, and EXPLAIN ANALYZE of the page's id query and of the count, showing which index each uses.
 *
 * Run: node --import tsx bench/runs/runs-list.bench.ts [runs=10000] [--repeat=9]
 *
 * A private PostgreSQL (fsync on, as an installation runs it) with Sigmaflow's migrations; the runs are
 * inserted directly (tests/integration/support/run-list-seed.ts: states weighted like a busy group's
 * history, 6 targets with one run in ten without one, 4 recipes, 3 hosts, 4 submitters, creation times
 * spread over 330 days), plus 3 other groups of 3 000 runs each so the group's rows are not the whole
 * table. VACUUM ANALYZE runs before timing. Each figure is the median (and max) of `repeat` calls after one
 * warm-up call, each call as a route makes it: the role check, the page's ids and the total, the
 * summaries.
 */
import { sql } from "drizzle-orm";
import type { Principal } from "../../server/auth/principal";
import { createDatabase } from "../../server/db/client";
import { runs } from "../../server/db/schema";
import { listRuns, runListConditions, runListPageIdsQuery } from "../../server/services/run-list.service";
import { type RunListQueryInput, runListQuerySchema, runListSortSchema } from "../../shared/schemas/runs";
import { insertRuns, seedRunListGroup, spreadRuns } from "../../tests/integration/support/run-list-seed";
import { startBenchDatabase } from "../support/bench-database";

const runCount = Number(process.argv.slice(2).find((arg) => /^\d+$/.test(arg)) ?? 10_000);
const repeat = Number(process.argv.find((arg) => arg.startsWith("--repeat="))?.split("=")[1] ?? 9);

const { postgres, url } = await startBenchDatabase();
try {
  const { db, pool } = createDatabase(url);

  const seedStart = performance.now();
  const mine = await seedRunListGroup(db, "bench-runs");
  await insertRuns(db, mine, spreadRuns(mine, runCount, { seed: 11 }));
  for (let g = 0; g < 3; g++) {
    const other = await seedRunListGroup(db, `bench-other-${g}`);
    await insertRuns(db, other, spreadRuns(other, 3000, { seed: 100 + g }));
  }
  // As autovacuum would have by then: statistics and the visibility map (index-only scans).
  await db.execute(sql`vacuum analyze`);
  const [{ total } = { total: 0 }] = (await db.execute(sql`select count(*)::int as total from runs`))
    .rows as { total: number }[];
  console.log(
    `seeded ${runCount} runs in the group + 9000 in 3 other groups (${total} in all) in ${((performance.now() - seedStart) / 1000).toFixed(1)} s`,
  );

  const member = mine.submitters[0]!;
  const principal: Principal = {
    userId: member.id,
    email: member.email,
    displayName: member.displayName,
    isSiteAdmin: false,
    via: "token",
  };

  const cases: [string, RunListQueryInput][] = [
    ["first page (newest first, 50)", {}],
    ...runListSortSchema.options.flatMap((sort) =>
      (["asc", "desc"] as const).map(
        (order) => [`sort ${sort} ${order}`, { sort, order }] as [string, RunListQueryInput],
      ),
    ),
    ["state = running", { state: ["running"] }],
    [
      "state in (queued, staging, submitted, running, held)",
      { state: ["queued", "staging", "submitted", "running", "held"] },
    ],
    ["target", { targetId: mine.targets[0]!.id }],
    ["recipe", { recipeId: mine.recipes[1]!.id }],
    ["host", { hostId: mine.hosts[2]!.id }],
    ["submitter", { submittedById: mine.submitters[3]!.id }],
    ["created in March", { createdFrom: "2026-03-01", createdTo: "2026-03-31" }],
    [
      "state done + host + sort name asc",
      { state: ["done"], hostId: mine.hosts[0]!.id, sort: "name", order: "asc" },
    ],
    [
      "recipe + created range + sort target desc",
      { recipeId: mine.recipes[0]!.id, createdFrom: "2026-02-01", createdTo: "2026-06-30", sort: "target" },
    ],
    ["page 50 of 200 (rows 9 801–10 000)", { page: 50, pageSize: 200 }],
    ["page 50, sort submittedBy asc", { page: 50, pageSize: 200, sort: "submittedBy", order: "asc" }],
  ];

  const median = (values: number[]) => {
    const sorted = [...values].sort((a, b) => a - b);
    return sorted[Math.floor(sorted.length / 2)]!;
  };
  console.log(`\nserver time of listRuns, median (max) of ${repeat} calls, ms:`);
  const rows: { case: string; medianMs: number; maxMs: number; total: number; rows: number }[] = [];
  for (const [label, input] of cases) {
    const query = runListQuerySchema.parse(input);
    const first = await listRuns(db, principal, mine.group.id, query);
    const times: number[] = [];
    for (let i = 0; i < repeat; i++) {
      const start = performance.now();
      await listRuns(db, principal, mine.group.id, query);
      times.push(performance.now() - start);
    }
    rows.push({
      case: label,
      medianMs: median(times),
      maxMs: Math.max(...times),
      total: first.total,
      rows: first.runs.length,
    });
  }
  const width = Math.max(...rows.map((row) => row.case.length));
  for (const row of rows) {
    console.log(
      `  ${row.case.padEnd(width)}  ${row.medianMs.toFixed(1).padStart(6)} (${row.maxMs.toFixed(1).padStart(6)})  ${String(row.rows).padStart(3)} of ${row.total}`,
    );
  }
  const worst = rows.reduce((a, b) => (b.medianMs > a.medianMs ? b : a));
  console.log(`slowest median: ${worst.case}, ${worst.medianMs.toFixed(1)} ms (budget 200 ms)`);

  const explain = async (label: string, statement: { toSQL(): { sql: string; params: unknown[] } }) => {
    const { sql: text, params } = statement.toSQL();
    const plan = await pool.query(`explain (analyze, buffers, costs off) ${text}`, params);
    console.log(`\nEXPLAIN ANALYZE — ${label}:`);
    for (const line of plan.rows) console.log(`  ${line["QUERY PLAN"]}`);
  };
  for (const [label, input] of [
    ["first page ids (newest first)", {}],
    ["page ids, state in (running, held), newest first", { state: ["running", "held"] }],
    ["page ids, sort host asc", { sort: "host", order: "asc" }],
  ] as [string, RunListQueryInput][]) {
    await explain(label, runListPageIdsQuery(db, mine.group.id, runListQuerySchema.parse(input)).statement);
  }
  await explain(
    "the total (no filter)",
    db
      .select({ total: sql`count(*)` })
      .from(runs)
      .where(runListConditions(mine.group.id, runListQuerySchema.parse({}))),
  );
  await pool.end();
} finally {
  await postgres.stop();
}
