import { safeReturnTo } from "@shared/return-to";
import type { Me } from "@shared/schemas";
import type { QueryClient } from "@tanstack/react-query";
import { data, type LoaderFunctionArgs, redirect } from "react-router-dom";
import { adminQueries } from "@/features/admin/api/admin-queries";
import { tokenQueries } from "@/features/api-tokens/api/token-queries";
import { authQueries } from "@/features/auth/api/auth-queries";
import { groupQueries } from "@/features/groups/api/group-queries";
import { invitationQueries } from "@/features/invitations/api/invitation-queries";
import { memberQueries } from "@/features/members/api/member-queries";
import { hasStatus } from "@/lib/api-error";
import { readLastGroupId } from "@/lib/last-group";
import { paths } from "@/lib/paths";
import { canManageGroup } from "@/lib/permissions";
import { signInPagePath } from "@/lib/return-to";

function requestPath(request: Request): string {
  const url = new URL(request.url);
  return `${url.pathname}${url.search}`;
}

/** The signed-in person, or a redirect to the sign-in page that brings them back here afterwards. */
async function requireMe(queryClient: QueryClient, request: Request): Promise<Me> {
  try {
    return await queryClient.ensureQueryData(authQueries.me());
  } catch (error) {
    if (hasStatus(error, 401)) throw redirect(signInPagePath(requestPath(request)));
    throw error;
  }
}

function requireParam(value: string | undefined, name: string): string {
  if (!value) throw data(`Missing ${name}.`, { status: 404 });
  return value;
}

/**
 * Loaders wait only for what decides the page (who is signed in, which group, whether they may look);
 * each page's own lists are prefetched without waiting so the page shows its skeleton at once.
 */
export function createLoaders(queryClient: QueryClient) {
  return {
    signIn: async ({ request }: LoaderFunctionArgs) => {
      const returnTo = safeReturnTo(new URL(request.url).searchParams.get("returnTo"));
      try {
        await queryClient.fetchQuery({ ...authQueries.me(), staleTime: 0 });
      } catch {
        return null;
      }
      throw redirect(returnTo);
    },

    protected: async ({ request }: LoaderFunctionArgs) => {
      const me = await requireMe(queryClient, request);
      if (me.user.isSiteAdmin) void queryClient.prefetchQuery(groupQueries.list());
      return null;
    },

    landing: async ({ request }: LoaderFunctionArgs) => {
      const me = await requireMe(queryClient, request);
      const groupIds = me.user.isSiteAdmin
        ? (await queryClient.ensureQueryData(groupQueries.list())).groups.map((group) => group.id)
        : me.memberships.map((membership) => membership.groupId);
      const last = readLastGroupId();
      const target = last && groupIds.includes(last) ? last : groupIds[0];
      if (target) throw redirect(paths.group(target));
      if (me.user.isSiteAdmin) throw redirect(paths.adminGroups());
      return null;
    },

    group: async ({ request, params }: LoaderFunctionArgs) => {
      await requireMe(queryClient, request);
      await queryClient.ensureQueryData(groupQueries.detail(requireParam(params.groupId, "group")));
      return null;
    },

    members: ({ params }: LoaderFunctionArgs) => {
      void queryClient.prefetchQuery(memberQueries.list(requireParam(params.groupId, "group")));
      return null;
    },

    invitations: async ({ request, params }: LoaderFunctionArgs) => {
      const groupId = requireParam(params.groupId, "group");
      const me = await requireMe(queryClient, request);
      if (!canManageGroup(me, groupId)) {
        throw data("Only the group's admins can send and revoke invitations.", { status: 403 });
      }
      void queryClient.prefetchQuery(invitationQueries.list(groupId));
      return null;
    },

    activity: async ({ request, params }: LoaderFunctionArgs) => {
      const groupId = requireParam(params.groupId, "group");
      const me = await requireMe(queryClient, request);
      if (!canManageGroup(me, groupId)) {
        throw data("Only the group's admins can read its activity log.", { status: 403 });
      }
      void queryClient.prefetchQuery(groupQueries.audit(groupId));
      return null;
    },

    invitation: ({ params }: LoaderFunctionArgs) => {
      void queryClient.prefetchQuery(invitationQueries.preview(requireParam(params.token, "invitation")));
      return null;
    },

    apiTokens: () => {
      void queryClient.prefetchQuery(tokenQueries.list());
      return null;
    },

    siteAdmin: async ({ request }: LoaderFunctionArgs) => {
      const me = await requireMe(queryClient, request);
      if (!me.user.isSiteAdmin) throw data("This area is for site administrators.", { status: 403 });
      return null;
    },

    // Child loaders run alongside their parent's check, so they look at the flag themselves before
    // prefetching; the parent turns others away.
    adminGroups: async ({ request }: LoaderFunctionArgs) => {
      const me = await requireMe(queryClient, request);
      if (me.user.isSiteAdmin) void queryClient.prefetchQuery(groupQueries.list());
      return null;
    },

    adminPeople: async ({ request }: LoaderFunctionArgs) => {
      const me = await requireMe(queryClient, request);
      if (me.user.isSiteAdmin) void queryClient.prefetchQuery(adminQueries.users());
      return null;
    },
  };
}
