import { useQuery } from "@tanstack/react-query";
import { Link, Navigate, useParams } from "react-router-dom";
import { ErrorState } from "@/components/ui/error-state";
import { TableSkeleton } from "@/components/ui/skeleton";
import { runQueries } from "@/features/runs/api/run-queries";
import { paths } from "@/lib/paths";

/**
 * `/runs/:runId`, the short address of a run that run e-mails give: opens the run's
 * page in its group.
 */
export function RunLinkRoute() {
  const { runId = "" } = useParams();
  const run = useQuery(runQueries.detail(runId));
  if (run.isPending) return <TableSkeleton rows={6} label="Loading the run" />;
  if (run.isError) {
    return (
      <ErrorState
        error={run.error}
        action={
          <Link to={paths.home()} className="text-sm text-flux-800 hover:underline">
            Go to your groups
          </Link>
        }
      />
    );
  }
  return <Navigate replace to={paths.run(run.data.groupId, run.data.id)} />;
}
