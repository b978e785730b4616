import { Card, CardBody, CardHeader } from "@/components/ui/card";
import { PageHeader } from "@/components/ui/page-header";
import { InvitationList } from "@/features/invitations/components/invitation-list";
import { InviteForm } from "@/features/invitations/components/invite-form";
import { useCurrentGroup } from "./use-current-group";

export function InvitationsRoute() {
  const { groupId, group } = useCurrentGroup();
  return (
    <>
      <PageHeader
        eyebrow={group.name}
        title="Invitations"
        description="Invite colleagues by e-mail. They join when they open the link while signed in with that address."
      />
      <div className="flex flex-col gap-8">
        <Card>
          <CardHeader title="Invite by e-mail" />
          <CardBody>
            <InviteForm groupId={groupId} />
          </CardBody>
        </Card>
        <section aria-labelledby="sent-invitations" className="flex flex-col gap-3">
          <h2 id="sent-invitations" className="text-base font-semibold text-ink-900">
            Sent invitations
          </h2>
          <InvitationList groupId={groupId} />
        </section>
      </div>
    </>
  );
}
