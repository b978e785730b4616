import type { RunSummary } from "@shared/schemas";
import { Link } from "react-router-dom";
import { paths } from "@/lib/paths";

/** The target a run is about, at the version it used, linked to the target's page. */
export function RunTarget({
  run,
}: {
  run: Pick<RunSummary, "groupId" | "targetId" | "targetName" | "targetVersion">;
}) {
  if (!run.targetId) return <span className="text-ink-500">—</span>;
  return (
    <Link to={paths.target(run.groupId, run.targetId)} className="text-flux-800 hover:underline">
      {run.targetName ?? "Target"}
      {run.targetVersion === null ? "" : `, version ${run.targetVersion}`}
    </Link>
  );
}
