/**
 * Slurm over SSH. The run's token is the job name, so a submit repeated after a crash finds the job by
 * name (squeue while Slurm remembers it, sacct afterwards) instead of submitting it twice; a `submit.lock`
 * folder in the run folder serialises two submits racing each other. States come from one `squeue` for
 * all of a host's jobs and one `sacct` for those squeue no longer shows (it forgets a job MinJobAge,
 * default 300 s, after it ends) or shows ended (only sacct has the exit code).
 *
 * Times are asked for as epoch seconds (SLURM_TIME_FORMAT=%s, see the squeue/sacct man pages), so the
 * host's time zone never enters.
 */
import { RemoteCommandError } from "../ssh/errors";
import { commandLine, shellScript } from "../ssh/quote";
import { assertInside } from "../ssh/remote-fs";
import type { RemoteSession } from "../ssh/session";
import type { JobAccounting, JobRef, JobState, JobStatus, JobSubmission, SchedulerAdapter } from "./types";

/** Every name this adapter writes into a run folder (with its `.tmp` twin while writing). */
export const SLURM_JOB_FILES = ["submit.lock", "job.id"] as const;

/** How far back sacct looks for a finished job by name (it defaults to since midnight without -j). */
const NAME_LOOKUP_WINDOW = "now-30days";

/*
 * $1 = token, $2 = run folder, then sbatch's options and the script. Prints "new <id>" or "existing <id>".
 */
const SUBMIT_SCRIPT = `
set -u
tok=$1; dir=$2; shift 2
me=$(id -un)
id=$(squeue -h -t all -u "$me" --name="$tok" -o %i 2>/dev/null | head -n 1)
[ -n "$id" ] || id=$(sacct -n -X -P -S ${NAME_LOOKUP_WINDOW} --name="$tok" -o JobID 2>/dev/null | head -n 1)
if [ -n "$id" ]; then echo "existing $id"; exit 0; fi
cd -- "$dir" || exit 4
if mkdir submit.lock 2>/dev/null; then
  out=$(sbatch --parsable --job-name="$tok" --chdir="$(pwd -P)" "$@") || exit 6
  id=\${out%%;*}
  echo "$id" > job.id.tmp && mv -f job.id.tmp job.id
  echo "new $id"
  exit 0
fi
# Another submit holds the lock: wait (bounded, ~10 s) for the id it records.
i=0
while [ ! -s job.id ]; do
  i=$((i + 1))
  [ "$i" -gt 200 ] && { echo "submit.lock exists but no job was recorded; remove $dir/submit.lock once no job named $tok exists" >&2; exit 5; }
  sleep 0.05
done
read -r id < job.id
echo "existing $id"
`;

const SQUEUE_NO_SUCH_JOB = /Invalid job id specified/;

/** Slurm job states (squeue/sacct man pages, "JOB STATE CODES") mapped onto ours. */
export function mapSlurmState(slurmState: string): JobState {
  const state = slurmState.trim().split(/\s+/)[0]!.replace(/\+$/, "");
  switch (state) {
    case "PENDING":
    case "CONFIGURING":
    case "REQUEUED":
    case "REQUEUE_HOLD":
    case "REQUEUE_FED":
    case "RESV_DEL_HOLD":
      return "pending";
    case "RUNNING":
    case "COMPLETING":
    case "SUSPENDED":
    case "STOPPED":
    case "SIGNALING":
    case "STAGE_OUT":
    case "RESIZING":
      return "running";
    case "COMPLETED":
      return "completed";
    case "FAILED":
    case "TIMEOUT":
    case "NODE_FAIL":
    case "OUT_OF_MEMORY":
    case "BOOT_FAIL":
    case "DEADLINE":
    case "PREEMPTED":
    case "SPECIAL_EXIT":
    case "REVOKED":
      return "failed";
    default:
      return state.startsWith("CANCELLED") ? "cancelled" : "unknown";
  }
}

/**
 * sacct's ExitCode "N:M": N is the script's exit status, M the signal that ended it. A job ended by a
 * signal is reported the way a shell reports it, 128 + M.
 */
export function parseExitCode(text: string): number | null {
  const match = /^(\d+):(\d+)$/.exec(text.trim());
  if (!match) return null;
  const status = Number(match[1]);
  const signal = Number(match[2]);
  return status === 0 && signal > 0 ? 128 + signal : status;
}

/** Slurm's own state for a job stopped at its time limit (squeue/sacct man pages, "JOB STATE CODES"). */
export function isSlurmTimeout(slurmState: string): boolean {
  return slurmState.trim().split(/\s+/)[0]!.replace(/\+$/, "") === "TIMEOUT";
}

function epochDate(text: string | undefined): Date | undefined {
  if (!text || !/^\d+$/.test(text.trim())) return undefined;
  return new Date(Number(text.trim()) * 1000);
}

function isTerminal(state: JobState): boolean {
  return state === "completed" || state === "failed" || state === "cancelled";
}

/** Parses `squeue -o %i|%T|%S` lines. */
export function parseSqueue(output: string): Map<string, { state: JobState; startedAt?: Date }> {
  const jobs = new Map<string, { state: JobState; startedAt?: Date }>();
  for (const line of output.split("\n")) {
    const [id, state, start] = line.trim().split("|");
    if (!id || !state) continue;
    const mapped = mapSlurmState(state);
    jobs.set(id, { state: mapped, startedAt: mapped === "pending" ? undefined : epochDate(start) });
  }
  return jobs;
}

/** Parses `sacct -n -X -P -o JobID,State,ExitCode,Start,End` lines; a requeued job's last row wins. */
export function parseSacct(output: string): Map<string, JobStatus> {
  const jobs = new Map<string, JobStatus>();
  for (const line of output.split("\n")) {
    const [id, state, exitCode, start, end] = line.trim().split("|");
    if (!id || !state) continue;
    const mapped = mapSlurmState(state);
    jobs.set(id, {
      state: mapped,
      exitCode: isTerminal(mapped) ? parseExitCode(exitCode ?? "") : null,
      startedAt: epochDate(start),
      endedAt: isTerminal(mapped) ? epochDate(end) : undefined,
      ...(isSlurmTimeout(state) ? { timedOut: true } : {}),
    });
  }
  return jobs;
}

function withTimeFormat(argv: string[]): string[] {
  return ["env", "SLURM_TIME_FORMAT=%s", ...argv];
}

export const slurmScheduler: SchedulerAdapter = {
  kind: "slurm",

  async submit(session: RemoteSession, job: JobSubmission) {
    assertInside(job.runDir, job.scriptName);
    assertInside(job.runDir, job.logName);
    const options = [
      `--output=${job.logName}`,
      `--error=${job.logName}`,
      "--ntasks=1",
      `--cpus-per-task=${Math.max(1, Math.trunc(job.cores))}`,
      `--time=${Math.max(1, Math.ceil(job.wallTimeMinutes))}`,
      ...(job.partition ? [`--partition=${job.partition}`] : []),
      ...(job.account ? [`--account=${job.account}`] : []),
      job.scriptName,
    ];
    const argv = shellScript(SUBMIT_SCRIPT, [job.token, job.runDir, ...options]);
    const result = await session.exec(argv);
    const match = /^(new|existing) (\d+)/m.exec(result.stdout.toString("utf8"));
    if (result.code !== 0 || !match) {
      throw new RemoteCommandError(commandLine(["sbatch", ...options]), result.code, result.stderr);
    }
    return { jobId: match[2]!, alreadySubmitted: match[1] === "existing" };
  },

  async states(session: RemoteSession, jobs: JobRef[]) {
    const statuses = new Map<string, JobStatus>();
    const ids = [
      ...new Set(jobs.map((job) => job.jobId).filter((id): id is string => !!id && /^\d+$/.test(id))),
    ];
    if (ids.length === 0) return statuses;

    const squeue = await session.exec(
      withTimeFormat(["squeue", "-h", "-t", "all", "-j", ids.join(","), "-o", "%i|%T|%S"]),
    );
    // squeue exits 1 with "Invalid job id specified" when it knows none of the ids.
    if (squeue.code !== 0 && !SQUEUE_NO_SUCH_JOB.test(squeue.stderr.toString("utf8"))) {
      throw new RemoteCommandError("squeue", squeue.code, squeue.stderr);
    }
    const live = squeue.code === 0 ? parseSqueue(squeue.stdout.toString("utf8")) : new Map();
    for (const [id, entry] of live) {
      if (!isTerminal(entry.state))
        statuses.set(id, { state: entry.state, exitCode: null, startedAt: entry.startedAt });
    }

    const ended = ids.filter((id) => !statuses.has(id));
    if (ended.length > 0) {
      const sacct = await session.exec(
        withTimeFormat([
          "sacct",
          "-n",
          "-X",
          "-P",
          "-j",
          ended.join(","),
          "-o",
          "JobID,State,ExitCode,Start,End",
        ]),
      );
      // Without accounting sacct fails; squeue's view (state without exit code) is then the best there is.
      const accounted =
        sacct.code === 0 ? parseSacct(sacct.stdout.toString("utf8")) : new Map<string, JobStatus>();
      for (const id of ended) {
        const fromSqueue = live.get(id);
        statuses.set(
          id,
          accounted.get(id) ??
            (fromSqueue
              ? { state: fromSqueue.state, exitCode: null, startedAt: fromSqueue.startedAt }
              : { state: "unknown", exitCode: null }),
        );
      }
    }
    return statuses;
  },

  async cancel(session: RemoteSession, job: JobRef) {
    // scancel exits 0 for a job that already ended; by name when the id was never recorded.
    if (job.jobId) await session.run(["scancel", job.jobId]);
    else await session.run(shellScript('scancel -u "$(id -un)" --name="$1"', [job.token]));
  },

  async accounting(session: RemoteSession, job: JobRef, cores: number): Promise<JobAccounting | null> {
    if (!job.jobId) return null;
    const result = await session.exec([
      "sacct",
      "-n",
      "-X",
      "-P",
      "-j",
      job.jobId,
      "-o",
      "JobID,ElapsedRaw,AllocCPUS,State",
    ]);
    if (result.code !== 0) return null;
    return parseSacctAccounting(result.stdout.toString("utf8"), job.jobId, cores);
  },
};

/**
 * Parses `sacct -n -X -P -o JobID,ElapsedRaw,AllocCPUS,State` for one job (a requeued job's last row
 * wins): core-seconds are ElapsedRaw × AllocCPUS, or × the requested cores when Slurm reports none.
 */
export function parseSacctAccounting(output: string, jobId: string, cores: number): JobAccounting | null {
  const row = output
    .split("\n")
    .map((line) => line.trim().split("|"))
    .filter(([id]) => id === jobId)
    .at(-1);
  if (!row) return null;
  const elapsedSeconds = Number(row[1]);
  const allocatedCpus = Number(row[2]);
  if (!Number.isFinite(elapsedSeconds)) return null;
  const cpus = Number.isFinite(allocatedCpus) && allocatedCpus > 0 ? allocatedCpus : cores;
  return { elapsedSeconds, coreSeconds: elapsedSeconds * cpus, timedOut: isSlurmTimeout(row[3] ?? "") };
}
