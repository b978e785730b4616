import { useQueryClient } from "@tanstack/react-query";
import { Link, useNavigate } from "react-router-dom";
import { PageHeader } from "@/components/ui/page-header";
import { ComposerForm } from "@/features/composer/components/composer-form";
import { runQueries } from "@/features/runs/api/run-queries";
import { paths } from "@/lib/paths";
import { useCurrentGroup } from "./use-current-group";

export function NewRunRoute() {
  const { groupId, group } = useCurrentGroup();
  const navigate = useNavigate();
  const queryClient = useQueryClient();
  return (
    <>
      <Link to={paths.group(groupId, "runs")} className="text-sm text-flux-800 hover:underline">
        ← All runs
      </Link>
      <PageHeader
        eyebrow={group.name}
        title="New run"
        description="A recipe on a host for a target, with each stage's parameters; the cost and the files it would stage are checked with the server before anything is submitted."
      />
      <ComposerForm
        groupId={groupId}
        onOpenRun={(runId) => navigate(paths.run(groupId, runId))}
        onSubmitted={(run) => {
          void queryClient.invalidateQueries({ queryKey: runQueries.all });
          navigate(paths.run(groupId, run.id));
        }}
      />
    </>
  );
}
