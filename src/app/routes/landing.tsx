import { useSuspenseQuery } from "@tanstack/react-query";
import { Mailbox } from "lucide-react";
import { EmptyState } from "@/components/ui/empty-state";
import { authQueries } from "@/features/auth/api/auth-queries";

/** Reached only by people in no group: everyone else is sent on to their group by the loader. */
export function LandingRoute() {
  const me = useSuspenseQuery(authQueries.me()).data;
  return (
    <div className="mx-auto max-w-2xl pt-8">
      <EmptyState icon={<Mailbox className="size-5" aria-hidden="true" />} title="You are not in a group yet">
        <p>
          In Sigmaflow, targets, runs and results belong to a research group, and each group runs on its own
          hosts. You join a group by invitation.
        </p>
        <ol className="mt-5 flex list-decimal flex-col gap-2 pl-5 text-left">
          <li>
            Ask an admin of the group you work with to invite{" "}
            <strong className="text-ink-900">{me.user.email}</strong>.
          </li>
          <li>Open the link in the invitation e-mail while signed in with this account.</li>
          <li>Accept the invitation; the group's workspace then opens here.</li>
        </ol>
      </EmptyState>
    </div>
  );
}
