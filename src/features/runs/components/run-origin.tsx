import type { RunDetail } from "@shared/schemas";
import { useQuery } from "@tanstack/react-query";
import { Link } from "react-router-dom";
import { Notice } from "@/components/ui/notice";
import { paths } from "@/lib/paths";
import { runQueries } from "../api/run-queries";

/** A link to another run of the group, by its name once known. */
function RunLink({ groupId, runId }: { groupId: string; runId: string }) {
  const run = useQuery(runQueries.detail(runId));
  return (
    <Link
      to={paths.run(groupId, runId)}
      className="font-medium text-flux-800 underline-offset-2 hover:underline"
    >
      {run.data?.name ?? `run ${runId.slice(0, 8)}`}
    </Link>
  );
}

/** Where a run came from: the run whose results it reuses, or the run it was resubmitted from. */
export function RunOrigin({ run }: { run: Pick<RunDetail, "groupId" | "reusedFrom" | "resubmittedFrom"> }) {
  if (run.reusedFrom) {
    return (
      <Notice tone="info" title="Results reused" className="mb-4">
        Results reused from run <RunLink groupId={run.groupId} runId={run.reusedFrom} />: this run did not run
        again, and its files, timings and log are that run's.
      </Notice>
    );
  }
  if (run.resubmittedFrom) {
    return (
      <p className="mb-4 text-sm text-ink-600">
        Resubmitted from run <RunLink groupId={run.groupId} runId={run.resubmittedFrom} />.
      </p>
    );
  }
  return null;
}
