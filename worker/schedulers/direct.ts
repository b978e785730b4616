/**
 * The direct scheduler: one detached process per run, for hosts without a batch system (a workstation,
 * the development fake cluster). The run folder is the job's whole record:
 *
 *   submit.lock/   made by the first submit (mkdir is atomic), so a repeated submit never starts a second process
 *   job.pid        the wrapper's pid, which is also the job's process group (setsid)
 *   job.started    epoch seconds when the script started
 *   job.ended      epoch seconds when it ended            (written before job.exit)
 *   job.exit       its exit status                        (the completion marker)
 *   job.cancelled  epoch seconds when a cancel was sent
 *   job.timedout   epoch seconds when the wall-time limit stopped it
 *
 * Every file is written to a temporary name and renamed, so a reader never sees half a value.
 */
import { RemoteCommandError, RemoteFileError } from "../ssh/errors";
import { commandLine, shellScript } from "../ssh/quote";
import { assertInside } from "../ssh/remote-fs";
import type { RemoteSession } from "../ssh/session";
import type { JobAccounting, JobRef, JobStatus, JobSubmission, SchedulerAdapter } from "./types";

/*
 * The wrapper runs in its own session and process group. It ignores HUP (no terminal will hang up on it)
 * and traps TERM with a no-op so that, when a cancel signals the group, it outlives the script long
 * enough to record the exit status; the script itself gets TERM's default action (traps reset on exec).
 * It first prints its pid on the pipe the submit reads and closes that pipe, so the submit returns at
 * once with the pid, with no polling; only then does it record its files.
 *
 * The wall-time limit is enforced on the host, as a batch scheduler does, so it holds while no worker
 * is watching: a timer subshell sleeps until the limit, records job.timedout and sends TERM to the
 * group; after the grace period it sends KILL to the group, which ends whatever is left (a code that
 * ignores TERM outlives the batch script that started it) and the wrapper too, so when the script is
 * still there the timer records job.ended and job.exit (128 + 9, as a shell reports a KILLed command)
 * first. The timer ignores TERM (its own at the limit, or a cancel's, which ends its sleep and so the
 * timer); the wrapper stops it with USR1 when the script ended within its limit, and it then kills its
 * sleep, so no sleeping process outlives the job. USR1 before the trap is set kills the timer (default
 * action) before it sleeps; `stop` covers one between starting a sleep and learning its pid. The sleep
 * is killed with KILL: until it execs, the child is a copy of the timer that would ignore TERM.
 * $1 = script, $2 = log, both relative to the run folder it starts in; $3 = wall-time limit and
 * $4 = grace period, in whole seconds.
 */
const WRAPPER = `
trap '' HUP
trap ':' TERM
echo $$
exec > /dev/null
date +%s.%N > job.started.tmp && mv -f job.started.tmp job.started
echo $$ > job.pid.tmp && mv -f job.pid.tmp job.pid
(
  s=; stop=0
  trap ':' TERM
  trap 'stop=1; [ -z "$s" ] || kill -KILL "$s" 2>/dev/null' USR1
  sleep "$3" & s=$!
  [ "$stop" = 0 ] || kill -KILL "$s" 2>/dev/null
  wait "$s" && [ "$stop" = 0 ] || exit 0
  s=
  [ -f job.exit ] && exit 0
  date +%s.%N > job.timedout.tmp && mv -f job.timedout.tmp job.timedout
  kill -TERM "-$$" 2>/dev/null
  sleep "$4" & s=$!
  [ "$stop" = 0 ] || kill -KILL "$s" 2>/dev/null
  wait "$s" && [ "$stop" = 0 ] || exit 0
  s=
  if [ ! -f job.exit ]; then
    date +%s.%N > job.ended.tmp && mv -f job.ended.tmp job.ended
    echo 137 > job.exit.tmp && mv -f job.exit.tmp job.exit
  fi
  kill -KILL "-$$" 2>/dev/null
) &
timer=$!
sh "$1" > "$2" 2>&1 < /dev/null
code=$?
[ -e job.timedout ] || kill -USR1 "$timer" 2>/dev/null
date +%s.%N > job.ended.tmp && mv -f job.ended.tmp job.ended
echo "$code" > job.exit.tmp && mv -f job.exit.tmp job.exit
`;

/** Seconds between TERM and KILL at the wall-time limit, unless a submission asks for another. */
export const WALL_TIME_GRACE_SECONDS = 10;

/** Every name the direct scheduler writes into a run folder (with its `.tmp` twin while writing). */
export const DIRECT_JOB_FILES = [
  "submit.lock",
  "job.pid",
  "job.started",
  "job.ended",
  "job.exit",
  "job.cancelled",
  "job.timedout",
] as const;

/*
 * $1 = run folder, $2 = script, $3 = log, $4 = wrapper text, $5 = wall-time limit and $6 = grace period
 * in seconds. Prints "new <pid>" or "existing <pid>".
 * The command substitution ends when the wrapper closes its stdout (it keeps running detached). A submit
 * that finds the lock taken waits, bounded (~5 s), for the first one's job.pid.
 */
const SUBMIT_SCRIPT = `
set -u
cd -- "$1" || exit 4
[ -f "$2" ] || { echo "no batch script $2 in $1" >&2; exit 4; }
if mkdir submit.lock 2>/dev/null; then
  pid=$(setsid sh -c "$4" sigmaflow-job "$2" "$3" "$5" "$6" < /dev/null 2> /dev/null &)
  case $pid in ''|*[!0-9]*) echo "the job did not start" >&2; exit 5 ;; esac
  echo "new $pid"
  exit 0
fi
i=0
while [ ! -s job.pid ]; do
  i=$((i + 1))
  [ "$i" -gt 100 ] && { echo "submit.lock exists but the job recorded no process id" >&2; exit 5; }
  sleep 0.05
done
read -r pid < job.pid
echo "existing $pid"
`;

/* $@ = run folders. One line per folder: index|pid|exit|alive|started|ended|cancelled|locked|timedout. */
const STATES_SCRIPT = `
i=0
for d in "$@"; do
  pid=; code=; alive=0; started=; ended=; cancelled=0; locked=0; timedout=0
  [ -f "$d/job.pid" ] && read -r pid < "$d/job.pid"
  case $pid in *[!0-9]*) pid= ;; esac
  # Alive is checked before the exit file is read: a job seen alive and then without an exit file is running.
  [ -n "$pid" ] && kill -0 "$pid" 2>/dev/null && alive=1
  [ -f "$d/job.exit" ] && read -r code < "$d/job.exit"
  [ -f "$d/job.started" ] && read -r started < "$d/job.started"
  [ -f "$d/job.ended" ] && read -r ended < "$d/job.ended"
  [ -e "$d/job.cancelled" ] && cancelled=1
  [ -d "$d/submit.lock" ] && locked=1
  [ -e "$d/job.timedout" ] && timedout=1
  printf '%s|%s|%s|%s|%s|%s|%s|%s|%s\\n' "$i" "$pid" "$code" "$alive" "$started" "$ended" "$cancelled" "$locked" "$timedout"
  i=$((i + 1))
done
`;

/*
 * $1 = run folder. TERM to the whole process group, then up to ~5 s for every process of the group to
 * end and be reaped (run from another session, `kill -0 -pgid` tells whether any is left: a code that
 * ignores TERM outlives the batch script and the wrapper), then KILL. Nothing to do for a job that
 * already ended or never started.
 */
const CANCEL_SCRIPT = `
cd -- "$1" || exit 0
[ -f job.exit ] && exit 0
[ -s job.pid ] || exit 0
read -r pid < job.pid
case $pid in ''|*[!0-9]*) echo "bad job.pid" >&2; exit 4 ;; esac
date +%s.%N > job.cancelled.tmp && mv -f job.cancelled.tmp job.cancelled
kill -TERM "-$pid" 2>/dev/null || exit 0
i=0
while kill -0 "-$pid" 2>/dev/null; do
  i=$((i + 1))
  if [ "$i" -gt 100 ]; then kill -KILL "-$pid" 2>/dev/null; break; fi
  sleep 0.05
done
`;

/** Epoch seconds as `date +%s.%N` prints them; a `date` without %N leaves "%N", which parseFloat ignores. */
function epochSeconds(text: string | undefined): number | null {
  if (!text) return null;
  const value = Number.parseFloat(text);
  return Number.isFinite(value) ? value : null;
}

function dateOf(seconds: number | null): Date | undefined {
  return seconds === null ? undefined : new Date(Math.round(seconds * 1000));
}

/** Turns one line of STATES_SCRIPT output into a status; exported for tests of each branch. */
export function directStatusOf(fields: string[]): { pid: string | null; status: JobStatus } {
  const [, pid = "", code = "", alive = "0", started, ended, cancelled = "0", locked = "0", timedout = "0"] =
    fields;
  const times = { startedAt: dateOf(epochSeconds(started)), endedAt: dateOf(epochSeconds(ended)) };
  const exitCode = /^\d+$/.test(code) ? Number(code) : null;
  const wasCancelled = cancelled === "1";
  // Stopped at the limit is a failure whatever the script's exit status, as Slurm's TIMEOUT is.
  const timedOut = !wasCancelled && timedout === "1";
  const stopped = wasCancelled ? "cancelled" : "failed";
  let status: JobStatus;
  if (exitCode !== null) {
    const state = exitCode === 0 && !wasCancelled && !timedOut ? "completed" : stopped;
    status = { state, exitCode, ...times, ...(timedOut ? { timedOut } : {}) };
  } else if (pid === "") {
    // Locked but no pid yet: a submit is starting it right now.
    status = { state: locked === "1" ? "pending" : "unknown", exitCode: null };
  } else if (alive === "1") {
    status = { state: "running", exitCode: null, ...times };
  } else {
    // Gone without an exit status: killed outright (after a cancel's grace period, or by someone else).
    status = { state: stopped, exitCode: null, ...times, ...(timedOut ? { timedOut } : {}) };
  }
  return { pid: pid === "" ? null : pid, status };
}

/** A job record file's first line; undefined when it does not exist (yet). */
async function readSmallFile(session: RemoteSession, remotePath: string): Promise<string | undefined> {
  try {
    return (await session.readFile(remotePath, 256)).toString("utf8").split("\n")[0];
  } catch (error) {
    if (error instanceof RemoteFileError && error.reason === "missing") return undefined;
    throw error;
  }
}

function checkNames(job: JobRef, extra: string[] = []): void {
  for (const name of [job.logName, ...extra]) assertInside(job.runDir, name);
}

export const directScheduler: SchedulerAdapter = {
  kind: "direct",

  async submit(session: RemoteSession, job: JobSubmission) {
    checkNames(job, [job.scriptName]);
    const limitSeconds = Math.max(1, Math.ceil(job.wallTimeMinutes * 60));
    const graceSeconds = Math.max(1, Math.ceil(job.wallTimeGraceSeconds ?? WALL_TIME_GRACE_SECONDS));
    const argv = shellScript(SUBMIT_SCRIPT, [
      job.runDir,
      job.scriptName,
      job.logName,
      WRAPPER,
      String(limitSeconds),
      String(graceSeconds),
    ]);
    const result = await session.exec(argv);
    const match = /^(new|existing) (\d+)$/m.exec(result.stdout.toString("utf8"));
    if (result.code !== 0 || !match) {
      throw new RemoteCommandError(
        commandLine(["sh", "-c", "<direct submit>", job.runDir]),
        result.code,
        result.stderr,
      );
    }
    return { jobId: match[2]!, alreadySubmitted: match[1] === "existing" };
  },

  async states(session: RemoteSession, jobs: JobRef[]) {
    const statuses = new Map<string, JobStatus>();
    if (jobs.length === 0) return statuses;
    const output = await session.run(
      shellScript(
        STATES_SCRIPT,
        jobs.map((job) => job.runDir),
      ),
    );
    for (const line of output.split("\n")) {
      const fields = line.split("|");
      const job = jobs[Number(fields[0])];
      if (!job || fields.length < 8) continue;
      const { pid, status } = directStatusOf(fields);
      statuses.set(job.jobId ?? pid ?? job.token, status);
    }
    return statuses;
  },

  async cancel(session: RemoteSession, job: JobRef) {
    await session.run(shellScript(CANCEL_SCRIPT, [job.runDir]));
  },

  async accounting(session: RemoteSession, job: JobRef, cores: number): Promise<JobAccounting | null> {
    // Read over SFTP: four small files cost the host less than one remote command.
    const [started, ended, cancelled, timedOut] = await Promise.all(
      ["job.started", "job.ended", "job.cancelled", "job.timedout"].map((name) =>
        readSmallFile(session, `${job.runDir}/${name}`),
      ),
    );
    const startedAt = epochSeconds(started);
    // A job killed after the cancel grace period never wrote job.ended: charge it up to the cancel.
    const endedAt = epochSeconds(ended) ?? epochSeconds(cancelled);
    if (startedAt === null || endedAt === null) return null;
    const elapsedSeconds = Math.max(0, endedAt - startedAt);
    return {
      elapsedSeconds,
      coreSeconds: elapsedSeconds * cores,
      timedOut: timedOut !== undefined && cancelled === undefined,
    };
  },
};
