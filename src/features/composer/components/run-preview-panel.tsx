import type { RunPreview, RunPreviewFile } from "@shared/schemas";
import { Button } from "@/components/ui/button";

const hours = (coreHours: number) =>
  `${coreHours.toLocaleString("en", { maximumFractionDigits: 4 })} core-hours`;

function FileView({ file }: { file: RunPreviewFile }) {
  return (
    <details className="rounded-md border border-ink-200 bg-white">
      <summary className="cursor-pointer px-3 py-1.5 font-mono text-xs text-ink-800">
        {file.relativePath}{" "}
        <span className="text-ink-500">({file.sizeBytes.toLocaleString("en")} bytes)</span>
      </summary>
      <pre className="max-h-72 overflow-auto border-t border-ink-100 bg-ink-50 px-3 py-2 font-mono text-xs text-ink-900">
        {file.text}
        {file.truncated ? "\n… (cut here; the run receives the whole file)" : ""}
      </pre>
    </details>
  );
}

/** The allocation cost and balance of a run before it is submitted. */
export function CostSummary({ preview }: { preview: RunPreview }) {
  const { resources, costCoreHours, allocation, refusal } = preview;
  return (
    <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm" aria-label="Allocation cost">
      <dt className="text-ink-600">Cost</dt>
      <dd className="font-medium text-ink-900 tabular-nums">
        {hours(costCoreHours)}{" "}
        <span className="font-normal text-ink-500">
          ({resources.cores} {resources.cores === 1 ? "core" : "cores"} × {resources.wallTimeMinutes} min)
        </span>
      </dd>
      {allocation ? (
        <>
          <dt className="text-ink-600">{allocation.name}</dt>
          <dd className="tabular-nums text-ink-900">
            {hours(allocation.availableCoreHoursBefore)} available →{" "}
            <span
              className={
                allocation.availableCoreHoursAfter < 0 ? "font-medium text-ember-700" : "font-medium"
              }
            >
              {hours(allocation.availableCoreHoursAfter)} after
            </span>
          </dd>
        </>
      ) : null}
      {refusal ? (
        <dd className="col-span-2 text-sm font-medium text-ember-700" role="alert">
          {refusal.message}
        </dd>
      ) : null}
    </dl>
  );
}

type ReuseProps = {
  reusable: NonNullable<RunPreview["reusable"]>;
  pending: boolean;
  onOpen: () => void;
  onReuse: () => void;
  onRunAnyway: () => void;
  runAnywayDisabled: boolean;
};

/** A finished run with identical inputs: its results are offered before any allocation is spent. */
export function ReuseOffer({
  reusable,
  pending,
  onOpen,
  onReuse,
  onRunAnyway,
  runAnywayDisabled,
}: ReuseProps) {
  const finished = reusable.finishedAt ? new Date(reusable.finishedAt).toLocaleString() : "—";
  return (
    <section
      aria-labelledby="reuse-title"
      className="rounded-lg border border-flux-300 bg-flux-50 p-3 text-sm text-ink-900"
    >
      <h3 id="reuse-title" className="font-medium">
        These inputs already ran
      </h3>
      <p className="mt-1 text-ink-700">
        “{reusable.name}” finished {finished} with the same fingerprint; results:{" "}
        {reusable.resultsState ?? "not derived"}. Reusing its results costs 0 core-hours.
      </p>
      <div className="mt-2 flex flex-wrap gap-2">
        <Button size="sm" variant="secondary" onClick={onOpen}>
          Open that run
        </Button>
        <Button size="sm" pending={pending} onClick={onReuse}>
          Reuse its results
        </Button>
        <Button size="sm" variant="ghost" disabled={runAnywayDisabled || pending} onClick={onRunAnyway}>
          Submit anyway
        </Button>
      </div>
    </section>
  );
}

/** What the run would put on the host: each stage's rendered input files and the batch script. */
export function RenderedFiles({ preview }: { preview: RunPreview }) {
  return (
    <div className="space-y-3">
      {preview.stages.map((stage) => (
        <div key={stage.name} className="space-y-1">
          <h4 className="text-xs font-medium text-ink-600">
            Stage {stage.index} · {stage.name} ({stage.codeName} {stage.codeVersion})
          </h4>
          {stage.files.map((file) => (
            <FileView key={file.relativePath} file={file} />
          ))}
        </div>
      ))}
      <div className="space-y-1">
        <h4 className="text-xs font-medium text-ink-600">Batch script</h4>
        <FileView file={preview.script} />
      </div>
    </div>
  );
}
