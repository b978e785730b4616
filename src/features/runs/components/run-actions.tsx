import type { RunSpec, RunSummary } from "@shared/schemas";
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { useState } from "react";
import { Button } from "@/components/ui/button";
import { ConfirmDialog } from "@/components/ui/dialog";
import { Notice } from "@/components/ui/notice";
import { describeError } from "@/lib/describe-error";
import { cancelRun, resubmitRun } from "../api/run-commands";
import { isFinished, runQueries } from "../api/run-queries";
import { ResubmitDialog } from "./resubmit-dialog";

/**
 * Cancel while a run is unfinished, resubmit once it is — as it was, or (where the run's spec is at hand,
 * on its page) with changed parameters; errors (allocation, host key) are shown as sent.
 */
export function RunActions({
  run,
  onResubmitted,
}: {
  run: RunSummary & { spec?: RunSpec };
  onResubmitted?: (id: string) => void;
}) {
  const queryClient = useQueryClient();
  const [editing, setEditing] = useState(false);
  const [confirmingCancel, setConfirmingCancel] = useState(false);
  const refresh = () => queryClient.invalidateQueries({ queryKey: runQueries.all });
  const cancel = useMutation({
    mutationFn: () => cancelRun(run.id),
    onSuccess: () => {
      setConfirmingCancel(false);
      return refresh();
    },
  });
  const resubmit = useMutation({
    mutationFn: () => resubmitRun(run.id),
    onSuccess: (created) => {
      void refresh();
      onResubmitted?.(created.id);
    },
  });
  // A failed cancel is shown in its dialog.
  const failure = resubmit.error;
  const spec = run.spec;
  return (
    <div className="flex flex-col items-end gap-2">
      <div className="flex gap-2">
        {isFinished(run) ? (
          <>
            <Button
              size="sm"
              variant="secondary"
              onClick={() => resubmit.mutate()}
              disabled={resubmit.isPending}
            >
              Resubmit
            </Button>
            {spec ? (
              <Button size="sm" variant="secondary" onClick={() => setEditing(true)} aria-haspopup="dialog">
                Resubmit with changes…
              </Button>
            ) : null}
          </>
        ) : (
          <Button
            size="sm"
            variant="ghost-danger"
            onClick={() => setConfirmingCancel(true)}
            disabled={cancel.isPending || run.cancelRequested}
            aria-haspopup="dialog"
          >
            {run.cancelRequested ? "Cancelling…" : "Cancel"}
          </Button>
        )}
      </div>
      {failure ? (
        <Notice tone="error" className="max-w-sm text-left">
          {describeError(failure).message}
        </Notice>
      ) : null}
      <ConfirmDialog
        open={confirmingCancel}
        title={`Cancel ${run.name}?`}
        confirmLabel="Cancel run"
        cancelLabel="Keep it"
        pending={cancel.isPending}
        error={cancel.error}
        onConfirm={() => cancel.mutate()}
        onClose={() => setConfirmingCancel(false)}
      >
        {run.state === "queued"
          ? "It has not started: it will not start."
          : "It is stopped on its host; the core-hours it used so far are charged."}
      </ConfirmDialog>
      {editing && spec ? (
        <ResubmitDialog
          run={{ id: run.id, groupId: run.groupId, name: run.name, recipeId: run.recipeId, spec }}
          onClose={() => setEditing(false)}
          onResubmitted={onResubmitted}
        />
      ) : null}
    </div>
  );
}
