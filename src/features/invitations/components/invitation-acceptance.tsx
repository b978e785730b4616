import type { GroupRole, InvitationPreview } from "@shared/schemas";
import { useQuery } from "@tanstack/react-query";
import { MailCheck, MailX } from "lucide-react";
import type { ReactNode } from "react";
import { Button } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { EmptyState } from "@/components/ui/empty-state";
import { ErrorState } from "@/components/ui/error-state";
import { Notice } from "@/components/ui/notice";
import { Skeleton } from "@/components/ui/skeleton";
import { hasStatus, isApiRequestError } from "@/lib/api-error";
import { describeError } from "@/lib/describe-error";
import { formatDate } from "@/lib/format";
import { ROLE_DESCRIPTIONS, ROLE_LABELS } from "@/lib/roles";
import { invitationQueries } from "../api/invitation-queries";
import { useAcceptInvitation } from "../hooks/use-invitation-mutations";

type InvitationAcceptanceProps = {
  token: string;
  signedInEmail: string;
  /** Called once the server has added the person to the group. */
  onAccepted: (result: { groupId: string; role: GroupRole }) => void | Promise<void>;
  /** A way to switch accounts when the invitation was sent to another address. */
  signOutAction: ReactNode;
};

const closedStates: Record<
  Exclude<InvitationPreview["status"], "pending">,
  { title: string; body: string }
> = {
  accepted: {
    title: "This invitation has already been accepted",
    body: "Each invitation link works once. If you accepted it, the group is in your group list.",
  },
  revoked: {
    title: "This invitation was withdrawn",
    body: "A group admin revoked it. Ask them to send a new invitation if you still need access.",
  },
  expired: {
    title: "This invitation has expired",
    body: "Invitation links are valid for a limited time. Ask the group admin to send a new one.",
  },
};

function acceptErrorTitle(error: unknown): string {
  if (hasStatus(error, 403)) return "This invitation is for another account";
  if (hasStatus(error, 409) || hasStatus(error, 410)) return "This invitation can no longer be used";
  return describeError(error).title;
}

export function InvitationAcceptance({
  token,
  signedInEmail,
  onAccepted,
  signOutAction,
}: InvitationAcceptanceProps) {
  const preview = useQuery(invitationQueries.preview(token));
  const accept = useAcceptInvitation(token);

  if (preview.isPending) {
    return (
      <Card className="p-6">
        <div role="status" aria-label="Loading invitation" className="flex flex-col gap-3">
          <Skeleton className="h-6 w-2/3" />
          <Skeleton className="h-4 w-1/2" />
          <Skeleton className="h-4 w-1/3" />
        </div>
      </Card>
    );
  }
  if (preview.isError) {
    if (isApiRequestError(preview.error) && (preview.error.status === 404 || preview.error.status === 410)) {
      return (
        <EmptyState
          icon={<MailX className="size-5" aria-hidden="true" />}
          title="This invitation link is not valid"
        >
          Check that you opened the whole link from the e-mail. If it still fails, ask the group admin to send
          a new invitation.
        </EmptyState>
      );
    }
    return (
      <ErrorState error={preview.error} onRetry={() => preview.refetch()} retrying={preview.isFetching} />
    );
  }

  const invitation = preview.data;
  if (invitation.status !== "pending") {
    const closed = closedStates[invitation.status];
    return (
      <EmptyState icon={<MailX className="size-5" aria-hidden="true" />} title={closed.title}>
        {closed.body}
      </EmptyState>
    );
  }

  const otherAccount = invitation.email.toLowerCase() !== signedInEmail.toLowerCase();

  return (
    <Card className="overflow-hidden">
      <div className="border-b border-ink-100 bg-ink-950 px-6 py-6 text-ink-50">
        <MailCheck className="mb-3 size-6 text-flux-300" aria-hidden="true" />
        <p className="text-sm text-ink-300">{invitation.invitedBy} invited you to join</p>
        <h2 className="mt-1 text-xl font-semibold tracking-tight">{invitation.groupName}</h2>
        <p className="mt-1 font-mono text-xs text-flux-300">{invitation.groupSlug}</p>
      </div>
      <dl className="grid gap-4 px-6 py-5 text-sm sm:grid-cols-[minmax(0,1fr)_minmax(0,1.4fr)_minmax(0,1fr)]">
        <div>
          <dt className="text-xs font-medium tracking-wide text-ink-500 uppercase">Role</dt>
          <dd className="mt-1 font-medium text-ink-900">{ROLE_LABELS[invitation.role]}</dd>
          <dd className="mt-0.5 text-xs text-ink-500">{ROLE_DESCRIPTIONS[invitation.role]}</dd>
        </div>
        <div>
          <dt className="text-xs font-medium tracking-wide text-ink-500 uppercase">Sent to</dt>
          <dd className="mt-1 text-ink-900 [overflow-wrap:anywhere]">{invitation.email}</dd>
        </div>
        <div>
          <dt className="text-xs font-medium tracking-wide text-ink-500 uppercase">Valid until</dt>
          <dd className="mt-1 text-ink-900">{formatDate(invitation.expiresAt)}</dd>
        </div>
      </dl>
      <div className="flex flex-col gap-4 border-t border-ink-100 px-6 py-5">
        {otherAccount ? (
          <Notice tone="warning" title="You are signed in with a different account">
            This invitation was sent to <strong>{invitation.email}</strong>, but you are signed in as{" "}
            <strong>{signedInEmail}</strong>. Sign out, then open the link again and sign in with the invited
            address.
          </Notice>
        ) : null}
        {accept.isError ? (
          <Notice tone="error" title={acceptErrorTitle(accept.error)}>
            {describeError(accept.error).message}
          </Notice>
        ) : null}
        <div className="flex flex-wrap items-center gap-3">
          <Button
            size="lg"
            pending={accept.isPending}
            disabled={otherAccount}
            onClick={() => accept.mutate(undefined, { onSuccess: (result) => onAccepted(result) })}
          >
            Accept invitation
          </Button>
          {otherAccount ? signOutAction : null}
        </div>
      </div>
    </Card>
  );
}
