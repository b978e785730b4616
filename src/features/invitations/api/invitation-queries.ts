import { invitationListSchema, invitationPreviewSchema } from "@shared/schemas";
import { queryOptions } from "@tanstack/react-query";
import { api } from "@/lib/api-client";

export const invitationQueries = {
  all: ["invitations"] as const,
  list: (groupId: string) =>
    queryOptions({
      queryKey: [...invitationQueries.all, "list", groupId] as const,
      queryFn: ({ signal }) =>
        api.get(`/api/groups/${encodeURIComponent(groupId)}/invitations`, invitationListSchema, { signal }),
    }),
  /** What the invitee sees, looked up by the secret token from the e-mail. */
  preview: (token: string) =>
    queryOptions({
      queryKey: [...invitationQueries.all, "preview", token] as const,
      queryFn: ({ signal }) =>
        api.get(`/api/invitations/${encodeURIComponent(token)}`, invitationPreviewSchema, { signal }),
      staleTime: 0,
    }),
};
