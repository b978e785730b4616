import {
  acceptInvitationResponseSchema,
  type CreateInvitationRequest,
  invitationSchema,
} from "@shared/schemas";
import { api } from "@/lib/api-client";

export function createInvitation(groupId: string, request: CreateInvitationRequest) {
  return api.post(`/api/groups/${encodeURIComponent(groupId)}/invitations`, request, invitationSchema);
}

export function revokeInvitation(groupId: string, invitationId: string) {
  return api.command(
    "DELETE",
    `/api/groups/${encodeURIComponent(groupId)}/invitations/${encodeURIComponent(invitationId)}`,
  );
}

export function acceptInvitation(token: string) {
  return api.post(`/api/invitations/${encodeURIComponent(token)}/accept`, {}, acceptInvitationResponseSchema);
}
