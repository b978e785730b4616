import { PageHeader } from "@/components/ui/page-header";
import { CodesTable } from "@/features/codes/components/codes-table";
import { useCurrentGroup } from "./use-current-group";

export function CodesRoute() {
  const { groupId, group } = useCurrentGroup();
  return (
    <>
      <PageHeader
        eyebrow={group.name}
        title="Codes"
        description="The scattering and structure programs registered for your group's hosts, by version."
      />
      <CodesTable groupId={groupId} groupName={group.name} />
    </>
  );
}
