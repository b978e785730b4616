import type { Me } from "@shared/schemas";
import { useQuery, useSuspenseQuery } from "@tanstack/react-query";
import { useParams } from "react-router-dom";
import { authQueries } from "@/features/auth/api/auth-queries";
import { groupQueries } from "@/features/groups/api/group-queries";
import type { GroupOption } from "@/features/groups/components/group-switcher";
import { readLastGroupId } from "@/lib/last-group";

export type Workspace = {
  me: Me;
  /** Groups the switcher offers: every group for a site admin, the person's own otherwise. */
  groups: GroupOption[] | undefined;
  groupsError: unknown;
  /** The group in the URL, else the one last opened, else the first one offered. */
  activeGroupId: string | null;
};

export function useWorkspace(): Workspace {
  const me = useSuspenseQuery(authQueries.me()).data;
  const { groupId } = useParams();
  const allGroups = useQuery({ ...groupQueries.list(), enabled: me.user.isSiteAdmin });

  const groups: GroupOption[] | undefined = me.user.isSiteAdmin
    ? allGroups.data?.groups.map((group) => ({ id: group.id, name: group.name }))
    : me.memberships.map((membership) => ({ id: membership.groupId, name: membership.groupName }));

  let activeGroupId: string | null = groupId ?? null;
  if (!activeGroupId && groups) {
    const last = readLastGroupId();
    activeGroupId = groups.find((group) => group.id === last)?.id ?? groups[0]?.id ?? null;
  }

  return { me, groups, groupsError: allGroups.error, activeGroupId };
}
