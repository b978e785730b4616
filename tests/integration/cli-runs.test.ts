/**
 * `sigmaflow runs watch` against the real server and worker: the command runs as a child process (as a
 * researcher would start it) while a shell-code run prints lines with multi-byte UTF-8, bytes that are not
 * UTF-8 at all, a carriage return and an ANSI colour. Its stdout must be the run's stored log byte for byte
 * (`GET /api/runs/:id/log/raw`), whether it follows the live feed or (`--poll`) the stored log over HTTP,
 * and its exit code must say how the run ended: 0 done, 1 failed, 3 cancelled. `runs list`, `show` and `cancel` go through the same API with the same token.
 */
import { spawn } from "node:child_process";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { shellCode } from "./support/code-fixtures";
import {
  type EngineScenario,
  registerRecipe,
  runSpec,
  startEngineScenario,
  waitForState,
} from "./support/lifecycle-harness";
import { tokenFor } from "./support/people";

const root = fileURLToPath(new URL("../..", import.meta.url));

/**
 * Prints known bytes with pauses, so the log is stored over several polls while `watch` follows it.
 * Octal escapes of POSIX printf: \303\251 é, \316\261 α, \342\202\254 €; \377 \376 \200 are not UTF-8 and
 * \316 alone is a truncated sequence.
 */
const SCRIPT = [
  "printf 'start\\n'",
  "printf 'caf\\303\\251 \\316\\261\\316\\262 \\342\\202\\254\\n'",
  "sleep 0.4",
  "printf 'invalid: \\377\\376 lone: \\200 cut: \\316\\n'",
  "sleep 0.4",
  "printf 'colour: \\033[32mgreen\\033[0m\\r\\n'",
  "i=0",
  'while [ "$i" -lt {{ ticks }} ]; do printf \'tick %d \\316\\261\\n\' "$i"; sleep 0.3; i=$((i + 1)); done',
  "exit {{ exitCode }}",
  "",
].join("\n");

/** Lines of the script as the bytes the job writes. */
const UTF8_LINE = Buffer.from("café αβ €\n", "utf8");
const INVALID_LINE = Buffer.concat([
  Buffer.from("invalid: "),
  Buffer.from([0xff, 0xfe]),
  Buffer.from(" lone: "),
  Buffer.from([0x80]),
  Buffer.from(" cut: "),
  Buffer.from([0xce, 0x0a]),
]);
const COLOUR_LINE = Buffer.from("colour: \u001b[32mgreen\u001b[0m\r\n");

let scenario: EngineScenario;
let recipeId: string;
let token: string;

beforeAll(async () => {
  scenario = await startEngineScenario("cli-runs");
  recipeId = await registerRecipe(scenario.sf, "cli-log", [
    {
      name: "print",
      code: shellCode({
        name: `cli-log-${Date.now()}`,
        script: SCRIPT,
        parameters: {
          type: "object",
          properties: {
            ticks: { type: "integer", minimum: 0, maximum: 200, default: 4 },
            exitCode: { type: "integer", minimum: 0, maximum: 255, default: 0 },
          },
          additionalProperties: false,
        },
      }),
    },
  ]);
  token = await tokenFor(scenario.database.db, scenario.sf.researcher);
}, 120_000);

afterAll(async () => {
  await scenario?.close();
});

type CliResult = { code: number | null; stdout: Buffer; stderr: string };

/** Starts `sigmaflow <args>` as a child process with the server's address and the researcher's token. */
function sigmaflow(args: string[], onStdout?: (data: Buffer) => void): Promise<CliResult> {
  const child = spawn(process.execPath, ["bin/sigmaflow.mjs", ...args], {
    cwd: root,
    env: { ...process.env, SIGMAFLOW_URL: scenario.sf.app.baseUrl, SIGMAFLOW_TOKEN: token },
    stdio: ["ignore", "pipe", "pipe"],
  });
  const stdout: Buffer[] = [];
  let stderr = "";
  child.stdout.on("data", (data: Buffer) => {
    stdout.push(data);
    onStdout?.(data);
  });
  child.stderr.on("data", (data: Buffer) => {
    stderr += data.toString("utf8");
  });
  return new Promise((resolve) =>
    child.on("close", (code) => resolve({ code, stdout: Buffer.concat(stdout), stderr })),
  );
}

async function createRun(parameters: Record<string, unknown>, name: string): Promise<string> {
  const created = await scenario.sf.api(
    "POST",
    `/api/groups/${scenario.sf.groupId}/runs`,
    runSpec(recipeId, scenario.hostId, { print: parameters }, name),
  );
  expect(created.status, JSON.stringify(created.body)).toBe(201);
  return created.body.id as string;
}

/** The run's whole stored log as bytes. */
async function rawLog(runId: string): Promise<Buffer> {
  const response = await fetch(`${scenario.sf.app.baseUrl}/api/runs/${runId}/log/raw`, {
    headers: { authorization: `Bearer ${token}` },
  });
  expect(response.status).toBe(200);
  return Buffer.from(await response.arrayBuffer());
}

describe("sigmaflow runs watch with the real server", { timeout: 120_000 }, () => {
  it("writes the log of running runs byte for byte and exits 0 for done, 1 for failed, 3 for cancelled", async () => {
    const doneId = await createRun({ ticks: 4, exitCode: 0 }, "cli watch done");
    const failedId = await createRun({ ticks: 2, exitCode: 1 }, "cli watch failed");
    const cancelledId = await createRun({ ticks: 200, exitCode: 0 }, "cli watch cancelled");

    let cancelAsked: Promise<CliResult> | null = null;
    let seen = Buffer.alloc(0);
    const [done, failed, cancelled] = await Promise.all([
      sigmaflow(["runs", "watch", doneId]),
      // Over HTTP only: the stored log polled once a second.
      sigmaflow(["runs", "watch", "--poll", failedId]),
      sigmaflow(["runs", "watch", cancelledId], (data) => {
        // Cancel once the watch has shown the first tick: the run is running and its log is live.
        seen = Buffer.concat([seen, data]);
        if (!cancelAsked && seen.includes("tick 0")) cancelAsked = sigmaflow(["runs", "cancel", cancelledId]);
      }),
    ]);

    // Nothing on stderr: the live feed carried the log (a fall-back to HTTP is announced there).
    expect(done.stderr).toBe("");
    expect(done.code).toBe(0);
    expect(done.stdout.equals(await rawLog(doneId))).toBe(true);
    // Independent of the server's storage: the bytes the script wrote are there unchanged.
    for (const line of [UTF8_LINE, INVALID_LINE, COLOUR_LINE, Buffer.from("tick 3 \u03b1\n")]) {
      expect(done.stdout.includes(line), JSON.stringify(line.toString("latin1"))).toBe(true);
    }

    expect(failed.stderr).toBe("");
    expect(failed.code).toBe(1);
    expect(failed.stdout.equals(await rawLog(failedId))).toBe(true);
    expect((await waitForState(scenario.sf, failedId, ["failed"])).state).toBe("failed");

    expect(cancelAsked).not.toBeNull();
    const cancel = await cancelAsked!;
    expect(cancel.code).toBe(0);
    expect(cancel.stdout.toString()).toMatch(
      /^Run cli watch cancelled \([0-9a-f-]{36}\): (cancel requested|cancelled)/,
    );
    expect(cancelled.stderr).toBe("");
    expect(cancelled.code).toBe(3);
    expect(cancelled.stdout.equals(await rawLog(cancelledId))).toBe(true);
    expect(cancelled.stdout.includes(INVALID_LINE)).toBe(true);
    // Cancelled long before its 200 ticks.
    expect(cancelled.stdout.includes("tick 199")).toBe(false);

    // A finished run: the whole log again from the start, then the exit code at once.
    const replay = await sigmaflow(["runs", "watch", doneId]);
    expect(replay.stderr).toBe("");
    expect(replay.code).toBe(0);
    expect(replay.stdout.equals(done.stdout)).toBe(true);

    // The same token lists the group's runs and shows one.
    const list = await sigmaflow(["runs", "list", "--json"]);
    expect(list.code, list.stderr).toBe(0);
    const listed = JSON.parse(list.stdout.toString()) as { runs: { id: string; state: string }[] };
    expect(Object.fromEntries(listed.runs.map((r) => [r.id, r.state]))).toMatchObject({
      [doneId]: "done",
      [failedId]: "failed",
      [cancelledId]: "cancelled",
    });
    const show = await sigmaflow(["runs", "show", doneId]);
    expect(show.code, show.stderr).toBe(0);
    expect(show.stdout.toString()).toMatch(/^state: {8}done — /m);
    expect(show.stdout.toString()).toMatch(/running → collecting/);
  });

  it("says the token was refused when it is not a live token", async () => {
    const child = spawn(process.execPath, ["bin/sigmaflow.mjs", "runs", "list"], {
      cwd: root,
      env: { ...process.env, SIGMAFLOW_URL: scenario.sf.app.baseUrl, SIGMAFLOW_TOKEN: "sf_not-a-real-token" },
      stdio: ["ignore", "pipe", "pipe"],
    });
    let stderr = "";
    child.stderr.on("data", (data: Buffer) => {
      stderr += data.toString();
    });
    const code = await new Promise((resolve) => child.on("close", resolve));
    expect(code).toBe(4);
    expect(stderr).toBe(
      "sigmaflow runs: the token was refused (revoked or mistyped?): check SIGMAFLOW_TOKEN.\n",
    );
  });
});
