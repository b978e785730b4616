import { cn } from "@/lib/cn";

export function ModelResultsNote({ className }: { className?: string }) {
  return (
    <p className={cn("text-xs leading-relaxed text-ink-500", className)}>
      Computed data from Sigmaflow are model results: validate them against measurements and follow your
      laboratory's practice before using them in design work.
    </p>
  );
}
