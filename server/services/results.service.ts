/**
 * Reading a run's results: what the postprocess step derived from its collected files, with the state
 * and message of that step and the caution every result view shows. Same access as the run itself.
 */
import { asc, eq } from "drizzle-orm";
import {
  type ArrheniusFitResult,
  RESULTS_CAUTION,
  type Result,
  type RunResults,
} from "../../shared/schemas/results";
import type { Principal } from "../auth/principal";
import type { Database } from "../db/client";
import { runResults } from "../db/schema";
import { visibleRun } from "./run-reads.service";

/**
 * The results of a run the caller may see (any role in its group), or 404.
 * Rows come in the order the postprocess step derived them (cross sections, eigenphase sums, rate
 * coefficients, orbital tables; sums before their parts), which it records in `created_at`.
 */
export async function getRunResults(db: Database, principal: Principal, runId: string): Promise<RunResults> {
  const run = await visibleRun(db, principal, runId, "collaborator");
  const rows = await db
    .select()
    .from(runResults)
    .where(eq(runResults.runId, run.id))
    .orderBy(asc(runResults.createdAt), asc(runResults.id));
  return {
    runId: run.id,
    state: run.resultsState,
    message: run.resultsMessage,
    caution: RESULTS_CAUTION,
    results: rows.map(
      (row): Result => ({
        id: row.id,
        runId: row.runId,
        kind: row.kind as Result["kind"],
        process: row.process as Result["process"],
        irrep: row.irrep,
        label: row.label,
        columns: row.columns as Result["columns"],
        columnOrder: row.columnOrder as Result["columnOrder"],
        fit: (row.fit as ArrheniusFitResult | null) ?? null,
        method: row.method,
        createdAt: row.createdAt.toISOString(),
      }),
    ),
  };
}
