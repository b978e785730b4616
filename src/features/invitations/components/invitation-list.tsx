import type { Invitation } from "@shared/schemas";
import { useQuery } from "@tanstack/react-query";
import { MailOpen } from "lucide-react";
import { useState } from "react";
import { Badge, type BadgeTone } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { ConfirmDialog } from "@/components/ui/dialog";
import { EmptyState } from "@/components/ui/empty-state";
import { ErrorState } from "@/components/ui/error-state";
import { TableSkeleton } from "@/components/ui/skeleton";
import { Table, TBody, TD, TH, THead, TR } from "@/components/ui/table";
import { formatDate } from "@/lib/format";
import { ROLE_LABELS } from "@/lib/roles";
import { invitationQueries } from "../api/invitation-queries";
import { useRevokeInvitation } from "../hooks/use-invitation-mutations";

const statusTone: Record<Invitation["status"], BadgeTone> = {
  pending: "flux",
  accepted: "ink",
  revoked: "muted",
  expired: "ember",
};

const statusLabel: Record<Invitation["status"], string> = {
  pending: "Pending",
  accepted: "Accepted",
  revoked: "Revoked",
  expired: "Expired",
};

export function InvitationList({ groupId }: { groupId: string }) {
  const invitations = useQuery(invitationQueries.list(groupId));
  const revoke = useRevokeInvitation(groupId);
  const [revokingId, setRevokingId] = useState<string | null>(null);

  if (invitations.isPending) return <TableSkeleton label="Loading invitations" columns={5} />;
  if (invitations.isError) {
    return (
      <ErrorState
        error={invitations.error}
        onRetry={() => invitations.refetch()}
        retrying={invitations.isFetching}
      />
    );
  }

  const list = invitations.data.invitations;
  const revoking = list.find((invitation) => invitation.id === revokingId) ?? null;

  function closeRevoke() {
    setRevokingId(null);
    revoke.reset();
  }

  if (list.length === 0) {
    return (
      <EmptyState icon={<MailOpen className="size-5" aria-hidden="true" />} title="No invitations sent yet">
        Invitations you send appear here with their status until they are accepted, revoked or expire.
      </EmptyState>
    );
  }

  return (
    <>
      <Table caption="Invitations">
        <THead>
          <tr>
            <TH>E-mail</TH>
            <TH>Role</TH>
            <TH>Status</TH>
            <TH>Invited by</TH>
            <TH>Expires</TH>
            <TH>
              <span className="sr-only">Actions</span>
            </TH>
          </tr>
        </THead>
        <TBody>
          {list.map((invitation) => (
            <TR key={invitation.id}>
              <TD className="font-medium text-ink-900">{invitation.email}</TD>
              <TD>{ROLE_LABELS[invitation.role]}</TD>
              <TD>
                <Badge tone={statusTone[invitation.status]}>{statusLabel[invitation.status]}</Badge>
              </TD>
              <TD className="text-ink-600">
                {invitation.invitedBy}
                <span className="block text-xs text-ink-400">{formatDate(invitation.createdAt)}</span>
              </TD>
              <TD className="whitespace-nowrap text-ink-600">{formatDate(invitation.expiresAt)}</TD>
              <TD className="text-right">
                {invitation.status === "pending" ? (
                  <Button
                    variant="ghost-danger"
                    size="sm"
                    aria-label={`Revoke invitation for ${invitation.email}`}
                    onClick={() => setRevokingId(invitation.id)}
                  >
                    Revoke
                  </Button>
                ) : null}
              </TD>
            </TR>
          ))}
        </TBody>
      </Table>
      <ConfirmDialog
        open={revoking !== null}
        title="Revoke this invitation?"
        confirmLabel="Revoke invitation"
        pending={revoke.isPending}
        error={revoke.error}
        onClose={closeRevoke}
        onConfirm={() => {
          if (revoking) revoke.mutate(revoking.id, { onSuccess: closeRevoke });
        }}
      >
        {revoking ? (
          <p>The link sent to {revoking.email} stops working. You can send a new invitation later.</p>
        ) : null}
      </ConfirmDialog>
    </>
  );
}
