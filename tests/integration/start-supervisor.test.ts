/**
 * deploy/lib.sh's sf_supervise, which deploy/start.sh runs every service under: a service that exits is
 * started again after a back-off that doubles up to a ceiling and starts over after a run that lasted long
 * enough; each restart is announced on stdout and in the service's log; SIGTERM, and Ctrl-C (SIGINT to the
 * whole process group), stop the service and the supervisor without a restart. The back-off settings are
 * shortened here (1 s first, 2 s ceiling, reset after 2 s) so the expected delays are 1, 2, 2, then 1.
 */
import { type ChildProcess, spawn } from "node:child_process";
import { mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { waitFor } from "./support/wait-for";

const LIB = path.resolve(__dirname, "../../deploy/lib.sh");

/**
 * A service that crashes three times at once, then runs for 2.5 s and exits 4, then stays up; each run
 * writes its number and PID to the run file.
 */
const FLAKY_SERVICE = `
set -u
count=$(( $(cat "$RUNS_FILE.count" 2>/dev/null || echo 0) + 1 ))
echo "$count" > "$RUNS_FILE.count"
echo "run $count pid $$" >> "$RUNS_FILE"
echo "flaky run $count starting"
case "$count" in
  1|2|3) exit 3 ;;
  4) sleep 2.5; exit 4 ;;
  *) exec sleep 1000 ;;
esac
`;

/** What deploy/start.sh does around its services: supervise, wait, stop everything on a signal. */
const DRIVER = `
set -euo pipefail
source "$LIB"
trap 'sf_stop_all; exit 0' INT TERM
sf_supervise flaky "$SERVICE_LOG" bash "$SERVICE"
wait
`;

let dir: string;
let driver: ChildProcess | undefined;
let stdout = "";

/** The driver's output so far, for a wait that gives up. */
const driverOutput = { context: () => `stdout so far:\n${stdout}` };

async function runs(): Promise<Array<{ run: number; pid: number }>> {
  const text = await readFile(path.join(dir, "runs"), "utf8").catch(() => "");
  return [...text.matchAll(/run (\d+) pid (\d+)/g)].map((m) => ({ run: Number(m[1]), pid: Number(m[2]) }));
}

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

const restartLines = (text: string) => text.split("\n").filter((line) => line.includes("restarting in"));

async function startDriver() {
  await writeFile(path.join(dir, "flaky.sh"), FLAKY_SERVICE);
  await writeFile(path.join(dir, "driver.sh"), DRIVER);
  stdout = "";
  // Its own process group, so the test can send SIGINT to all of it as a terminal's Ctrl-C does.
  driver = spawn("bash", [path.join(dir, "driver.sh")], {
    detached: true,
    stdio: ["ignore", "pipe", "pipe"],
    env: {
      ...process.env,
      LIB,
      SERVICE: path.join(dir, "flaky.sh"),
      SERVICE_LOG: path.join(dir, "flaky.log"),
      RUNS_FILE: path.join(dir, "runs"),
      SF_RESTART_FIRST_DELAY_S: "1",
      SF_RESTART_MAX_DELAY_S: "2",
      SF_RESTART_RESET_AFTER_S: "2",
    },
  });
  driver.stdout!.on("data", (chunk) => {
    stdout += String(chunk);
  });
  driver.stderr!.on("data", (chunk) => {
    stdout += String(chunk);
  });
  const exited = new Promise<number | null>((resolve) => driver!.once("exit", (code) => resolve(code)));
  // The fifth run is the one that stays up.
  const steady = await waitFor(
    "the fifth run",
    async () => (await runs()).find((r) => r.run === 5),
    (run) => run !== undefined,
    driverOutput,
  );
  return { exited, steady };
}

beforeEach(async () => {
  dir = await mkdtemp(path.join(tmpdir(), "sf-supervisor-"));
});

afterEach(async () => {
  if (driver?.pid && driver.exitCode === null) process.kill(-driver.pid, "SIGKILL");
  for (const { pid } of await runs()) if (alive(pid)) process.kill(pid, "SIGKILL");
  await rm(dir, { recursive: true, force: true });
});

describe("sf_supervise (deploy/start.sh's services)", () => {
  // Regression: when one service exited, deploy/start.sh stopped every service it had started.
  it("restarts a crashed service with a doubling, capped, resetting back-off and says so on stdout and in its log", async () => {
    const { exited, steady } = await startDriver();
    expect(alive(steady.pid)).toBe(true);

    const announced = restartLines(stdout);
    expect(announced).toHaveLength(4);
    expect(announced[0]).toMatch(
      /flaky exited with status 3 after \ds; restarting in 1s \(at \d\d:\d\d:\d\d\)/,
    );
    expect(announced[1]).toMatch(/flaky exited with status 3 after \ds; restarting in 2s/);
    expect(announced[2]).toMatch(/flaky exited with status 3 after \ds; restarting in 2s/); // ceiling
    // The fourth run lasted ≥ 2 s (the reset threshold here), so the back-off starts again at 1 s.
    expect(announced[3]).toMatch(/flaky exited with status 4 after [2-9]s; restarting in 1s/);

    const log = await readFile(path.join(dir, "flaky.log"), "utf8");
    expect(restartLines(log)).toHaveLength(4);
    expect(log).toContain("flaky run 1 starting"); // the service's own output is kept across restarts
    expect(log).toContain("flaky run 5 starting");

    process.kill(driver!.pid!, "SIGTERM");
    expect(await exited).toBe(0);
    await waitFor(
      "the service to stop",
      () => alive(steady.pid),
      (live) => !live,
      {
        ...driverOutput,
        timeoutMs: 5_000,
      },
    );
    expect(restartLines(stdout)).toHaveLength(4); // stopping is not a crash
    expect((await runs()).length).toBe(5);
  }, 40_000);

  it("stops the service and itself on Ctrl-C (SIGINT to the process group) without restarting it", async () => {
    const { exited, steady } = await startDriver();
    process.kill(-driver!.pid!, "SIGINT");
    expect(await exited).toBe(0);
    await waitFor(
      "the service to stop",
      () => alive(steady.pid),
      (live) => !live,
      {
        ...driverOutput,
        timeoutMs: 5_000,
      },
    );
    expect(restartLines(stdout)).toHaveLength(4);
    expect((await runs()).length).toBe(5);
  }, 40_000);
});
