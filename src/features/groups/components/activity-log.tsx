import type { AuditEntry } from "@shared/schemas";
import { useQuery } from "@tanstack/react-query";
import { History } from "lucide-react";
import { EmptyState } from "@/components/ui/empty-state";
import { ErrorState } from "@/components/ui/error-state";
import { TableSkeleton } from "@/components/ui/skeleton";
import { Table, TBody, TD, TH, THead, TR } from "@/components/ui/table";
import { formatDateTime } from "@/lib/format";
import { groupQueries } from "../api/group-queries";

/** "member.role_changed" reads as "member role changed". */
function describeAction(action: string): string {
  return action.replace(/[._]/g, " ");
}

function ActivityRow({ entry }: { entry: AuditEntry }) {
  return (
    <TR>
      <TD className="whitespace-nowrap text-ink-600">{formatDateTime(entry.at)}</TD>
      <TD>{entry.actor ?? <span className="text-ink-400">System</span>}</TD>
      <TD className="font-medium">{describeAction(entry.action)}</TD>
      <TD className="font-mono text-xs text-ink-600">
        {entry.targetType}
        {entry.targetId ? ` · ${entry.targetId}` : ""}
      </TD>
    </TR>
  );
}

export function ActivityLog({ groupId }: { groupId: string }) {
  const audit = useQuery(groupQueries.audit(groupId));

  if (audit.isPending) return <TableSkeleton label="Loading activity" columns={4} rows={6} />;
  if (audit.isError) {
    return <ErrorState error={audit.error} onRetry={() => audit.refetch()} retrying={audit.isFetching} />;
  }
  if (audit.data.entries.length === 0) {
    return (
      <EmptyState icon={<History className="size-5" aria-hidden="true" />} title="No activity recorded yet">
        Changes to membership, invitations and roles will be listed here, newest first.
      </EmptyState>
    );
  }
  return (
    <Table caption="Group activity">
      <THead>
        <tr>
          <TH>When</TH>
          <TH>Who</TH>
          <TH>What</TH>
          <TH>Target</TH>
        </tr>
      </THead>
      <TBody>
        {audit.data.entries.map((entry) => (
          <ActivityRow key={entry.id} entry={entry} />
        ))}
      </TBody>
    </Table>
  );
}
