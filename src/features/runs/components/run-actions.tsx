import type { RunSummary } from "@shared/schemas";
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import { describeError } from "@/lib/describe-error";
import { cancelRun, resubmitRun } from "../api/run-commands";
import { isFinished, runQueries } from "../api/run-queries";

/** Cancel while a run is unfinished, resubmit once it is; errors (allocation, host key) are shown as sent. */
export function RunActions({
  run,
  onResubmitted,
}: {
  run: RunSummary;
  onResubmitted?: (id: string) => void;
}) {
  const queryClient = useQueryClient();
  const refresh = () => queryClient.invalidateQueries({ queryKey: runQueries.all });
  const cancel = useMutation({ mutationFn: () => cancelRun(run.id), onSuccess: refresh });
  const resubmit = useMutation({
    mutationFn: () => resubmitRun(run.id),
    onSuccess: (created) => {
      void refresh();
      onResubmitted?.(created.id);
    },
  });
  const failure = cancel.error ?? resubmit.error;
  return (
    <div className="flex flex-col items-end gap-2">
      <div className="flex gap-2">
        {isFinished(run) ? (
          <Button
            size="sm"
            variant="secondary"
            onClick={() => resubmit.mutate()}
            disabled={resubmit.isPending}
          >
            Resubmit
          </Button>
        ) : (
          <Button
            size="sm"
            variant="ghost-danger"
            onClick={() => cancel.mutate()}
            disabled={cancel.isPending || run.cancelRequested}
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
    </div>
  );
}
