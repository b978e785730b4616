import { type AuditEntry, auditSentenceParts } from "@shared/schemas";
import { useQuery } from "@tanstack/react-query";
import { History } from "lucide-react";
import { Link } from "react-router-dom";
import { EmptyState } from "@/components/ui/empty-state";
import { ErrorState } from "@/components/ui/error-state";
import { TableSkeleton } from "@/components/ui/skeleton";
import { Table, TBody, TD, TH, THead, TR } from "@/components/ui/table";
import { formatDateTime } from "@/lib/format";
import { paths } from "@/lib/paths";
import { groupQueries } from "../api/group-queries";

/** The page that shows a target, for the kinds of target that have one. */
function targetPath(groupId: string, entry: AuditEntry): string | null {
  if (!entry.targetExists || entry.targetId === null) return null;
  switch (entry.targetType) {
    case "run":
      return paths.run(groupId, entry.targetId);
    case "code":
      return paths.group(groupId, "codes");
    case "user":
      return paths.group(groupId, "members");
    default:
      return null;
  }
}

function detailText(entry: AuditEntry, key: string): string {
  const value = entry.details[key];
  return typeof value === "string" || typeof value === "number" ? String(value) : "…";
}

/** "Noor Vasquez confirmed the host key of kestrel-dev", the target's name linked to its page. */
function ActivitySentence({ groupId, entry }: { groupId: string; entry: AuditEntry }) {
  const to = targetPath(groupId, entry);
  const name = entry.targetName ?? "(name not recorded)";
  return (
    <>
      <span className="font-medium text-ink-900">{entry.actor ?? "Sigmaflow"}</span>{" "}
      {auditSentenceParts(entry.action).map((part, index) => {
        const key = `${index}-${part.kind}`;
        if (part.kind === "text") return <span key={key}>{part.text}</span>;
        if (part.kind === "detail") return <span key={key}>{detailText(entry, part.key)}</span>;
        return to ? (
          <Link key={key} to={to} className="font-medium text-flux-800 hover:underline">
            {name}
          </Link>
        ) : (
          <span key={key} className="font-medium text-ink-900">
            {name}
          </span>
        );
      })}
    </>
  );
}

export function ActivityLog({ groupId }: { groupId: string }) {
  const audit = useQuery(groupQueries.audit(groupId));

  if (audit.isPending) return <TableSkeleton label="Loading activity" columns={2} rows={6} />;
  if (audit.isError) {
    return <ErrorState error={audit.error} onRetry={() => audit.refetch()} retrying={audit.isFetching} />;
  }
  if (audit.data.entries.length === 0) {
    return (
      <EmptyState icon={<History className="size-5" aria-hidden="true" />} title="No activity recorded yet">
        Changes to members, invitations, hosts, accounts, codes, recipes, allocations and runs will be listed
        here, newest first.
      </EmptyState>
    );
  }
  return (
    <Table caption="Group activity">
      <THead>
        <tr>
          <TH>When</TH>
          <TH>What happened</TH>
        </tr>
      </THead>
      <TBody>
        {audit.data.entries.map((entry) => (
          <TR key={entry.id}>
            <TD className="whitespace-nowrap text-ink-600">{formatDateTime(entry.at)}</TD>
            <TD className="text-ink-700">
              <ActivitySentence groupId={groupId} entry={entry} />
            </TD>
          </TR>
        ))}
      </TBody>
    </Table>
  );
}
