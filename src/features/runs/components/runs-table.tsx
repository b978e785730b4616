import { useQuery } from "@tanstack/react-query";
import { ListChecks } from "lucide-react";
import { Link } from "react-router-dom";
import { EmptyState } from "@/components/ui/empty-state";
import { ErrorState } from "@/components/ui/error-state";
import { TableSkeleton } from "@/components/ui/skeleton";
import { Table, TBody, TD, TH, THead, TR } from "@/components/ui/table";
import { formatDateTime } from "@/lib/format";
import { paths } from "@/lib/paths";
import { runQueries } from "../api/run-queries";
import { formatCoreHours as coreHours } from "../format-core-hours";
import { RunActions } from "./run-actions";
import { RunStateBadge } from "./run-state-badge";
import { RunTarget } from "./run-target";

export function RunsTable({
  groupId,
  groupName,
  canAct,
}: {
  groupId: string;
  groupName: string;
  /** Members and admins may cancel and resubmit; collaborators read. */
  canAct: boolean;
}) {
  const runs = useQuery(runQueries.list(groupId));
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
