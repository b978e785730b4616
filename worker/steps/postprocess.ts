/**
 * `postprocess`: turns a done run's collected result files into results. Which files: those each recipe
 * stage's code declares in `resultFiles`, matched with the run's collected files by stage and name (a
 * reusing run reads the collected files of the run it reuses). Options: the run spec's `analysis`.
 *
 * Like every step it re-reads the run and is safe to repeat: it acts only on a `done` run whose
 * results_state is `pending`, and replaces the run's results and settles results_state in one transaction
 * (conditional on `pending`, so two attempts never both store). A file that cannot be read or a value the
 * science core refuses settles `failed` with the reason; the run stays `done` and its collected files are
 * untouched. Database trouble is thrown, and the queue retries.
 *
 * The reading and deriving run in a child process (`worker/results/derive-isolated.ts`), bounded in time
 * (WORKER_POSTPROCESS_TIMEOUT_MS) and heap (WORKER_POSTPROCESS_MAX_HEAP_MB): past either, the child is
 * stopped and results settle `failed` with what was exceeded. A child that cannot start is thrown (not
 * the files' fault), and the queue retries. Loading the files and storing stay here, in one transaction.
 */
import { and, eq, inArray, sql } from "drizzle-orm";
import { codes, runArtifacts, runResults, runs, targetVersions } from "../../server/db/schema";
import { RUN_STEP_QUEUES } from "../../server/queue/queues";
import type { CodeDefinition } from "../../shared/schemas/codes";
import { type RunAnalysis, runAnalysisSchema } from "../../shared/schemas/results";
import type { WorkerConfig } from "../config";
import type { WorkerContext } from "../context";
import type { DerivedResult } from "../results/derive-common";
import { DerivationPool, DerivationProcessError } from "../results/derive-isolated";
import type { ResultFile } from "../results/derive-run-results";
import { loadRun, planOf, type RunRow } from "../run-runtime";

/** Prefix of results_message when deriving failed. */
export const RESULTS_FAILED_PREFIX = "results could not be derived: ";

/** One pool of derivation processes per worker (keyed by its settings: tests start several in one process). */
const derivationPools = new WeakMap<WorkerConfig, DerivationPool>();

function derivationPool(config: WorkerConfig): DerivationPool {
  let pool = derivationPools.get(config);
  if (!pool) {
    const { concurrency, timeoutMs, maxHeapMb } = config.postprocess;
    pool = new DerivationPool(concurrency, { timeoutMs, maxHeapMb });
    derivationPools.set(config, pool);
  }
  return pool;
}

type Settlement =
  | { state: "derived"; message: string | null; results: DerivedResult[] }
  | { state: "none" | "failed"; message: string };

export async function postprocessRun(ctx: WorkerContext, runId: string): Promise<void> {
  const run = await loadRun(ctx, runId);
  if (run?.state !== "done" || run.resultsState !== "pending") return;
  const settlement = await deriveFor(ctx, run);
  await ctx.db.transaction(async (tx) => {
    const [claimed] = await tx
      .update(runs)
      .set({ resultsState: settlement.state, resultsMessage: settlement.message, updatedAt: new Date() })
      .where(and(eq(runs.id, run.id), eq(runs.state, "done"), eq(runs.resultsState, "pending")))
      .returning({ id: runs.id });
    if (!claimed) return;
    await tx.delete(runResults).where(eq(runResults.runId, run.id));
    if (settlement.state !== "derived" || settlement.results.length === 0) return;
    await tx.insert(runResults).values(
      settlement.results.map((row, i) => ({
        runId: run.id,
        kind: row.kind,
        process: row.process,
        irrep: row.irrep,
        label: row.label,
        columns: row.columns,
        columnOrder: row.columnOrder,
        fit: row.fit,
        method: row.method,
        // One microsecond apart in derivation order, so a read can return them in that order.
        createdAt: sql`now() + ${i} * interval '1 microsecond'`,
      })),
    );
  });
  ctx.log.info({ runId, resultsState: settlement.state }, "run postprocessed");
}

async function deriveFor(ctx: WorkerContext, run: RunRow): Promise<Settlement> {
  const declared = await declaredResultFiles(ctx, run);
  if (declared.length === 0) {
    return {
      state: "none",
      message: "No code of the recipe declares result files, so there are no results.",
    };
  }
  const sourceRunId = run.reusedFrom ?? run.id;
  const artifacts = await ctx.db
    .select({ stage: runArtifacts.stage, name: runArtifacts.name, content: runArtifacts.content })
    .from(runArtifacts)
    .where(
      and(
        eq(runArtifacts.runId, sourceRunId),
        inArray(
          runArtifacts.name,
          declared.map((file) => file.fileName),
        ),
      ),
    );
  const files: ResultFile[] = [];
  const missing: string[] = [];
  for (const file of declared) {
    const artifact = artifacts.find((a) => a.stage === file.stage && a.name === file.fileName);
    if (artifact) files.push({ ...file, content: artifact.content });
    else missing.push(`${file.stage}/${file.fileName}`);
  }
  if (files.length === 0) {
    return {
      state: "none",
      message: `The declared result file${missing.length > 1 ? "s were" : " was"} not collected (${missing.join(", ")}), so there are no results.`,
    };
  }
  const parsedAnalysis = runAnalysisSchema.safeParse((run.spec as { analysis?: unknown }).analysis ?? {});
  if (!parsedAnalysis.success) {
    return { state: "failed", message: `${RESULTS_FAILED_PREFIX}the run's analysis options are invalid` };
  }
  const analysis: RunAnalysis = parsedAnalysis.data;
  const charge = await targetCharge(ctx, run);
  try {
    const { derivation, usage } = await derivationPool(ctx.config).derive(files, analysis, { charge });
    ctx.log.debug({ runId: run.id, ...usage }, "results derived in a child process");
    const { results, notes } = derivation;
    const skipped = missing.length > 0 ? [`Not collected, so not read: ${missing.join(", ")}.`] : [];
    const message = [...skipped, ...notes].join(" ");
    return { state: "derived", message: message === "" ? null : message, results };
  } catch (error) {
    // A child that could not start or died by itself: not the files' fault, so the queue retries.
    if (error instanceof DerivationProcessError) throw error;
    // Otherwise the derivation is pure and bounded: repeating it would end the same way (refused, too slow,
    // too large).
    ctx.log.warn({ err: error, runId: run.id }, "results could not be derived");
    const reason = error instanceof Error ? error.message : String(error);
    return { state: "failed", message: `${RESULTS_FAILED_PREFIX}${reason}` };
  }
}

/** The result files the codes of the run's stages declare, in stage order. */
async function declaredResultFiles(ctx: WorkerContext, run: RunRow) {
  const stages = planOf(run).stages;
  const codeIds = [...new Set(stages.map((stage) => stage.codeId))];
  const rows =
    codeIds.length === 0
      ? []
      : await ctx.db
          .select({ id: codes.id, definition: codes.definition })
          .from(codes)
          .where(inArray(codes.id, codeIds));
  return stages.flatMap((stage) => {
    const definition = rows.find((row) => row.id === stage.codeId)?.definition as CodeDefinition | undefined;
    return (definition?.resultFiles ?? []).map((file) => ({
      stage: stage.name,
      fileName: file.fileName,
      reader: file.reader,
    }));
  });
}

/** The charge of the target version the run used; null for a run without a target. */
async function targetCharge(ctx: WorkerContext, run: RunRow): Promise<number | null> {
  if (!run.targetVersionId) return null;
  const [row] = await ctx.db
    .select({ charge: targetVersions.charge })
    .from(targetVersions)
    .where(eq(targetVersions.id, run.targetVersionId));
  return row?.charge ?? null;
}

/**
 * At worker start: a done run whose results are still `pending` lost its postprocess item (a killed
 * worker, or retries used up); it gets one again. The step re-reads the run, so a duplicate is harmless.
 */
export async function reconcilePendingResults(ctx: WorkerContext): Promise<number> {
  const pending = await ctx.db
    .select({ id: runs.id })
    .from(runs)
    .where(and(eq(runs.state, "done"), eq(runs.resultsState, "pending")));
  for (const run of pending) await ctx.boss.send(RUN_STEP_QUEUES.postprocess, { runId: run.id });
  return pending.length;
}
