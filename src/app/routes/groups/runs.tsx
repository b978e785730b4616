import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useState } from "react";
import { Link, useNavigate, useParams } from "react-router-dom";
import { buttonClasses } from "@/components/ui/button";
import { ErrorState } from "@/components/ui/error-state";
import { PageHeader } from "@/components/ui/page-header";
import { TableSkeleton } from "@/components/ui/skeleton";
import { LiveIndicator } from "@/features/live/components/live-indicator";
import { LiveRunLog } from "@/features/live/components/live-run-log";
import { SymmetryTimings } from "@/features/live/components/symmetry-timings";
import { useLiveGroup, useLiveRun } from "@/features/live/hooks/use-live";
import { showsSymmetryTimings, timedStagesQuery } from "@/features/live/timed-stages";
import { RunResults } from "@/features/results/components/run-results";
import { isFinished, runQueries } from "@/features/runs/api/run-queries";
import { RunActions } from "@/features/runs/components/run-actions";
import { RunDetailView } from "@/features/runs/components/run-detail";
import { RunsTable } from "@/features/runs/components/runs-table";
import { paths } from "@/lib/paths";
import { roleInGroup } from "@/lib/permissions";
import { applyGroupRun, applyRunProgress, applyRunState } from "./live-run-cache";
import { useCurrentGroup } from "./use-current-group";

function useCanAct(groupId: string) {
  const { me } = useCurrentGroup();
  const role = roleInGroup(me, groupId);
  return me.user.isSiteAdmin || role === "member" || role === "admin";
}

export function RunsRoute() {
  const { groupId, group } = useCurrentGroup();
  const canAct = useCanAct(groupId);
  const queryClient = useQueryClient();
  const live = useLiveGroup(groupId, (run) => applyGroupRun(queryClient, groupId, run));
  return (
    <>
      <PageHeader
        eyebrow={group.name}
        title="Runs"
        description="Calculations on your group's hosts, from submission to collected output, newest first."
        actions={
          <>
            <LiveIndicator status={live} />
            {canAct ? (
              <Link to={`${paths.group(groupId, "runs")}/new`} className={buttonClasses({ size: "sm" })}>
                New run
              </Link>
            ) : null}
          </>
        }
      />
      <RunsTable
        groupId={groupId}
        groupName={group.name}
        canAct={canAct}
        updates={live === "live" ? "live" : "fallback"}
      />
    </>
  );
}

export function RunRoute() {
  const { groupId, group } = useCurrentGroup();
  const { runId = "" } = useParams();
  const canAct = useCanAct(groupId);
  const navigate = useNavigate();
  const queryClient = useQueryClient();
  const live = useLiveRun(runId, {
    onState: (event) => applyRunState(queryClient, event),
    onProgress: (event) => applyRunProgress(queryClient, event),
  });
  // While the feed is live, changes arrive as events; otherwise the run's own refresh goes on.
  const detail = runQueries.detail(runId);
  const run = useQuery(live === "live" ? { ...detail, refetchInterval: false } : detail);
  // Which stages time their symmetries, asked only while the run is unfinished.
  const timedStages = useQuery({
    ...timedStagesQuery(run.data?.recipeId ?? ""),
    enabled: run.data !== undefined && !isFinished(run.data),
  });
  // The terminal follows the log from the start but appears once the feed has connected (until then the
  // stored log is shown), and stays, holding the log, while the feed reconnects.
  const [feedSeen, setFeedSeen] = useState(false);
  if (live === "live" && !feedSeen) setFeedSeen(true);
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
        actions={<LiveIndicator status={live} />}
      />
      {canAct ? (
        <div className="mb-4 flex justify-end">
          <RunActions run={run.data} onResubmitted={(id) => navigate(paths.run(groupId, id))} />
        </div>
      ) : null}
      <RunDetailView
        run={run.data}
        results={<RunResults runId={run.data.id} />}
        log={<LiveRunLog runId={run.data.id} hidden={!feedSeen} />}
        logLive={feedSeen}
        timings={
          showsSymmetryTimings(run.data, isFinished(run.data), timedStages.data) ? (
            <SymmetryTimings
              timings={run.data.timings}
              progress={run.data.progress}
              finished={isFinished(run.data)}
              timedStages={timedStages.data}
            />
          ) : undefined
        }
      />
    </>
  );
}
