import type { Group } from "@shared/schemas";
import { useQuery } from "@tanstack/react-query";
import { Building2 } from "lucide-react";
import { Link } from "react-router-dom";
import { EmptyState } from "@/components/ui/empty-state";
import { ErrorState } from "@/components/ui/error-state";
import { TableSkeleton } from "@/components/ui/skeleton";
import { Table, TBody, TD, TH, THead, TR } from "@/components/ui/table";
import { formatDate } from "@/lib/format";
import { paths } from "@/lib/paths";
import { groupQueries } from "../api/group-queries";

function GroupRow({ group }: { group: Group }) {
  return (
    <TR>
      <TD>
        <Link
          to={paths.group(group.id, "members")}
          className="font-medium text-ink-900 underline-offset-2 hover:text-flux-700 hover:underline"
        >
          {group.name}
        </Link>
        {group.description ? (
          <p className="mt-0.5 line-clamp-1 text-xs text-ink-500">{group.description}</p>
        ) : null}
      </TD>
      <TD className="font-mono text-xs text-ink-600">{group.slug}</TD>
      <TD className="tabular-nums">{group.memberCount}</TD>
      <TD className="text-ink-600">{formatDate(group.createdAt)}</TD>
    </TR>
  );
}

export function GroupTable() {
  const groups = useQuery(groupQueries.list());

  if (groups.isPending) return <TableSkeleton label="Loading groups" columns={4} />;
  if (groups.isError) {
    return <ErrorState error={groups.error} onRetry={() => groups.refetch()} retrying={groups.isFetching} />;
  }
  if (groups.data.groups.length === 0) {
    return (
      <EmptyState icon={<Building2 className="size-5" aria-hidden="true" />} title="No groups yet">
        Create the first research group below. Its admin then invites the group's members by e-mail.
      </EmptyState>
    );
  }
  return (
    <Table caption="All research groups">
      <THead>
        <tr>
          <TH>Group</TH>
          <TH>Slug</TH>
          <TH>Members</TH>
          <TH>Created</TH>
        </tr>
      </THead>
      <TBody>
        {groups.data.groups.map((group) => (
          <GroupRow key={group.id} group={group} />
        ))}
      </TBody>
    </Table>
  );
}
