import type { RunListSort, RunSummary } from "@shared/schemas";
import { useQuery } from "@tanstack/react-query";
import {
  type CellContext,
  type ColumnDef,
  flexRender,
  getCoreRowModel,
  type RowSelectionState,
  type SortingState,
  useReactTable,
} from "@tanstack/react-table";
import { ListChecks } from "lucide-react";
import { useMemo, useState } from "react";
import { Link, useSearchParams } from "react-router-dom";
import { EmptyState } from "@/components/ui/empty-state";
import { ErrorState } from "@/components/ui/error-state";
import { Notice } from "@/components/ui/notice";
import { TableSkeleton } from "@/components/ui/skeleton";
import { Table, TBody, TD, TH, THead, TR } from "@/components/ui/table";
import { cn } from "@/lib/cn";
import { paths } from "@/lib/paths";
import { isFinished, runQueries } from "../api/run-queries";
import { formatCoreHours as coreHours } from "../format-core-hours";
import { formatUtcMinute, formatUtcSecond } from "../format-time";
import { BulkActions } from "../table/bulk-actions";
import { hasFilters, type RunFilterOptions, RunFilters } from "../table/run-filters";
import { type RunListView, searchFromView, viewFromSearch } from "../table/run-list-params";
import { RunsPagination } from "../table/runs-pagination";
import { RunActions } from "./run-actions";
import { RunProgress } from "./run-progress";
import { RunStateBadge } from "./run-state-badge";
import { RunTarget } from "./run-target";

/** While changes cannot arrive live, the list still reads itself again this often. */
const FALLBACK_REFRESH_MS = 30_000;

const NO_OPTIONS: RunFilterOptions = { targets: [], recipes: [], hosts: [], submitters: [] };

const nameIn = (options: { id: string; name: string }[], id: string) =>
  options.find((option) => option.id === id)?.name ?? "—";

/** A short name kept on one line; the whole of it in a tooltip when the column cuts it. */
function OneLine({ text }: { text: string }) {
  return (
    <span className="block max-w-40 truncate whitespace-nowrap" title={text}>
      {text}
    </span>
  );
}

function columnsFor(groupId: string, canAct: boolean, options: RunFilterOptions): ColumnDef<RunSummary>[] {
  // Sortable columns have an accessor (TanStack Table sorts only those); the server does the sorting.
  const columns: ColumnDef<RunSummary>[] = [
    {
      id: "name",
      accessorFn: (run) => run.name,
      header: "Run",
      cell: ({ row: { original: run } }) => (
        <div className="min-w-40">
          <Link to={paths.run(groupId, run.id)} className="font-medium text-flux-800 hover:underline">
            {run.name}
          </Link>
          <div className="font-mono text-xs text-ink-500">
            {run.cores} × {run.wallTimeMinutes} min
          </div>
        </div>
      ),
    },
    {
      id: "state",
      accessorFn: (run) => run.state,
      header: "State",
      cell: ({ row: { original: run } }) => (
        <div className="flex max-w-xs min-w-32 flex-col gap-1">
          <div>
            <RunStateBadge state={run.state} />
          </div>
          {run.stateMessage ? <div className="text-xs text-ink-500">{run.stateMessage}</div> : null}
          {run.progress && !isFinished(run) ? <RunProgress progress={run.progress} /> : null}
        </div>
      ),
    },
    {
      id: "target",
      accessorFn: (run) => run.targetName,
      header: "Target",
      cell: ({ row: { original: run } }) =>
        run.targetId ? <RunTarget run={run} /> : <span className="text-ink-400">—</span>,
    },
    {
      id: "recipe",
      accessorFn: (run) => run.recipeId,
      header: "Recipe",
      cell: ({ row: { original: run } }) => <OneLine text={nameIn(options.recipes, run.recipeId)} />,
    },
    {
      id: "host",
      accessorFn: (run) => run.hostId,
      header: "Host",
      cell: ({ row: { original: run } }) => nameIn(options.hosts, run.hostId),
    },
    {
      id: "submittedBy",
      accessorFn: (run) => run.submittedByName,
      header: "Submitted by",
      cell: ({ row: { original: run } }) => run.submittedByName ?? "—",
    },
    {
      id: "coreHours",
      header: () => (
        <span
          className="inline-flex flex-col leading-tight whitespace-nowrap"
          title="Core-hours reserved / charged"
        >
          <span>Core-hours</span>
          <span className="text-[10px] font-normal tracking-normal normal-case">reserved / charged</span>
        </span>
      ),
      enableSorting: false,
      cell: ({ row: { original: run } }) => (
        <span className="font-mono text-xs whitespace-nowrap">
          {coreHours(run.reservedCoreHours)} / {coreHours(run.chargedCoreHours)}
        </span>
      ),
    },
    {
      id: "createdAt",
      accessorFn: (run) => run.createdAt,
      // Newest first on the first click; names and states start from the top of the alphabet or lifecycle.
      sortDescFirst: true,
      header: "Submitted (UTC)",
      cell: ({ row: { original: run } }) => (
        <time
          dateTime={run.createdAt}
          title={formatUtcSecond(run.createdAt)}
          className="flex flex-col font-mono text-xs whitespace-nowrap"
        >
          {/* Date above time, so the column stays narrow: "2026-12-05" / "04:54 UTC". */}
          <span>{formatUtcMinute(run.createdAt).slice(0, 10)}</span>
          <span>{formatUtcMinute(run.createdAt).slice(11)}</span>
        </time>
      ),
    },
  ];
  if (!canAct) return columns;
  return [
    {
      id: "select",
      enableSorting: false,
      header: ({ table }) => (
        <input
          type="checkbox"
          aria-label="Select all runs on this page"
          className="accent-flux-700"
          checked={table.getIsAllPageRowsSelected()}
          ref={(box) => {
            if (box) box.indeterminate = table.getIsSomePageRowsSelected();
          }}
          onChange={table.getToggleAllPageRowsSelectedHandler()}
        />
      ),
      cell: ({ row }) => (
        <input
          type="checkbox"
          aria-label={`Select ${row.original.name}`}
          className="accent-flux-700"
          checked={row.getIsSelected()}
          onChange={row.getToggleSelectedHandler()}
        />
      ),
    },
    ...columns,
    {
      id: "actions",
      enableSorting: false,
      header: () => <span className="sr-only sm:not-sr-only">Actions</span>,
      cell: RunActionsCell,
    },
  ];
}

/**
 * The actions cell as a component of its own: react-table renders a cell function as a component, so
 * one written inline would be a new component whenever the columns are made again (the filter options
 * arriving) and would lose its state, such as an open confirmation.
 */
function RunActionsCell({ row }: CellContext<RunSummary, unknown>) {
  return <RunActions run={row.original} />;
}

export function RunsTable({
  groupId,
  groupName,
  canAct,
  updates,
}: {
  groupId: string;
  groupName: string;
  /** Members and admins may cancel and resubmit; collaborators read. */
  canAct: boolean;
  /**
   * `live`: changes arrive from the live feed and the list does not poll; `fallback`: the feed is away
   * and the list reads itself again slowly. Left out: the list refreshes itself while a run is unfinished.
   */
  updates?: "live" | "fallback";
}) {
  const filterOptions = useQuery(runQueries.filterOptions(groupId)).data ?? NO_OPTIONS;
  const [search, setSearch] = useSearchParams();
  const { view, ignored } = viewFromSearch(search);
  const setView = (changes: Partial<RunListView>, { keepPage = false } = {}) => {
    const next = { ...view, ...changes, page: keepPage ? (changes.page ?? view.page) : 1 };
    setSearch(searchFromView(next), { replace: false });
  };
  const viewKey = searchFromView(view).toString();
  // The selection belongs to the view it was made in: another page or filter starts afresh.
  const [selection, setSelection] = useState<{ view: string; rows: RowSelectionState }>({
    view: viewKey,
    rows: {},
  });
  const rowSelection = selection.view === viewKey ? selection.rows : {};

  const options = runQueries.list(groupId, view);
  const runs = useQuery(
    updates === undefined
      ? options
      : {
          ...options,
          refetchInterval: (query) =>
            updates === "fallback" && query.state.data?.runs.some((run) => !isFinished(run))
              ? FALLBACK_REFRESH_MS
              : false,
        },
  );
  const columns = useMemo(() => columnsFor(groupId, canAct, filterOptions), [groupId, canAct, filterOptions]);
  const sorting: SortingState = [{ id: view.sort, desc: view.order === "desc" }];
  const table = useReactTable({
    data: runs.data?.runs ?? [],
    columns,
    getCoreRowModel: getCoreRowModel(),
    getRowId: (run) => run.id,
    manualSorting: true,
    manualFiltering: true,
    manualPagination: true,
    enableSortingRemoval: false,
    enableMultiSort: false,
    rowCount: runs.data?.total ?? 0,
    state: {
      sorting,
      rowSelection,
      pagination: { pageIndex: view.page - 1, pageSize: view.pageSize },
    },
    enableRowSelection: canAct,
    onRowSelectionChange: (updater) =>
      setSelection({
        view: viewKey,
        rows: typeof updater === "function" ? updater(rowSelection) : updater,
      }),
    onSortingChange: (updater) => {
      const [next] = typeof updater === "function" ? updater(sorting) : updater;
      if (next) setView({ sort: next.id as RunListSort, order: next.desc ? "desc" : "asc" });
    },
  });
  const selected = table.getSelectedRowModel().rows.map((row) => row.original);

  const filters = <RunFilters view={view} options={filterOptions} onChange={(changes) => setView(changes)} />;
  const notices =
    ignored.length > 0 ? (
      <Notice tone="warning" className="mb-3">
        This address held values the list cannot use, left out: {[...new Set(ignored)].join(", ")}.
      </Notice>
    ) : null;

  if (runs.isPending) return <TableSkeleton rows={4} label="Loading runs" />;
  if (runs.isError)
    return <ErrorState error={runs.error} onRetry={() => runs.refetch()} retrying={runs.isFetching} />;
  if (runs.data.total === 0 && !hasFilters(view)) {
    return (
      <EmptyState icon={<ListChecks className="size-5" aria-hidden="true" />} title="No runs yet">
        Runs submitted through the API or the command line are listed here, newest first.
      </EmptyState>
    );
  }
  return (
    <>
      {notices}
      {filters}
      {canAct ? (
        <BulkActions selected={selected} onDone={() => setSelection({ view: viewKey, rows: {} })} />
      ) : null}
      {runs.data.runs.length === 0 ? (
        <EmptyState icon={<ListChecks className="size-5" aria-hidden="true" />} title="No runs match">
          {runs.data.total === 0
            ? "No run of this group matches these filters."
            : "This page is past the last one; go back to the first."}
        </EmptyState>
      ) : (
        <div aria-busy={runs.isPlaceholderData || undefined}>
          <Table caption={`Runs of ${groupName}`}>
            <THead>
              {table.getHeaderGroups().map((group) => (
                <TR key={group.id}>
                  {group.headers.map((header) => {
                    const sorted = header.column.getIsSorted();
                    const sortable = header.column.getCanSort();
                    return (
                      <TH
                        key={header.id}
                        aria-sort={
                          !sortable
                            ? undefined
                            : sorted === "asc"
                              ? "ascending"
                              : sorted === "desc"
                                ? "descending"
                                : "none"
                        }
                        className={
                          header.column.id === "select"
                            ? "w-8 pr-0! pl-4!"
                            : header.index === group.headers.length - 1
                              ? "pr-5! pl-3! whitespace-nowrap"
                              : header.column.id === "coreHours"
                                ? "px-3! whitespace-nowrap"
                                : "px-3!"
                        }
                      >
                        {sortable ? (
                          <button
                            type="button"
                            onClick={header.column.getToggleSortingHandler()}
                            className="inline-flex items-center gap-1 uppercase hover:text-ink-800"
                          >
                            {flexRender(header.column.columnDef.header, header.getContext())}
                            <span aria-hidden="true" className="w-2 text-[10px]">
                              {sorted === "asc" ? "▲" : sorted === "desc" ? "▼" : ""}
                            </span>
                          </button>
                        ) : (
                          flexRender(header.column.columnDef.header, header.getContext())
                        )}
                      </TH>
                    );
                  })}
                </TR>
              ))}
            </THead>
            <TBody>
              {table.getRowModel().rows.map((row) => (
                <TR key={row.id}>
                  {row.getVisibleCells().map((cell, i, cells) => (
                    <TD
                      key={cell.id}
                      className={cn(
                        cell.column.id === "select" ? "w-8 pr-0! pl-4!" : "px-3!",
                        cell.column.id === "actions" && "text-right",
                        i === cells.length - 1 && cell.column.id !== "select" && "pr-5!",
                      )}
                    >
                      {flexRender(cell.column.columnDef.cell, cell.getContext())}
                    </TD>
                  ))}
                </TR>
              ))}
            </TBody>
          </Table>
        </div>
      )}
      <RunsPagination
        page={view.page}
        pageSize={view.pageSize}
        total={runs.data.total}
        shown={runs.data.runs.length}
        onPage={(page) => setView({ page }, { keepPage: true })}
        onPageSize={(pageSize) => setView({ pageSize })}
      />
    </>
  );
}
