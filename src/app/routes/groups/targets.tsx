import { useQuery } from "@tanstack/react-query";
import { Link, useParams } from "react-router-dom";
import { Card, CardBody, CardHeader } from "@/components/ui/card";
import { ErrorState } from "@/components/ui/error-state";
import { PageHeader } from "@/components/ui/page-header";
import { TableSkeleton } from "@/components/ui/skeleton";
import { targetQueries } from "@/features/targets/api/target-queries";
import { AddTargetForm } from "@/features/targets/components/add-target-form";
import { TargetDetailView } from "@/features/targets/components/target-detail";
import { TargetsTable } from "@/features/targets/components/targets-table";
import { paths } from "@/lib/paths";
import { roleInGroup } from "@/lib/permissions";
import { useCurrentGroup } from "./use-current-group";

/** Members and admins enter targets; collaborators read them. */
function useCanEdit(groupId: string) {
  const { me } = useCurrentGroup();
  const role = roleInGroup(me, groupId);
  return me.user.isSiteAdmin || role === "member" || role === "admin";
}

export function TargetsRoute() {
  const { groupId, group } = useCurrentGroup();
  const canEdit = useCanEdit(groupId);
  return (
    <>
      <PageHeader
        eyebrow={group.name}
        title="Targets"
        description="The molecules your group studies, each with its versions, derived properties and isotopologues."
      />
      <TargetsTable groupId={groupId} groupName={group.name} />
      {canEdit ? (
        <Card className="mt-8">
          <CardHeader
            title="Add a target from XYZ"
            description="Paste an XYZ file; Sigmaflow finds the point group and derives the rest."
          />
          <CardBody>
            <AddTargetForm groupId={groupId} />
          </CardBody>
        </Card>
      ) : null}
    </>
  );
}

export function TargetRoute() {
  const { groupId, group } = useCurrentGroup();
  const { targetId = "" } = useParams();
  const target = useQuery(targetQueries.detail(targetId));
  const back = (
    <Link to={paths.group(groupId, "targets")} className="text-sm text-flux-800 hover:underline">
      ← All targets
    </Link>
  );
  if (target.isPending) return <TableSkeleton rows={6} label="Loading the target" />;
  if (target.isError) return <ErrorState error={target.error} action={back} />;
  const parentId = target.data.parentTargetId;
  return (
    <>
      {back}
      <PageHeader
        eyebrow={group.name}
        title={target.data.name}
        description={
          <>
            {target.data.formula}, {target.data.pointGroup}; used by {target.data.runCount}{" "}
            {target.data.runCount === 1 ? "run" : "runs"}.
            {parentId ? (
              <>
                {" "}
                An isotopologue of{" "}
                <Link to={paths.target(groupId, parentId)} className="text-flux-800 hover:underline">
                  its parent target
                </Link>
                .
              </>
            ) : null}
          </>
        }
      />
      <TargetDetailView target={target.data} />
    </>
  );
}
