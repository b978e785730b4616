import { useQuery } from "@tanstack/react-query";
import { ListChecks } from "lucide-react";
import { Link } from "react-router-dom";
import { EmptyState } from "@/components/ui/empty-state";
import { ErrorState } from "@/components/ui/error-state";
import { TableSkeleton } from "@/components/ui/skeleton";
import { Table, TBody, TD, TH, THead, TR } from "@/components/ui/table";
import { formatDateTime } from "@/lib/format";
import { paths } from "@/lib/paths";
import { isFinished, runQueries } from "../api/run-queries";
import { formatCoreHours as coreHours } from "../format-core-hours";
import { RunActions } from "./run-actions";
import { RunStateBadge } from "./run-state-badge";
import { RunTarget } from "./run-target";

/** While changes cannot arrive live, the list still reads itself again this often. */
const FALLBACK_REFRESH_MS = 30_000;

export function RunsTable({
  groupId,
  groupName,
  canAct,
  updates,
}: {
  groupId: string;
  groupName: string;
  /** Members and admins may cancel and resubmit; collaborators read. */
  canAct: boolean;
  /**
   * `live`: changes arrive from the live feed and the list does not poll; `fallback`: the feed is away
   * and the list reads itself again slowly. Left out: the list refreshes itself while a run is unfinished.
   */
  updates?: "live" | "fallback";
}) {
  const options = runQueries.list(groupId);
  const runs = useQuery(
    updates === undefined
      ? options
      : {
          ...options,
          refetchInterval: (query) =>
            updates === "fallback" && query.state.data?.runs.some((run) => !isFinished(run))
              ? FALLBACK_REFRESH_MS
              : false,
        },
  );
  if (runs.isPending) return <TableSkeleton rows={4} label="Loading runs" />;
  if (runs.isError)
    return <ErrorState error={runs.error} onRetry={() => runs.refetch()} retrying={runs.isFetching} />;
  if (runs.data.runs.length === 0) {
    return (
      <EmptyState icon={<ListChecks className="size-5" aria-hidden="true" />} title="No runs yet">
        Runs submitted through the API or the command line are listed here, newest first.
      </EmptyState>
    );
  }
  return (
    <Table caption={`Runs of ${groupName}`}>
      <THead>
        <TR>
          <TH>Run</TH>
          <TH>State</TH>
          <TH>Cores × wall time</TH>
          <TH>Core-hours (reserved / charged)</TH>
          <TH>Submitted</TH>
          {canAct ? <TH className="text-right">Actions</TH> : null}
        </TR>
      </THead>
      <TBody>
        {runs.data.runs.map((run) => (
          <TR key={run.id}>
            <TD>
              <Link to={paths.run(groupId, run.id)} className="font-medium text-flux-800 hover:underline">
                {run.name}
              </Link>
              <div className="text-xs text-ink-500">
                {run.targetId ? (
                  <>
                    <RunTarget run={run} />
                    {" · "}
                  </>
                ) : null}
                {run.submittedByName ?? "—"}
              </div>
            </TD>
            <TD>
              <RunStateBadge state={run.state} />
              {run.stateMessage ? (
                <div className="mt-1 max-w-xs text-xs text-ink-500">{run.stateMessage}</div>
              ) : null}
            </TD>
            <TD className="font-mono text-xs">
              {run.cores} × {run.wallTimeMinutes} min
            </TD>
            <TD className="font-mono text-xs">
              {coreHours(run.reservedCoreHours)} / {coreHours(run.chargedCoreHours)}
            </TD>
            <TD className="text-xs">{formatDateTime(run.createdAt)}</TD>
            {canAct ? (
              <TD className="text-right">
                <RunActions run={run} />
              </TD>
            ) : null}
          </TR>
        ))}
      </TBody>
    </Table>
  );
}
