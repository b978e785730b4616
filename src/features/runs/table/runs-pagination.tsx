import { RUN_LIST_PAGE_SIZE_MAX } from "@shared/schemas";
import { useId } from "react";
import { Button } from "@/components/ui/button";
import { Select } from "@/components/ui/select";

const PAGE_SIZES = [25, 50, 100, RUN_LIST_PAGE_SIZE_MAX];

/** Where the page is among all matching runs, previous and next, and how many runs a page shows. */
export function RunsPagination({
  page,
  pageSize,
  total,
  shown,
  onPage,
  onPageSize,
}: {
  page: number;
  pageSize: number;
  total: number;
  shown: number;
  onPage: (page: number) => void;
  onPageSize: (pageSize: number) => void;
}) {
  const sizeId = useId();
  const pages = Math.max(1, Math.ceil(total / pageSize));
  const first = shown === 0 ? 0 : (page - 1) * pageSize + 1;
  const last = shown === 0 ? 0 : first + shown - 1;
  return (
    <nav
      aria-label="Pages of runs"
      className="mt-3 flex flex-wrap items-center justify-between gap-3 text-sm"
    >
      <p className="text-ink-600" aria-live="polite">
        {first}–{last} of {total} {total === 1 ? "run" : "runs"} · page {Math.min(page, pages)} of {pages}
      </p>
      <div className="flex items-center gap-2">
        <label htmlFor={sizeId} className="text-ink-600">
          Runs per page
        </label>
        <Select
          id={sizeId}
          controlSize="sm"
          className="w-20"
          value={String(pageSize)}
          onChange={(event) => onPageSize(Number(event.target.value))}
        >
          {[...new Set([...PAGE_SIZES, pageSize])]
            .sort((a, b) => a - b)
            .map((size) => (
              <option key={size} value={size}>
                {size}
              </option>
            ))}
        </Select>
        <Button size="sm" variant="secondary" disabled={page <= 1} onClick={() => onPage(page - 1)}>
          Previous
        </Button>
        <Button size="sm" variant="secondary" disabled={page >= pages} onClick={() => onPage(page + 1)}>
          Next
        </Button>
      </div>
    </nav>
  );
}
