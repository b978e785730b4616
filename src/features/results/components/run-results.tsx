import { useQuery } from "@tanstack/react-query";
import { useMemo } from "react";
import { ErrorState } from "@/components/ui/error-state";
import { Notice } from "@/components/ui/notice";
import { Skeleton } from "@/components/ui/skeleton";
import { Spinner } from "@/components/ui/spinner";
import { resultQueries } from "../api/result-queries";
import { groupResults } from "../chart-plan";
import { ResultGroupCard } from "./result-group-card";

/**
 * A finished run's results: whether they have been derived yet, why there are none or why deriving them
 * failed, and each kind of result with its chart and numbers under the caution that they are model
 * results.
 */
export function RunResults({ runId }: { runId: string }) {
  const results = useQuery(resultQueries.forRun(runId));
  const groups = useMemo(() => groupResults(results.data?.results ?? []), [results.data]);
  if (results.isPending) {
    return (
      <div role="status" aria-label="Loading results">
        <Skeleton className="h-24 w-full rounded-xl" />
      </div>
    );
  }
  if (results.isError) {
    return (
      <ErrorState error={results.error} onRetry={() => results.refetch()} retrying={results.isFetching} />
    );
  }
  const { state, message, caution } = results.data;
  return (
    <div className="flex flex-col gap-4">
      {state === null || state === "pending" ? (
        <p className="text-sm text-ink-600">
          <Spinner label="Deriving results from the collected files…" />
        </p>
      ) : null}
      {state === "failed" ? (
        <Notice tone="error">
          {message ?? "Results could not be derived."} The collected files are listed below.
        </Notice>
      ) : null}
      {state === "none" ? (
        <p className="text-sm text-ink-600">
          {message ?? "This run's code names no files to derive results from."}
        </p>
      ) : null}
      {groups.length > 0 ? (
        <>
          <Notice tone="warning">{caution}</Notice>
          {groups.map((group) => (
            <ResultGroupCard key={group.key} group={group} />
          ))}
        </>
      ) : state === "derived" ? (
        <p className="text-sm text-ink-600">
          {message ?? "No results were derived from the collected files."}
        </p>
      ) : null}
    </div>
  );
}
