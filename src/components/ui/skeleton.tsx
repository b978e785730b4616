import { cn } from "@/lib/cn";

export function Skeleton({ className }: { className?: string }) {
  return <div aria-hidden="true" className={cn("animate-pulse rounded-md bg-ink-100", className)} />;
}

/** Stand-in for a table while its rows load; announced once to screen readers. */
export function TableSkeleton({
  rows = 4,
  columns = 4,
  label,
}: {
  rows?: number;
  columns?: number;
  label: string;
}) {
  return (
    <div
      role="status"
      aria-label={label}
      className="overflow-hidden rounded-xl border border-ink-100 bg-white"
    >
      <div className="flex gap-6 border-b border-ink-100 bg-ink-50/60 px-5 py-3">
        {Array.from({ length: columns }, (_, column) => (
          // biome-ignore lint/suspicious/noArrayIndexKey: placeholders have no identity and never reorder
          <Skeleton key={`head-${column}`} className="h-3 w-20" />
        ))}
      </div>
      {Array.from({ length: rows }, (_, row) => (
        // biome-ignore lint/suspicious/noArrayIndexKey: placeholders have no identity and never reorder
        <div key={`row-${row}`} className="flex gap-6 border-b border-ink-50 px-5 py-4 last:border-b-0">
          {Array.from({ length: columns }, (_, column) => (
            // biome-ignore lint/suspicious/noArrayIndexKey: placeholders have no identity and never reorder
            <Skeleton key={`cell-${row}-${column}`} className={cn("h-4", column === 0 ? "w-40" : "w-24")} />
          ))}
        </div>
      ))}
    </div>
  );
}

/** Placeholder for a whole page while its code or first data arrives. */
export function PageSkeleton({ label = "Loading page" }: { label?: string }) {
  return (
    <div role="status" aria-label={label} className="flex flex-col gap-6">
      <div className="flex flex-col gap-2">
        <Skeleton className="h-3 w-32" />
        <Skeleton className="h-7 w-64" />
        <Skeleton className="h-4 w-96 max-w-full" />
      </div>
      <Skeleton className="h-48 w-full rounded-xl" />
    </div>
  );
}
