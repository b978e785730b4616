import type { RunProgress } from "@shared/schemas/runs";

type Timing = { stage: string; symmetry: string; durationSeconds: number };

export type RemainingTime =
  | { kind: "estimate"; seconds: number; symmetriesLeft: number; meanSeconds: number }
  | { kind: "after-first" }
  | { kind: "total-unknown" }
  | { kind: "stage-done" }
  | { kind: "none" };

/**
 * Time left in the stage the run is in: the mean time of its symmetries already done times the
 * symmetries still to do (the stage's total from its progress line, `done/total`). A plain linear
 * extrapolation (common practice for progress estimates); symmetries of one stage can differ a lot in
 * cost, so it is a guide, not a promise.
 */
export function estimateRemaining(progress: RunProgress | null, timings: readonly Timing[]): RemainingTime {
  if (!progress) return { kind: "none" };
  const done = timings.filter((timing) => timing.stage === progress.stage);
  if (done.length === 0) return { kind: "after-first" };
  if (progress.total === undefined) return { kind: "total-unknown" };
  const doneCount = Math.max(done.length, progress.done ?? 0);
  const symmetriesLeft = Math.max(0, progress.total - doneCount);
  if (symmetriesLeft === 0) return { kind: "stage-done" };
  const meanSeconds = done.reduce((sum, timing) => sum + timing.durationSeconds, 0) / done.length;
  return { kind: "estimate", seconds: meanSeconds * symmetriesLeft, symmetriesLeft, meanSeconds };
}

/** "42 s", "3 min 20 s", "1 h 05 min". */
export function formatDurationSeconds(seconds: number): string {
  const whole = Math.round(seconds);
  if (whole < 60) return `${whole} s`;
  const minutes = Math.floor(whole / 60);
  if (minutes < 60) return `${minutes} min ${String(whole % 60).padStart(2, "0")} s`;
  return `${Math.floor(minutes / 60)} h ${String(minutes % 60).padStart(2, "0")} min`;
}
