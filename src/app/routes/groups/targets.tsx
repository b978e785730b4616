import { useQuery } from "@tanstack/react-query";
import { useState } from "react";
import { Link, useNavigate, useParams } from "react-router-dom";
import { Button } from "@/components/ui/button";
import { Card, CardBody, CardHeader } from "@/components/ui/card";
import { ErrorState } from "@/components/ui/error-state";
import { PageHeader } from "@/components/ui/page-header";
import { TableSkeleton } from "@/components/ui/skeleton";
import { targetQueries } from "@/features/targets/api/target-queries";
import { IsotopologueForm } from "@/features/targets/components/isotopologue-form";
import { TargetDetailView } from "@/features/targets/components/target-detail";
import { TargetEditor } from "@/features/targets/components/target-editor";
import { TargetsTable } from "@/features/targets/components/targets-table";
import { Formula } from "@/lib/formula";
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
  const navigate = useNavigate();
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
            title="New target"
            description="Drop or paste an XYZ file, or type the atoms; what Sigmaflow derives follows every change, and nothing is saved until every field is valid."
          />
          <CardBody>
            <TargetEditor
              groupId={groupId}
              onSaved={(targetId) => navigate(paths.target(groupId, targetId))}
            />
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
  const canEdit = useCanEdit(groupId);
  const [panel, setPanel] = useState<{ kind: "edit" | "isotopologue"; targetId: string } | null>(null);
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
            <Formula formula={target.data.formula} />, {target.data.pointGroup}; used by{" "}
            {target.data.runCount} {target.data.runCount === 1 ? "run" : "runs"}.
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
      {canEdit ? (
        <div className="mb-6 flex gap-2">
          <Button
            variant={panel?.kind === "edit" ? "primary" : "secondary"}
            aria-expanded={panel?.kind === "edit" && panel.targetId === targetId}
            onClick={() => setPanel(panel?.kind === "edit" ? null : { kind: "edit", targetId })}
          >
            Edit
          </Button>
          <Button
            variant={panel?.kind === "isotopologue" ? "primary" : "secondary"}
            aria-expanded={panel?.kind === "isotopologue" && panel.targetId === targetId}
            onClick={() =>
              setPanel(panel?.kind === "isotopologue" ? null : { kind: "isotopologue", targetId })
            }
          >
            New isotopologue
          </Button>
        </div>
      ) : null}
      {panel?.targetId === targetId && panel.kind === "edit" ? (
        <Card className="mb-8">
          <CardHeader
            title={`Edit ${target.data.name}`}
            description={`Saving makes version ${target.data.latestVersion + 1}; runs keep the version they used.`}
          />
          <CardBody>
            <TargetEditor
              key={target.data.current.id}
              groupId={groupId}
              target={target.data}
              onSaved={() => setPanel(null)}
            />
          </CardBody>
        </Card>
      ) : null}
      {panel?.targetId === targetId && panel.kind === "isotopologue" ? (
        <Card className="mb-8">
          <CardHeader
            title={`New isotopologue of ${target.data.name}`}
            description="Its current geometry with other isotopes; listed under this target."
          />
          <CardBody>
            <IsotopologueForm
              target={target.data}
              onCancel={() => setPanel(null)}
              onCreated={() => setPanel(null)}
            />
          </CardBody>
        </Card>
      ) : null}
      <TargetDetailView target={target.data} />
    </>
  );
}
