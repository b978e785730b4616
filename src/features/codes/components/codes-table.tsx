import type { Code } from "@shared/schemas";
import { useQuery } from "@tanstack/react-query";
import { Cpu } from "lucide-react";
import { Badge } from "@/components/ui/badge";
import { EmptyState } from "@/components/ui/empty-state";
import { ErrorState } from "@/components/ui/error-state";
import { TableSkeleton } from "@/components/ui/skeleton";
import { Table, TBody, TD, TH, THead, TR } from "@/components/ui/table";
import { cn } from "@/lib/cn";
import { formatDate } from "@/lib/format";
import { codeHostQueries, codeQueries } from "../api/code-queries";
import { installedOnText } from "../lib/code-hosts";

const names = (list: string[]) => (list.length === 0 ? "—" : list.join(", "));

/** Active versions first, then retired ones, each in the API's order (by name, then registration). */
const activeFirst = (list: Code[]) => [
  ...list.filter((code) => !code.retiredAt),
  ...list.filter((code) => code.retiredAt),
];

/** The group's codes as the API lists them: each registered name and version with what it reads and writes. */
export function CodesTable({
  groupId,
  groupName,
  selectedId = null,
  onSelect,
}: {
  groupId: string;
  groupName: string;
  selectedId?: string | null;
  onSelect?: (codeId: string) => void;
}) {
  const codes = useQuery(codeQueries.list(groupId));
  const hosts = useQuery(codeHostQueries.list(groupId));
  if (codes.isPending) return <TableSkeleton rows={4} label="Loading codes" />;
  if (codes.isError)
    return <ErrorState error={codes.error} onRetry={() => codes.refetch()} retrying={codes.isFetching} />;
  if (codes.data.codes.length === 0) {
    return (
      <EmptyState icon={<Cpu className="size-5" aria-hidden="true" />} title="No codes registered yet">
        Register a code, or import a file of definitions, and it is listed here by name and version with the
        files it reads and writes.
      </EmptyState>
    );
  }
  return (
    <Table caption={`Codes of ${groupName}`}>
      <THead>
        <TR>
          <TH>Code</TH>
          <TH>Version</TH>
          <TH>Executable</TH>
          <TH>Input files</TH>
          <TH>Collected files</TH>
          <TH>Defaults</TH>
          <TH>Hosts</TH>
          <TH>Registered</TH>
        </TR>
      </THead>
      <TBody>
        {activeFirst(codes.data.codes).map(({ id, definition, createdAt, retiredAt, hostIds }) => (
          <TR
            key={id}
            className={cn(id === selectedId && "bg-flux-50", retiredAt && "text-ink-400 opacity-70")}
          >
            <TD>
              {onSelect ? (
                <button
                  type="button"
                  className="text-left font-medium text-flux-800 underline-offset-2 hover:underline"
                  aria-current={id === selectedId ? "true" : undefined}
                  aria-label={`${definition.name} ${definition.version}: show details`}
                  onClick={() => onSelect(id)}
                >
                  {definition.name}
                </button>
              ) : (
                <div className="font-medium text-ink-900">{definition.name}</div>
              )}
              {definition.description ? (
                <div
                  className="mt-1 line-clamp-2 max-w-sm text-xs text-ink-500"
                  title={definition.description}
                >
                  {definition.description}
                </div>
              ) : null}
            </TD>
            <TD className="font-mono text-xs">
              {definition.version}
              {retiredAt ? (
                <Badge tone="muted" className="ml-2">
                  retired
                </Badge>
              ) : null}
            </TD>
            <TD className="font-mono text-xs">{definition.executable}</TD>
            <TD className="font-mono text-xs">{names(definition.inputTemplates.map((t) => t.fileName))}</TD>
            <TD className="font-mono text-xs">{names(definition.outputFiles)}</TD>
            <TD className="font-mono text-xs">
              {definition.defaults.cores} × {definition.defaults.wallTimeMinutes} min
            </TD>
            <TD className="text-xs">{installedOnText(hostIds, hosts.data?.hosts)}</TD>
            <TD className="text-xs">{formatDate(createdAt)}</TD>
          </TR>
        ))}
      </TBody>
    </Table>
  );
}
