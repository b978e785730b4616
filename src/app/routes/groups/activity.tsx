import { PageHeader } from "@/components/ui/page-header";
import { ActivityLog } from "@/features/groups/components/activity-log";
import { useCurrentGroup } from "./use-current-group";

export function ActivityRoute() {
  const { groupId, group } = useCurrentGroup();
  return (
    <>
      <PageHeader
        eyebrow={group.name}
        title="Activity"
        description="Who changed what in this group: memberships, roles and invitations."
      />
      <ActivityLog groupId={groupId} />
    </>
  );
}
