import type { GroupRole, Member } from "@shared/schemas";
import { useQuery } from "@tanstack/react-query";
import { Users } from "lucide-react";
import { useState } from "react";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { ConfirmDialog } from "@/components/ui/dialog";
import { EmptyState } from "@/components/ui/empty-state";
import { ErrorState } from "@/components/ui/error-state";
import { Notice } from "@/components/ui/notice";
import { Select } from "@/components/ui/select";
import { TableSkeleton } from "@/components/ui/skeleton";
import { Table, TBody, TD, TH, THead, TR } from "@/components/ui/table";
import { describeError } from "@/lib/describe-error";
import { formatDate } from "@/lib/format";
import { GROUP_ROLES, ROLE_LABELS } from "@/lib/roles";
import { memberQueries } from "../api/member-queries";
import { useRemoveMember, useUpdateMemberRole } from "../hooks/use-member-mutations";

type MembersPanelProps = {
  groupId: string;
  groupName: string;
  /** Group admins and site admins may change roles and remove people. */
  canManage: boolean;
  currentUserId: string;
  onMembershipChanged?: () => void;
};

const roleTone = { admin: "ink", member: "flux", collaborator: "neutral" } as const;

export function MembersPanel({
  groupId,
  groupName,
  canManage,
  currentUserId,
  onMembershipChanged,
}: MembersPanelProps) {
  const members = useQuery(memberQueries.list(groupId));
  const updateRole = useUpdateMemberRole(groupId, { onChanged: onMembershipChanged });
  const removeMember = useRemoveMember(groupId, { onChanged: onMembershipChanged });
  const [removingUserId, setRemovingUserId] = useState<string | null>(null);

  if (members.isPending) return <TableSkeleton label="Loading members" columns={canManage ? 5 : 4} />;
  if (members.isError) {
    return (
      <ErrorState error={members.error} onRetry={() => members.refetch()} retrying={members.isFetching} />
    );
  }

  const list = members.data.members;
  const removing = list.find((member) => member.userId === removingUserId) ?? null;
  const failedRoleChange = updateRole.isError
    ? list.find((member) => member.userId === updateRole.variables?.userId)
    : undefined;

  function shownRole(member: Member): GroupRole {
    if (updateRole.isPending && updateRole.variables?.userId === member.userId)
      return updateRole.variables.role;
    return member.role;
  }

  function closeRemoval() {
    setRemovingUserId(null);
    removeMember.reset();
  }

  if (list.length === 0) {
    return (
      <EmptyState icon={<Users className="size-5" aria-hidden="true" />} title="Nobody in this group yet">
        {canManage
          ? "Invite people by e-mail from the Invitations page."
          : "The group's admins add members by invitation."}
      </EmptyState>
    );
  }

  return (
    <div className="flex flex-col gap-4">
      {failedRoleChange ? (
        <Notice
          tone="error"
          title={`Could not change ${failedRoleChange.displayName}'s role`}
          onDismiss={() => updateRole.reset()}
        >
          {describeError(updateRole.error).message}
        </Notice>
      ) : null}
      <Table caption={`Members of ${groupName}`}>
        <THead>
          <tr>
            <TH>Name</TH>
            <TH>E-mail</TH>
            <TH>Role</TH>
            <TH>Joined</TH>
            {canManage ? (
              <TH>
                <span className="sr-only">Actions</span>
              </TH>
            ) : null}
          </tr>
        </THead>
        <TBody>
          {list.map((member) => (
            <TR key={member.userId}>
              <TD className="font-medium text-ink-900">
                {member.displayName}
                {member.userId === currentUserId ? (
                  <span className="ml-1.5 text-xs font-normal text-ink-500">(you)</span>
                ) : null}
              </TD>
              <TD className="text-ink-600">{member.email}</TD>
              <TD>
                {canManage ? (
                  <Select
                    controlSize="sm"
                    className="w-36"
                    aria-label={`Role for ${member.displayName}`}
                    value={shownRole(member)}
                    disabled={updateRole.isPending && updateRole.variables?.userId === member.userId}
                    onChange={(event) =>
                      updateRole.mutate({ userId: member.userId, role: event.target.value as GroupRole })
                    }
                  >
                    {GROUP_ROLES.map((role) => (
                      <option key={role} value={role}>
                        {ROLE_LABELS[role]}
                      </option>
                    ))}
                  </Select>
                ) : (
                  <Badge tone={roleTone[member.role]}>{ROLE_LABELS[member.role]}</Badge>
                )}
              </TD>
              <TD className="whitespace-nowrap text-ink-600">{formatDate(member.joinedAt)}</TD>
              {canManage ? (
                <TD className="text-right">
                  <Button
                    variant="ghost-danger"
                    size="sm"
                    aria-label={`Remove ${member.displayName}`}
                    onClick={() => setRemovingUserId(member.userId)}
                  >
                    Remove
                  </Button>
                </TD>
              ) : null}
            </TR>
          ))}
        </TBody>
      </Table>
      <ConfirmDialog
        open={removing !== null}
        title={removing ? `Remove ${removing.displayName}?` : "Remove member?"}
        confirmLabel="Remove member"
        pending={removeMember.isPending}
        error={removeMember.error}
        onClose={closeRemoval}
        onConfirm={() => {
          if (removing) removeMember.mutate(removing.userId, { onSuccess: closeRemoval });
        }}
      >
        {removing ? (
          <p>
            {removing.displayName} ({removing.email}) loses access to {groupName}'s runs and results at once.
            You can invite them again later.
          </p>
        ) : null}
      </ConfirmDialog>
    </div>
  );
}
