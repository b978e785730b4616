import type { TargetSummary } from "@shared/schemas";
import { useQuery } from "@tanstack/react-query";
import { Atom } from "lucide-react";
import { Link } from "react-router-dom";
import { EmptyState } from "@/components/ui/empty-state";
import { ErrorState } from "@/components/ui/error-state";
import { TableSkeleton } from "@/components/ui/skeleton";
import { Table, TBody, TD, TH, THead, TR } from "@/components/ui/table";
import { Formula } from "@/lib/formula";
import { paths } from "@/lib/paths";
import { targetQueries } from "../api/target-queries";

function TargetRow({ target, parentName }: { target: TargetSummary; parentName?: string }) {
  return (
    <TR>
      <TD className={parentName ? "pl-10" : undefined}>
        {parentName ? (
          <span aria-hidden="true" className="mr-1 text-ink-400">
            ↳
          </span>
        ) : null}
        <Link
          to={paths.target(target.groupId, target.id)}
          className="font-medium text-flux-800 hover:underline"
        >
          {target.name}
        </Link>
        {parentName ? <div className="text-xs text-ink-500">isotopologue of {parentName}</div> : null}
      </TD>
      <TD className="font-mono text-xs">
        <Formula formula={target.formula} />
      </TD>
      <TD className="font-mono text-xs">
        {target.pointGroup}
        {target.abelianSubgroup !== target.pointGroup ? ` / ${target.abelianSubgroup}` : ""}
      </TD>
      <TD className="font-mono text-xs">{target.latestVersion}</TD>
      <TD className="font-mono text-xs">{target.runCount}</TD>
    </TR>
  );
}

/** The group's targets with each one's isotopologues indented under it. */
export function TargetsTable({ groupId, groupName }: { groupId: string; groupName: string }) {
  const targets = useQuery(targetQueries.list(groupId));
  if (targets.isPending) return <TableSkeleton rows={4} columns={5} label="Loading targets" />;
  if (targets.isError)
    return (
      <ErrorState error={targets.error} onRetry={() => targets.refetch()} retrying={targets.isFetching} />
    );
  if (targets.data.targets.length === 0) {
    return (
      <EmptyState icon={<Atom className="size-5" aria-hidden="true" />} title="No targets yet">
        Targets entered through the API, the command line or the XYZ form below are listed here with their
        point groups and isotopologues.
      </EmptyState>
    );
  }
  return (
    <Table caption={`Targets of ${groupName}`}>
      <THead>
        <TR>
          <TH>Target</TH>
          <TH>Formula</TH>
          <TH>Point group / Abelian subgroup</TH>
          <TH>Latest version</TH>
          <TH>Runs</TH>
        </TR>
      </THead>
      <TBody>
        {targets.data.targets.flatMap((target) => [
          <TargetRow key={target.id} target={target} />,
          ...target.isotopologues.map((isotopologue) => (
            <TargetRow key={isotopologue.id} target={isotopologue} parentName={target.name} />
          )),
        ])}
      </TBody>
    </Table>
  );
}
