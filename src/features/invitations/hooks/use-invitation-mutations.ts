import type { CreateInvitationRequest } from "@shared/schemas";
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { acceptInvitation, createInvitation, revokeInvitation } from "../api/invitation-commands";
import { invitationQueries } from "../api/invitation-queries";

export function useCreateInvitation(groupId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (request: CreateInvitationRequest) => createInvitation(groupId, request),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: invitationQueries.list(groupId).queryKey }),
  });
}

export function useRevokeInvitation(groupId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (invitationId: string) => revokeInvitation(groupId, invitationId),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: invitationQueries.list(groupId).queryKey }),
  });
}

export function useAcceptInvitation(token: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => acceptInvitation(token),
    // Marked stale only: the page moves on to the group, so refetching the preview now would be wasted.
    onSuccess: () =>
      queryClient.invalidateQueries({
        queryKey: invitationQueries.preview(token).queryKey,
        refetchType: "none",
      }),
  });
}
