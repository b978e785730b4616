import { PageHeader } from "@/components/ui/page-header";
import { CodesWorkspace } from "@/features/codes/components/codes-workspace";
import { roleInGroup } from "@/lib/permissions";
import { useCurrentGroup } from "./use-current-group";

export function CodesRoute() {
  const { groupId, group, me } = useCurrentGroup();
  const role = roleInGroup(me, groupId);
  // Members and admins register codes and build recipes; collaborators read them and preview files.
  const canWrite = me.user.isSiteAdmin || role === "member" || role === "admin";
  return (
    <>
      <PageHeader
        eyebrow={group.name}
        title="Codes and recipes"
        description="The programs registered for your group's hosts, by version, and the recipes that chain them into runs."
      />
      <CodesWorkspace groupId={groupId} groupName={group.name} canWrite={canWrite} />
    </>
  );
}
