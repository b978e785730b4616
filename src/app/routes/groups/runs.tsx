import { useQuery } from "@tanstack/react-query";
import { Link, useNavigate, useParams } from "react-router-dom";
import { ErrorState } from "@/components/ui/error-state";
import { PageHeader } from "@/components/ui/page-header";
import { TableSkeleton } from "@/components/ui/skeleton";
import { RunResults } from "@/features/results/components/run-results";
import { runQueries } from "@/features/runs/api/run-queries";
import { RunActions } from "@/features/runs/components/run-actions";
import { RunDetailView } from "@/features/runs/components/run-detail";
import { RunsTable } from "@/features/runs/components/runs-table";
import { paths } from "@/lib/paths";
import { roleInGroup } from "@/lib/permissions";
import { useCurrentGroup } from "./use-current-group";

function useCanAct(groupId: string) {
  const { me } = useCurrentGroup();
  const role = roleInGroup(me, groupId);
  return me.user.isSiteAdmin || role === "member" || role === "admin";
}

export function RunsRoute() {
  const { groupId, group } = useCurrentGroup();
  const canAct = useCanAct(groupId);
  return (
    <>
      <PageHeader
        eyebrow={group.name}
        title="Runs"
        description="Calculations on your group's hosts, from submission to collected output, newest first."
      />
      <RunsTable groupId={groupId} groupName={group.name} canAct={canAct} />
    </>
  );
}

export function RunRoute() {
  const { groupId, group } = useCurrentGroup();
  const { runId = "" } = useParams();
  const canAct = useCanAct(groupId);
  const navigate = useNavigate();
  const run = useQuery(runQueries.detail(runId));
  const back = (
    <Link to={paths.group(groupId, "runs")} className="text-sm text-flux-800 hover:underline">
      ← All runs
    </Link>
  );
  if (run.isPending) return <TableSkeleton rows={6} label="Loading the run" />;
  if (run.isError) return <ErrorState error={run.error} action={back} />;
  return (
    <>
      {back}
      <PageHeader
        eyebrow={group.name}
        title={run.data.name}
        description={`${run.data.cores} ${run.data.cores === 1 ? "core" : "cores"} × ${run.data.wallTimeMinutes} min, submitted by ${run.data.submittedByName ?? "—"}`}
      />
      {canAct ? (
        <div className="mb-4 flex justify-end">
          <RunActions run={run.data} onResubmitted={(id) => navigate(paths.run(groupId, id))} />
        </div>
      ) : null}
      <RunDetailView run={run.data} results={<RunResults runId={run.data.id} />} />
    </>
  );
}
