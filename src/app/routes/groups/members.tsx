import { useQueryClient } from "@tanstack/react-query";
import { MailPlus } from "lucide-react";
import { Link } from "react-router-dom";
import { buttonClasses } from "@/components/ui/button";
import { PageHeader } from "@/components/ui/page-header";
import { authQueries } from "@/features/auth/api/auth-queries";
import { groupQueries } from "@/features/groups/api/group-queries";
import { MembersPanel } from "@/features/members/components/members-panel";
import { paths } from "@/lib/paths";
import { useCurrentGroup } from "./use-current-group";

export function MembersRoute() {
  const { groupId, group, me, canManage } = useCurrentGroup();
  const queryClient = useQueryClient();

  return (
    <>
      <PageHeader
        eyebrow={group.name}
        title="Members"
        description={
          canManage
            ? "Everyone in the group and their role. Changes apply at once; the group always keeps at least one admin."
            : "Everyone in the group and their role. The group's admins manage membership."
        }
        actions={
          canManage ? (
            <Link
              to={paths.group(groupId, "invitations")}
              className={buttonClasses({ variant: "secondary" })}
            >
              <MailPlus className="size-4" aria-hidden="true" />
              Invite people
            </Link>
          ) : null
        }
      />
      <MembersPanel
        groupId={groupId}
        groupName={group.name}
        canManage={canManage}
        currentUserId={me.user.id}
        onMembershipChanged={() => {
          // Member counts and the person's own roles may have changed with this edit.
          void queryClient.invalidateQueries({ queryKey: groupQueries.all });
          void queryClient.invalidateQueries({ queryKey: authQueries.all });
        }}
      />
    </>
  );
}
