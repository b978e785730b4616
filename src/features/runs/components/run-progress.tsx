import type { RunProgress as RunProgressData } from "@shared/schemas";

function describe(progress: RunProgressData): string {
  const stage = `Stage ${progress.stageIndex} of ${progress.stageCount}: ${progress.stage}`;
  if (progress.percent === undefined) return stage;
  const count =
    progress.done !== undefined && progress.total !== undefined
      ? ` (${progress.done} of ${progress.total})`
      : "";
  return `${stage}, ${Math.round(progress.percent)} %${count}`;
}

/** Where the run's log has got to: the stage it reached and that stage's own progress lines, if any. */
export function RunProgress({ progress }: { progress: RunProgressData }) {
  const label = describe(progress);
  return (
    <div className="flex flex-col gap-1">
      <div className="text-sm text-ink-800">{label}</div>
      {progress.percent !== undefined ? (
        <div
          role="progressbar"
          aria-label={`Progress of stage ${progress.stage}`}
          aria-valuemin={0}
          aria-valuemax={100}
          aria-valuenow={Math.round(progress.percent)}
          aria-valuetext={label}
          className="h-1.5 w-full overflow-hidden rounded-full bg-ink-100"
        >
          <div className="h-full bg-flux-600" style={{ width: `${progress.percent}%` }} />
        </div>
      ) : null}
    </div>
  );
}
