import type { GroupRole, Me } from "@shared/schemas";

export function roleInGroup(me: Me, groupId: string): GroupRole | null {
  return me.memberships.find((membership) => membership.groupId === groupId)?.role ?? null;
}

/** Group admins manage their group; site admins manage every group. */
export function canManageGroup(me: Me, groupId: string): boolean {
  return me.user.isSiteAdmin || roleInGroup(me, groupId) === "admin";
}
