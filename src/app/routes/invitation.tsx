import { useQueryClient, useSuspenseQuery } from "@tanstack/react-query";
import { useNavigate, useParams } from "react-router-dom";
import { PageHeader } from "@/components/ui/page-header";
import { authQueries } from "@/features/auth/api/auth-queries";
import { SignOutButton } from "@/features/auth/components/sign-out-button";
import { groupQueries } from "@/features/groups/api/group-queries";
import { InvitationAcceptance } from "@/features/invitations/components/invitation-acceptance";
import { paths } from "@/lib/paths";

export function InvitationRoute() {
  const { token = "" } = useParams();
  const me = useSuspenseQuery(authQueries.me()).data;
  const queryClient = useQueryClient();
  const navigate = useNavigate();

  return (
    <div className="mx-auto max-w-2xl">
      <PageHeader title="Group invitation" description="Check the details, then accept to join the group." />
      <InvitationAcceptance
        token={token}
        signedInEmail={me.user.email}
        signOutAction={<SignOutButton />}
        onAccepted={async ({ groupId }) => {
          // The new membership must be in the session before the group's pages ask for it.
          await Promise.all([
            queryClient.invalidateQueries({ queryKey: authQueries.all }),
            queryClient.invalidateQueries({ queryKey: groupQueries.all }),
          ]);
          await navigate(paths.group(groupId, "members"));
        }}
      />
    </div>
  );
}
