import type { RunSummary } from "@shared/schemas";
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { useState } from "react";
import { Button } from "@/components/ui/button";
import { ConfirmDialog } from "@/components/ui/dialog";
import { Notice } from "@/components/ui/notice";
import { describeError } from "@/lib/describe-error";
import { cancelRun, resubmitRun } from "../api/run-commands";
import { isFinished, runQueries } from "../api/run-queries";

type Outcome = { run: Pick<RunSummary, "id" | "name">; error: string | null };
type Report = { action: "cancel" | "resubmit"; outcomes: Outcome[] };

/** At most this many requests at once, so a page of 200 does not open 200 connections. */
const PARALLEL = 4;

/** Each run's own request (the per-run API), a few at a time; every run's outcome is kept. */
async function eachRun(runs: RunSummary[], act: (id: string) => Promise<unknown>): Promise<Outcome[]> {
  const outcomes: Outcome[] = new Array(runs.length);
  let next = 0;
  const lane = async () => {
    while (next < runs.length) {
      const at = next++;
      const run = runs[at]!;
      try {
        await act(run.id);
        outcomes[at] = { run, error: null };
      } catch (error) {
        outcomes[at] = { run, error: describeError(error).message };
      }
    }
  };
  await Promise.all(Array.from({ length: Math.min(PARALLEL, runs.length) }, lane));
  return outcomes;
}

/**
 * A toolbar while runs are selected, and the report of the last action (kept after the selection clears).
 * Cancel the selected unfinished runs (after a confirmation) or resubmit the selected finished ones, as
 * they were. Each run is one request; the report names every run that failed and why.
 */
export function BulkActions({ selected, onDone }: { selected: RunSummary[]; onDone: () => void }) {
  const queryClient = useQueryClient();
  const [confirming, setConfirming] = useState(false);
  const [report, setReport] = useState<Report | null>(null);
  const cancellable = selected.filter((run) => !isFinished(run) && !run.cancelRequested);
  const resubmittable = selected.filter((run) => isFinished(run));
  const bulk = useMutation({
    mutationFn: async (action: Report["action"]): Promise<Report> => ({
      action,
      outcomes: await eachRun(
        action === "cancel" ? cancellable : resubmittable,
        action === "cancel" ? cancelRun : (id) => resubmitRun(id),
      ),
    }),
    onSuccess: (result) => {
      setReport(result);
      setConfirming(false);
      onDone();
      void queryClient.invalidateQueries({ queryKey: runQueries.all });
    },
  });
  const failed = report?.outcomes.filter((outcome) => outcome.error !== null) ?? [];
  const succeeded = (report?.outcomes.length ?? 0) - failed.length;
  const verb = report?.action === "cancel" ? "Cancelled" : "Resubmitted";
  return (
    <div className="mb-3 flex flex-col gap-2 empty:hidden">
      {selected.length > 0 ? (
        <div
          role="toolbar"
          aria-label="Selected runs"
          className="flex flex-wrap items-center gap-2 rounded-lg border border-ink-100 bg-ink-50/70 px-3 py-2 text-sm"
        >
          <span className="mr-2 text-ink-700" aria-live="polite">
            {selected.length} selected
          </span>
          <Button
            size="sm"
            variant="ghost-danger"
            disabled={cancellable.length === 0 || bulk.isPending}
            onClick={() => setConfirming(true)}
            aria-haspopup="dialog"
          >
            Cancel {cancellable.length} {cancellable.length === 1 ? "run" : "runs"}…
          </Button>
          <Button
            size="sm"
            variant="secondary"
            disabled={resubmittable.length === 0 || bulk.isPending}
            pending={bulk.isPending && bulk.variables === "resubmit"}
            onClick={() => bulk.mutate("resubmit")}
          >
            Resubmit {resubmittable.length} {resubmittable.length === 1 ? "run" : "runs"}
          </Button>
        </div>
      ) : null}
      {report ? (
        <Notice
          tone={failed.length > 0 ? "error" : "success"}
          title={`${verb} ${succeeded} of ${report.outcomes.length} ${report.outcomes.length === 1 ? "run" : "runs"}`}
          onDismiss={() => setReport(null)}
        >
          {failed.length > 0 ? (
            <ul className="mt-1 list-disc pl-5">
              {failed.map((outcome) => (
                <li key={outcome.run.id}>
                  <span className="font-medium">{outcome.run.name}</span>: {outcome.error}
                </li>
              ))}
            </ul>
          ) : null}
        </Notice>
      ) : null}
      <ConfirmDialog
        open={confirming}
        title={`Cancel ${cancellable.length} ${cancellable.length === 1 ? "run" : "runs"}?`}
        confirmLabel="Cancel runs"
        cancelLabel="Keep them"
        pending={bulk.isPending}
        onConfirm={() => bulk.mutate("cancel")}
        onClose={() => setConfirming(false)}
      >
        Queued runs never start; runs on a host are cancelled there.
        <ul className="mt-2 max-h-40 list-disc overflow-y-auto pl-5">
          {cancellable.map((run) => (
            <li key={run.id}>{run.name}</li>
          ))}
        </ul>
      </ConfirmDialog>
    </div>
  );
}
