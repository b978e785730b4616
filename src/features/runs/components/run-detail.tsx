import type { RunDetail } from "@shared/schemas";
import { useQuery } from "@tanstack/react-query";
import type { ReactNode } from "react";
import { SymmetryTimingsTable } from "@/components/symmetry-timings-table";
import { Card, CardBody } from "@/components/ui/card";
import { Table, TBody, TD, TH, THead, TR } from "@/components/ui/table";
import { apiUrl } from "@/lib/api-client";
import { isFinished, runQueries } from "../api/run-queries";
import { formatCoreHours } from "../format-core-hours";
import { formatUtcSecond } from "../format-time";
import { RunOrigin } from "./run-origin";
import { RunProgress } from "./run-progress";
import { RunStateBadge } from "./run-state-badge";
import { RunTarget } from "./run-target";

function Section({ title, children }: { title: string; children: React.ReactNode }) {
  return (
    <section className="mt-8">
      <h2 className="mb-3 text-sm font-semibold text-ink-900">{title}</h2>
      {children}
    </section>
  );
}

/**
 * A run's progress, results, history, per-symmetry timings, collected files and log, refreshed while it
 * is unfinished. A run that reused results shows the files, timings and log of the run that produced them.
 * `results` (the results feature's view, composed by the page) is shown once the run is done, right
 * under the run's summary. `timings` (the live view, composed by the page) takes the place of the timings
 * table; `log` (the live log) is shown in the Log section, and once `logLive` says it holds the log, the
 * stored log is no longer read or shown.
 */
export function RunDetailView({
  run,
  results,
  log: liveLog,
  logLive = false,
  timings: liveTimings,
}: {
  run: RunDetail;
  results?: ReactNode;
  log?: ReactNode;
  logLive?: boolean;
  timings?: ReactNode;
}) {
  const log = useQuery({ ...runQueries.log(run.id, isFinished(run)), enabled: !logLive });
  return (
    <>
      <RunOrigin run={run} />
      <Card>
        <CardBody className="grid gap-4 text-sm sm:grid-cols-4">
          <div>
            <div className="text-xs text-ink-500">State</div>
            <RunStateBadge state={run.state} />
          </div>
          <div>
            <div className="text-xs text-ink-500">Scheduler's job id</div>
            <div className="font-mono">{run.schedulerJobId ?? "—"}</div>
          </div>
          <div>
            <div className="text-xs text-ink-500">Core-hours reserved / charged</div>
            <div className="font-mono">
              {formatCoreHours(run.reservedCoreHours)} / {formatCoreHours(run.chargedCoreHours)}
            </div>
          </div>
          <div>
            <div className="text-xs text-ink-500">Fingerprint</div>
            <div className="truncate font-mono text-xs" title={run.fingerprint}>
              {run.fingerprint.slice(0, 16)}…
            </div>
          </div>
          <div className="sm:col-span-4">
            <div className="text-xs text-ink-500">Target</div>
            <RunTarget run={run} />
          </div>
          {run.progress ? (
            <div className="sm:col-span-4">
              <div className="text-xs text-ink-500">Progress</div>
              <RunProgress progress={run.progress} />
            </div>
          ) : null}
          {/* A reusing run's message only repeats what RunOrigin says, with the link. */}
          {run.stateMessage && !run.reusedFrom ? (
            <p className="text-ink-700 sm:col-span-4">{run.stateMessage}</p>
          ) : null}
          {run.cancelRequestedByName && !isFinished(run) ? (
            <p className="text-ink-700 sm:col-span-4">
              {run.cancelRequestedByName} asked to cancel this run; it stops when the scheduler confirms.
            </p>
          ) : null}
        </CardBody>
      </Card>

      {run.state === "done" && results ? <Section title="Results">{results}</Section> : null}

      <Section title="History">
        <Table caption="State changes">
          <THead>
            <TR>
              <TH>When</TH>
              <TH>State</TH>
              <TH>By</TH>
              <TH>Note</TH>
            </TR>
          </THead>
          <TBody>
            {run.events.map((event) => (
              <TR key={`${event.at}-${event.toState}-${event.message ?? ""}`}>
                <TD className="font-mono text-xs whitespace-nowrap">
                  <time dateTime={event.at}>{formatUtcSecond(event.at)}</time>
                </TD>
                <TD>
                  <RunStateBadge state={event.toState} />
                </TD>
                <TD className="text-xs">{event.actorName ?? "Sigmaflow"}</TD>
                <TD className="text-xs text-ink-600">{event.message ?? ""}</TD>
              </TR>
            ))}
          </TBody>
        </Table>
      </Section>

      {liveTimings ? (
        <Section title="Time per symmetry">{liveTimings}</Section>
      ) : run.timings.length > 0 ? (
        <Section title="Time per symmetry">
          <SymmetryTimingsTable timings={run.timings} />
        </Section>
      ) : null}

      <Section title="Collected files">
        {run.artifacts.length === 0 ? (
          <p className="text-sm text-ink-500">
            {isFinished(run) ? "No files were collected." : "Nothing collected yet."}
          </p>
        ) : (
          <ul className="flex flex-col gap-1 text-sm">
            {run.artifacts.map((file) => (
              <li key={file.id}>
                <a
                  className="font-mono text-flux-800 hover:underline"
                  href={apiUrl(
                    `/api/runs/${encodeURIComponent(run.id)}/artifacts/${encodeURIComponent(file.id)}`,
                  )}
                >
                  {file.stage}/{file.name}
                </a>{" "}
                <span className="text-xs text-ink-500">
                  {file.sizeBytes} bytes, sha256 {file.sha256.slice(0, 12)}…
                </span>
              </li>
            ))}
          </ul>
        )}
      </Section>

      <Section title="Log">
        <p className="mb-2 text-sm">
          <a
            className="text-flux-800 hover:underline"
            href={apiUrl(`/api/runs/${encodeURIComponent(run.id)}/log/raw`)}
            download
          >
            Download the whole log
          </a>{" "}
          <span className="text-xs text-ink-500">(the bytes exactly as the job wrote them)</span>
        </p>
        {liveLog}
        {logLive ? null : (
          <pre
            data-testid="run-log"
            className="max-h-96 overflow-auto rounded-xl bg-ink-900 p-4 font-mono text-xs leading-relaxed text-ink-50"
          >
            {log.data === undefined
              ? "Loading…"
              : log.data.text || (isFinished(run) ? "The run printed nothing." : "No output yet.")}
          </pre>
        )}
      </Section>
    </>
  );
}
