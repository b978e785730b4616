/**
 * `sigmaflow runs list|show|cancel|watch`: a group's runs from the terminal, through the HTTP API with an
 * API token (SIGMAFLOW_URL, SIGMAFLOW_TOKEN).
 */
import { z } from "zod";
import { meSchema } from "../../shared/schemas/auth";
import { groupListSchema } from "../../shared/schemas/groups";
import {
  type RunDetail,
  type RunSummary,
  runDetailSchema,
  runListSchema,
  runStateSchema,
  runSummarySchema,
} from "../../shared/schemas/runs";
import { CliError } from "../errors";
import { type ApiClient, apiConfigFromEnv, createApiClient } from "../lib/api-client";
import { parseCommandArgs, parseNumberArg, splitCommand, writeJson } from "../lib/args";
import { formatTable } from "../lib/input-files";
import { WATCH_EXIT_CODES, watchRun } from "../lib/run-watch";

const COMMANDS = {
  list: "The runs of a group: name, state, target, created, id",
  show: "One run: summary, history, timings per symmetry, collected files, results",
  cancel: "Ask Sigmaflow to cancel a run",
  watch: "A run's log as the job writes it, from the start; the exit code tells how the run ended",
};

const USAGE = `Usage:
  sigmaflow runs list [--group ID|NAME] [--state STATE] [--limit N] [--json]
  sigmaflow runs show RUN [--json]
  sigmaflow runs cancel RUN [--json]
  sigmaflow runs watch RUN [--poll]

RUN is a run id (the last column of \`runs list\`). The server and the API token come from the environment:
  SIGMAFLOW_URL    the Sigmaflow server, e.g. http://127.0.0.1:5180
  SIGMAFLOW_TOKEN  an API token (sf_…), sent as Authorization: Bearer

\`watch\` exits with 0 when the run is done, 1 when it failed, 3 when it was cancelled. It follows the live
feed, or with --poll (or when the feed cannot connect) reads the stored log over HTTP once a second.
Every command exits with 2 for bad usage and 4 when the server cannot be reached or refuses the request.
`;

const runIdSchema = z.uuid();

function client(): ApiClient {
  return createApiClient(apiConfigFromEnv(process.env));
}

function parseRunId(text: string): string {
  if (!runIdSchema.safeParse(text).success) {
    throw new CliError(`RUN must be a run id such as 0b6f…-…, got "${text}" (see \`sigmaflow runs list\`).`);
  }
  return text.toLowerCase();
}

/**
 * Names, messages and file names are written by people: control characters (terminal escapes among them)
 * are shown as `?` so a name cannot rewrite the terminal.
 */
function printable(text: string): string {
  // biome-ignore lint/suspicious/noControlCharactersInRegex: these are the characters being replaced.
  return text.replace(/[\u0000-\u0008\u000b-\u001f\u007f-\u009f]/g, "?");
}

function oneLine(text: string, maxLength = 60): string {
  const flat = printable(text).replace(/\s+/g, " ").trim();
  return flat.length > maxLength ? `${flat.slice(0, maxLength - 1)}…` : flat;
}

/** `2026-12-05 01:32 UTC`: minutes are enough to tell runs apart in a table. */
function formatTime(iso: string | null): string {
  if (!iso) return "—";
  return `${iso.slice(0, 10)} ${iso.slice(11, 16)} UTC`;
}

function targetLabel(run: RunSummary): string {
  if (!run.targetName) return "—";
  return `${oneLine(run.targetName, 32)}${run.targetVersion === null ? "" : ` v${run.targetVersion}`}`;
}

async function resolveGroup(api: ApiClient, wanted: string | undefined): Promise<string> {
  if (wanted !== undefined && z.uuid().safeParse(wanted).success) return wanted.toLowerCase();
  const me = await api.request("GET", "/api/me", meSchema);
  if (wanted === undefined) {
    if (me.memberships.length === 1) return me.memberships[0]!.groupId;
    if (me.memberships.length === 0) {
      throw new CliError("you are not a member of any group: pass --group ID to name one.");
    }
    const names = me.memberships.map((m) => `${oneLine(m.groupName, 40)} (${m.groupSlug})`).join(", ");
    throw new CliError(
      `you are a member of ${me.memberships.length} groups (${names}): pass --group ID|NAME.`,
    );
  }
  const key = wanted.trim().toLowerCase();
  const matches = (group: { slug: string; name: string }) =>
    group.slug.toLowerCase() === key || group.name.trim().toLowerCase() === key;
  const mine = me.memberships.filter((m) => matches({ slug: m.groupSlug, name: m.groupName }));
  if (mine.length === 1) return mine[0]!.groupId;
  if (mine.length > 1) throw new CliError(`more than one of your groups is called "${wanted}": pass its id.`);
  // Site admins see groups they are not members of.
  const { groups } = await api.request("GET", "/api/groups", groupListSchema);
  const found = groups.filter(matches);
  if (found.length === 1) return found[0]!.id;
  throw new CliError(`no group "${wanted}" among the groups you can see (give its id, slug or name).`);
}

async function listCommand(args: string[]): Promise<number> {
  const { values } = parseCommandArgs(
    args,
    {
      group: { type: "string" },
      state: { type: "string" },
      limit: { type: "string" },
      json: { type: "boolean", default: false },
    },
    { names: [] },
  );
  const query = new URLSearchParams();
  if (values.state !== undefined) {
    const state = runStateSchema.safeParse(values.state);
    if (!state.success) {
      throw new CliError(
        `--state must be one of ${runStateSchema.options.join(", ")}; got "${values.state}".`,
      );
    }
    query.set("state", state.data);
  }
  if (values.limit !== undefined) {
    query.set("limit", String(parseNumberArg(values.limit, "--limit", { integer: true, min: 1, max: 500 })));
  }
  const api = client();
  const groupId = await resolveGroup(api, values.group);
  const suffix = query.size > 0 ? `?${query}` : "";
  const { runs } = await api.request("GET", `/api/groups/${groupId}/runs${suffix}`, runListSchema);
  if (values.json) {
    writeJson({ groupId, runs });
    return 0;
  }
  if (runs.length === 0) {
    process.stdout.write(
      values.state ? `No ${values.state} runs in this group.\n` : "No runs in this group yet.\n",
    );
    return 0;
  }
  const rows = runs.map((run) => [
    oneLine(run.name, 40),
    run.cancelRequested && run.state !== "cancelled" ? `${run.state} (cancel asked)` : run.state,
    targetLabel(run),
    formatTime(run.createdAt),
    run.id,
  ]);
  process.stdout.write(formatTable(["name", "state", "target", "created", "id"], rows));
  return 0;
}

function formatDuration(seconds: number): string {
  if (seconds < 60) return `${Number(seconds.toFixed(2))} s`;
  const minutes = Math.floor(seconds / 60);
  return `${minutes} min ${Number((seconds - minutes * 60).toFixed(1))} s`;
}

function formatBytes(bytes: number): string {
  if (bytes < 1024) return `${bytes} B`;
  if (bytes < 1024 ** 2) return `${(bytes / 1024).toFixed(1)} KiB`;
  return `${(bytes / 1024 ** 2).toFixed(1)} MiB`;
}

/** The run as text: summary lines, then history, timings, collected files and results. */
export function describeRun(run: RunDetail): string {
  const out: string[] = [];
  const field = (name: string, value: string) => out.push(`${`${name}:`.padEnd(14)}${value}`);
  field("run", `${oneLine(run.name, 120)} (${run.id})`);
  field("state", `${run.state}${run.stateMessage ? ` — ${oneLine(run.stateMessage, 200)}` : ""}`);
  if (run.cancelRequested && run.state !== "cancelled") {
    field("cancel", `asked by ${oneLine(run.cancelRequestedByName ?? "someone", 60)}`);
  }
  field("target", targetLabel(run));
  if (run.progress) {
    const p = run.progress;
    const count = p.done !== undefined && p.total !== undefined ? ` ${p.done}/${p.total}` : "";
    const percent = p.percent !== undefined ? ` (${Number(p.percent.toFixed(1))} %)` : "";
    field("progress", `stage ${p.stageIndex}/${p.stageCount} ${oneLine(p.stage, 40)}${count}${percent}`);
  }
  field("submitted by", oneLine(run.submittedByName ?? "—", 60));
  field("created", formatTime(run.createdAt));
  field("started", formatTime(run.startedAt));
  field("finished", formatTime(run.finishedAt));
  field(
    "resources",
    `${run.cores} ${run.cores === 1 ? "core" : "cores"}, ${run.wallTimeMinutes} min wall time`,
  );
  const charged = run.chargedCoreHours === null ? "not yet charged" : `${run.chargedCoreHours} charged`;
  field("core-hours", `${run.reservedCoreHours} reserved, ${charged}`);
  if (run.schedulerJobId) field("job", oneLine(run.schedulerJobId, 60));
  if (run.exitCode !== null) field("exit code", String(run.exitCode));
  if (run.reusedFrom) field("reuses", `the results of run ${run.reusedFrom}`);
  if (run.resubmittedFrom) field("resubmits", run.resubmittedFrom);
  const results = run.resultsState ?? "not yet (the run is not done)";
  field("results", `${results}${run.resultsMessage ? ` — ${oneLine(run.resultsMessage, 200)}` : ""}`);

  out.push("", "History:");
  const history = run.events.map((event) => [
    formatTime(event.at),
    `${event.fromState ?? "—"} → ${event.toState}`,
    oneLine(event.actorName ?? event.actor, 30),
    oneLine(event.message ?? "", 80),
  ]);
  out.push(indent(formatTable(["at", "change", "by", "message"], history)));

  out.push("Timings per symmetry:");
  if (run.timings.length === 0) out.push("  none recorded", "");
  else {
    const rows = run.timings.map((t) => [
      oneLine(t.stage, 30),
      oneLine(t.symmetry, 20),
      formatDuration(t.durationSeconds),
    ]);
    out.push(indent(formatTable(["stage", "symmetry", "wall time"], rows)));
  }

  out.push("Collected files:");
  if (run.artifacts.length === 0) out.push("  none", "");
  else {
    const rows = run.artifacts.map((a) => [
      oneLine(a.stage, 30),
      oneLine(a.name, 60),
      formatBytes(a.sizeBytes),
      a.sha256.slice(0, 16),
    ]);
    out.push(indent(formatTable(["stage", "file", "size", "sha256 (start)"], rows)));
  }
  return `${out.join("\n").trimEnd()}\n`;
}

function indent(table: string): string {
  return table
    .split("\n")
    .map((line) => (line ? `  ${line}` : line))
    .join("\n");
}

async function showCommand(args: string[]): Promise<number> {
  const { values, positionals } = parseCommandArgs(
    args,
    { json: { type: "boolean", default: false } },
    { names: ["RUN"] },
  );
  const runId = parseRunId(positionals[0]!);
  const run = await client().request("GET", `/api/runs/${runId}`, runDetailSchema);
  if (values.json) writeJson(run);
  else process.stdout.write(describeRun(run));
  return 0;
}

async function cancelCommand(args: string[]): Promise<number> {
  const { values, positionals } = parseCommandArgs(
    args,
    { json: { type: "boolean", default: false } },
    { names: ["RUN"] },
  );
  const runId = parseRunId(positionals[0]!);
  const run = await client().request("POST", `/api/runs/${runId}/cancel`, runSummarySchema);
  if (values.json) {
    writeJson(run);
    return 0;
  }
  const what = `Run ${oneLine(run.name, 80)} (${run.id})`;
  if (run.state === "cancelled") process.stdout.write(`${what}: cancelled.\n`);
  else if (run.cancelRequested) {
    process.stdout.write(`${what}: cancel requested; state ${run.state} until the host has stopped it.\n`);
  } else process.stdout.write(`${what}: ${run.state}.\n`);
  return 0;
}

async function watchCommand(args: string[]): Promise<number> {
  const { values, positionals } = parseCommandArgs(
    args,
    { poll: { type: "boolean", default: false } },
    { names: ["RUN"] },
  );
  const runId = parseRunId(positionals[0]!);
  const api = client();
  // Fails early and clearly for an unknown run or a refused token, before any output.
  await api.request("GET", `/api/runs/${runId}`, runDetailSchema);
  const result = await watchRun(api, runId, process.stdout, {
    live: !values.poll,
    onFallback: (reason) =>
      process.stderr.write(
        `sigmaflow runs watch: the live feed is not available (${oneLine(reason, 200)}); ` +
          "following the stored log over HTTP instead.\n",
      ),
  });
  if (result.kind === "output-closed") return 0;
  if (result.state === "done") return WATCH_EXIT_CODES.done;
  if (result.state === "failed") return WATCH_EXIT_CODES.failed;
  if (result.state === "cancelled") return WATCH_EXIT_CODES.cancelled;
  throw new CliError(`the run ended in the unexpected state ${result.state}.`);
}

/**
 * Entry point of `sigmaflow runs ...`.
 *
 * @param args - arguments after the group name (command first)
 * @returns the exit code; user errors are thrown as CliError
 */
export async function run(args: string[]): Promise<number> {
  if (args[0] === "--help" || args[0] === "-h" || args[0] === "help") {
    process.stdout.write(USAGE);
    return 0;
  }
  const split = splitCommand(args, COMMANDS, "runs");
  if (!split) return 0;
  if (split.rest.includes("--help") || split.rest.includes("-h")) {
    process.stdout.write(USAGE);
    return 0;
  }
  switch (split.command) {
    case "list":
      return listCommand(split.rest);
    case "show":
      return showCommand(split.rest);
    case "cancel":
      return cancelCommand(split.rest);
    default:
      return watchCommand(split.rest);
  }
}
