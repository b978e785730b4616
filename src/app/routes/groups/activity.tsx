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
        description="Who changed what in this group, newest first: members, invitations, hosts, accounts, codes, recipes, allocations and runs."
      />
      <ActivityLog groupId={groupId} />
    </>
  );
}
