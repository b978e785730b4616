import { useSuspenseQuery } from "@tanstack/react-query";
import { useParams } from "react-router-dom";
import { authQueries } from "@/features/auth/api/auth-queries";
import { groupQueries } from "@/features/groups/api/group-queries";
import { canManageGroup } from "@/lib/permissions";

/** The group in the URL (its loader has fetched it) and what the signed-in person may do in it. */
export function useCurrentGroup() {
  const { groupId = "" } = useParams();
  const group = useSuspenseQuery(groupQueries.detail(groupId)).data;
  const me = useSuspenseQuery(authQueries.me()).data;
  return { groupId, group, me, canManage: canManageGroup(me, groupId) };
}
