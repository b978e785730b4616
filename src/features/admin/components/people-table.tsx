import { useQuery } from "@tanstack/react-query";
import { UserRound } from "lucide-react";
import { Badge } from "@/components/ui/badge";
import { EmptyState } from "@/components/ui/empty-state";
import { ErrorState } from "@/components/ui/error-state";
import { TableSkeleton } from "@/components/ui/skeleton";
import { Table, TBody, TD, TH, THead, TR } from "@/components/ui/table";
import { formatDate, formatDateTime } from "@/lib/format";
import { adminQueries } from "../api/admin-queries";

export function PeopleTable() {
  const users = useQuery(adminQueries.users());

  if (users.isPending) return <TableSkeleton label="Loading people" columns={5} rows={6} />;
  if (users.isError) {
    return <ErrorState error={users.error} onRetry={() => users.refetch()} retrying={users.isFetching} />;
  }
  if (users.data.users.length === 0) {
    return (
      <EmptyState icon={<UserRound className="size-5" aria-hidden="true" />} title="Nobody has signed in yet">
        Accounts appear here after their first sign-in through the institution's identity provider.
      </EmptyState>
    );
  }
  return (
    <Table caption="Everyone with a Sigmaflow account">
      <THead>
        <tr>
          <TH>Name</TH>
          <TH>E-mail</TH>
          <TH>Groups</TH>
          <TH>Last sign-in</TH>
          <TH>Account since</TH>
        </tr>
      </THead>
      <TBody>
        {users.data.users.map((user) => (
          <TR key={user.id}>
            <TD className="font-medium text-ink-900">
              <span className="inline-flex flex-wrap items-center gap-2">
                {user.displayName}
                {user.isSiteAdmin ? <Badge tone="ink">Site admin</Badge> : null}
              </span>
            </TD>
            <TD className="text-ink-600">{user.email}</TD>
            <TD className="tabular-nums">{user.groupCount}</TD>
            <TD className="whitespace-nowrap text-ink-600">
              {user.lastSignInAt ? (
                formatDateTime(user.lastSignInAt)
              ) : (
                <span className="text-ink-400">Never</span>
              )}
            </TD>
            <TD className="whitespace-nowrap text-ink-600">{formatDate(user.createdAt)}</TD>
          </TR>
        ))}
      </TBody>
    </Table>
  );
}
