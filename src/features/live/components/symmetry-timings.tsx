import type { RunProgress } from "@shared/schemas/runs";
import { type SymmetryTiming, SymmetryTimingsTable } from "@/components/symmetry-timings-table";
import { estimateRemaining, formatDurationSeconds, type RemainingTime } from "../remaining-time";

function describe(remaining: RemainingTime, progress: RunProgress | null): string | null {
  switch (remaining.kind) {
    case "none":
      return null;
    case "after-first":
      return `Stage ${progress?.stage}: estimate after the first symmetry.`;
    case "total-unknown":
      return `Stage ${progress?.stage}: no estimate yet — the stage has not said how many symmetries it has.`;
    case "stage-done":
      return `Stage ${progress?.stage}: every symmetry is done.`;
    case "estimate":
      return `Stage ${progress?.stage}: about ${formatDurationSeconds(remaining.seconds)} left — ${remaining.symmetriesLeft} ${remaining.symmetriesLeft === 1 ? "symmetry" : "symmetries"} at ${remaining.meanSeconds.toFixed(1)} s each on average so far.`;
  }
}

/** Per-symmetry times as the log reports them, with the time the current stage may still need. */
export function SymmetryTimings({
  timings,
  progress,
  finished,
  timedStages,
}: {
  timings: readonly SymmetryTiming[];
  progress: RunProgress | null;
  finished: boolean;
  /** Stages whose code reports a time per symmetry (see timed-stages.ts); undefined while unknown. */
  timedStages: readonly string[] | undefined;
}) {
  // A stage that reports no per-symmetry times (and has none so far) has nothing to estimate from.
  const stageTimed =
    progress !== null &&
    (timedStages?.includes(progress.stage) || timings.some((timing) => timing.stage === progress.stage));
  const estimate = finished || !stageTimed ? null : describe(estimateRemaining(progress, timings), progress);
  return (
    <div className="flex flex-col gap-2">
      {estimate ? (
        <p className="text-sm text-ink-700" data-testid="remaining-time">
          {estimate}
        </p>
      ) : null}
      {timings.length === 0 ? (
        <p className="text-sm text-ink-500">No symmetry finished yet.</p>
      ) : (
        <SymmetryTimingsTable timings={timings} />
      )}
    </div>
  );
}
