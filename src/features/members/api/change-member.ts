import { type GroupRole, memberSchema } from "@shared/schemas";
import { api } from "@/lib/api-client";

function memberPath(groupId: string, userId: string): string {
  return `/api/groups/${encodeURIComponent(groupId)}/members/${encodeURIComponent(userId)}`;
}

export function updateMemberRole(groupId: string, userId: string, role: GroupRole) {
  return api.patch(memberPath(groupId, userId), { role }, memberSchema);
}

/** Fails with 409 when it would leave the group without an admin. */
export function removeMember(groupId: string, userId: string) {
  return api.command("DELETE", memberPath(groupId, userId));
}
