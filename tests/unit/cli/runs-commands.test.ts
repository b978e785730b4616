/**
 * `sigmaflow runs list|show|cancel` against a fake HTTP API (node:http): what each sends, what it prints,
 * and the errors a researcher sees for a missing configuration, a refused token and refused requests.
 */

import type { AddressInfo } from "node:net";
import { createServer } from "node:net";
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import { run } from "../../../cli/commands/runs";
import { CliError } from "../../../cli/errors";
import {
  type FakeApi,
  GROUP_ID,
  me,
  membership,
  RUN_ID,
  runDetail,
  runSummary,
  startFakeApi,
  TOKEN,
} from "./runs-fake-api";

let api: FakeApi;
let stdout: string;
const savedEnv = { url: process.env.SIGMAFLOW_URL, token: process.env.SIGMAFLOW_TOKEN };

beforeAll(async () => {
  api = await startFakeApi();
});
afterAll(async () => {
  await api.close();
  process.env.SIGMAFLOW_URL = savedEnv.url;
  process.env.SIGMAFLOW_TOKEN = savedEnv.token;
  if (savedEnv.url === undefined) delete process.env.SIGMAFLOW_URL;
  if (savedEnv.token === undefined) delete process.env.SIGMAFLOW_TOKEN;
});
beforeEach(() => {
  api.routes.clear();
  api.requests.length = 0;
  process.env.SIGMAFLOW_URL = `${api.url}/`;
  process.env.SIGMAFLOW_TOKEN = TOKEN;
  stdout = "";
  vi.spyOn(process.stdout, "write").mockImplementation((chunk: string | Uint8Array) => {
    stdout += typeof chunk === "string" ? chunk : Buffer.from(chunk).toString("utf8");
    return true;
  });
});
afterEach(() => {
  vi.restoreAllMocks();
});

/** A port nothing listens on: one the system just handed out and that was closed again. */
async function freePort(): Promise<number> {
  const server = createServer();
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  const { port } = server.address() as AddressInfo;
  await new Promise((resolve) => server.close(resolve));
  return port;
}

/** The CliError a command throws (its message and exit code), or a failure if it succeeds. */
async function refusal(args: string[]): Promise<CliError> {
  const error = await run(args).then(
    () => null,
    (e: unknown) => e,
  );
  expect(error).toBeInstanceOf(CliError);
  return error as CliError;
}

describe("configuration and refusals", () => {
  it("names SIGMAFLOW_URL when it is missing and SIGMAFLOW_TOKEN when it is missing or not a token", async () => {
    delete process.env.SIGMAFLOW_URL;
    expect((await refusal(["list"])).message).toMatch(/^SIGMAFLOW_URL is not set/);
    process.env.SIGMAFLOW_URL = "ftp://example.org";
    expect((await refusal(["list"])).message).toMatch(/SIGMAFLOW_URL must start with http/);
    process.env.SIGMAFLOW_URL = api.url;
    delete process.env.SIGMAFLOW_TOKEN;
    const missing = await refusal(["list"]);
    expect(missing.message).toMatch(/^SIGMAFLOW_TOKEN is not set/);
    expect(missing.exitCode).toBe(2);
    process.env.SIGMAFLOW_TOKEN = "hunter2";
    expect((await refusal(["list"])).message).toMatch(/does not look like a Sigmaflow API token/);
    expect(api.requests).toEqual([]);
  });

  it("says the token was refused on a 401, with exit code 4", async () => {
    process.env.SIGMAFLOW_TOKEN = "sf_revoked";
    const error = await refusal(["show", RUN_ID]);
    expect(error.message).toBe("the token was refused (revoked or mistyped?): check SIGMAFLOW_TOKEN.");
    expect(error.exitCode).toBe(4);
    expect(api.requests[0]).toEqual({ line: `GET /api/runs/${RUN_ID}`, authorization: "Bearer sf_revoked" });
  });

  it("passes on the server's message for a 404 and names the server when it cannot be reached", async () => {
    const notFound = await refusal(["show", RUN_ID]);
    expect(notFound.message).toBe(`No route /api/runs/${RUN_ID}.`);
    const closedPort = await freePort();
    process.env.SIGMAFLOW_URL = `http://127.0.0.1:${closedPort}`;
    const unreachable = await refusal(["show", RUN_ID]);
    expect(unreachable.message).toBe(
      `cannot reach Sigmaflow at http://127.0.0.1:${closedPort} (ECONNREFUSED). ` +
        "Check SIGMAFLOW_URL and that the server is running.",
    );
    expect(unreachable.exitCode).toBe(4);
  });

  it("refuses a RUN that is not a run id before asking the server", async () => {
    expect((await refusal(["show", "water"])).message).toMatch(/RUN must be a run id/);
    expect(api.requests).toEqual([]);
  });

  it("says when the answer does not match the contract instead of printing half a run", async () => {
    api.routes.set(`GET /api/runs/${RUN_ID}`, () => ({ body: { ...runDetail(), state: "exploded" } }));
    expect((await refusal(["show", RUN_ID])).message).toMatch(/unexpected shape \(state:/);
  });
});

describe("runs list", () => {
  it("lists the runs of the token's only group as a table with name, state, target, created and id", async () => {
    api.routes.set("GET /api/me", () => ({ body: me([membership(GROUP_ID, "plasma", "Plasma chemistry")]) }));
    api.routes.set(`GET /api/groups/${GROUP_ID}/runs`, () => ({
      body: {
        runs: [
          runSummary(),
          runSummary({
            id: "9e8d7c6b-5a4f-4e3d-8c2b-1a0f9e8d7c6b",
            name: "no target \u001b[31mred",
            targetId: null,
            targetName: null,
            targetVersion: null,
            state: "done",
          }),
        ],
        total: 2,
        page: 1,
        pageSize: 50,
      },
    }));
    expect(await run(["list"])).toBe(0);
    expect(stdout.split("\n")).toEqual([
      "name                state    target    created               id",
      "------------------  -------  --------  --------------------  ------------------------------------",
      `water elastic       running  water v2  2026-12-05 01:02 UTC  ${RUN_ID}`,
      "no target ?[31mred  done     —         2026-12-05 01:02 UTC  9e8d7c6b-5a4f-4e3d-8c2b-1a0f9e8d7c6b",
      "",
    ]);
  });

  it("finds --group by slug among the memberships and passes --state and --limit; --json prints the list", async () => {
    api.routes.set("GET /api/me", () => ({
      body: me([membership(GROUP_ID, "plasma", "Plasma chemistry"), membership(RUN_ID, "astro", "Astro")]),
    }));
    api.routes.set(`GET /api/groups/${GROUP_ID}/runs`, () => ({
      body: { runs: [runSummary({ state: "failed" })], total: 1, page: 1, pageSize: 20 },
    }));
    expect(await run(["list", "--group", "PLASMA", "--state", "failed", "--limit", "20", "--json"])).toBe(0);
    expect(api.requests.map((r) => r.line)).toEqual([
      "GET /api/me",
      `GET /api/groups/${GROUP_ID}/runs?state=failed&limit=20`,
    ]);
    const printed = JSON.parse(stdout);
    expect(printed.groupId).toBe(GROUP_ID);
    expect(printed.runs.map((r: { state: string }) => r.state)).toEqual(["failed"]);
  });

  it("asks for --group when the token's user is in several groups, naming them", async () => {
    api.routes.set("GET /api/me", () => ({
      body: me([membership(GROUP_ID, "plasma", "Plasma chemistry"), membership(RUN_ID, "astro", "Astro")]),
    }));
    const error = await refusal(["list"]);
    expect(error.message).toBe(
      "you are a member of 2 groups (Plasma chemistry (plasma), Astro (astro)): pass --group ID|NAME.",
    );
  });

  it("refuses an unknown --state before asking the server", async () => {
    const error = await refusal(["list", "--state", "finished"]);
    expect(error.message).toMatch(/^--state must be one of queued, staging, .*held; got "finished"\.$/);
    expect(api.requests).toEqual([]);
  });

  it("says so when the group has no runs", async () => {
    api.routes.set(`GET /api/groups/${GROUP_ID}/runs`, () => ({
      body: { runs: [], total: 0, page: 1, pageSize: 50 },
    }));
    expect(await run(["list", "--group", GROUP_ID])).toBe(0);
    expect(stdout).toBe("No runs in this group yet.\n");
    expect(api.requests.map((r) => r.line)).toEqual([`GET /api/groups/${GROUP_ID}/runs`]);
  });
});

describe("runs show", () => {
  it("prints the summary, history, timings per symmetry, collected files and the results state", async () => {
    api.routes.set(`GET /api/runs/${RUN_ID}`, () => ({
      body: runDetail({
        state: "done",
        finishedAt: "2026-12-05T01:10:00.000Z",
        exitCode: 0,
        chargedCoreHours: 0.5,
        resultsState: "failed",
        resultsMessage: "results could not be derived: kmatrices.txt line 7: expected 4 values",
        events: [
          {
            at: "2026-12-05T01:02:03.000Z",
            fromState: null,
            toState: "queued",
            actor: "user",
            actorName: "Researcher",
            message: null,
          },
          {
            at: "2026-12-05T01:09:59.000Z",
            fromState: "collecting",
            toState: "done",
            actor: "worker",
            actorName: null,
            message: "collected 1 file",
          },
        ],
        timings: [{ stage: "scatter", symmetry: "B1", durationSeconds: 75.25 }],
        artifacts: [
          { id: GROUP_ID, stage: "scatter", name: "kmatrices.txt", sizeBytes: 2048, sha256: "ab".repeat(32) },
        ],
      }),
    }));
    expect(await run(["show", RUN_ID])).toBe(0);
    expect(stdout).toContain(`run:          water elastic (${RUN_ID})`);
    expect(stdout).toContain("state:        done\n");
    expect(stdout).toContain("core-hours:   2 reserved, 0.5 charged");
    expect(stdout).toContain(
      "results:      failed — results could not be derived: kmatrices.txt line 7: expected 4 values",
    );
    expect(stdout).toContain("2026-12-05 01:02 UTC  — → queued         Researcher\n");
    expect(stdout).toContain("2026-12-05 01:09 UTC  collecting → done  worker      collected 1 file");
    expect(stdout).toContain("scatter  B1        1 min 15.3 s");
    expect(stdout).toContain(`scatter  kmatrices.txt  2.0 KiB  ${"ab".repeat(8)}`);
  });

  it("--json prints the run as the API returns it", async () => {
    const detail = runDetail();
    api.routes.set(`GET /api/runs/${RUN_ID}`, () => ({ body: detail }));
    expect(await run(["show", RUN_ID, "--json"])).toBe(0);
    expect(JSON.parse(stdout)).toEqual(detail);
  });
});

describe("runs cancel", () => {
  it("posts the cancel and prints the state the server acknowledged", async () => {
    api.routes.set(`POST /api/runs/${RUN_ID}/cancel`, () => ({
      body: runSummary({ cancelRequested: true, cancelRequestedByName: "Researcher" }),
    }));
    expect(await run(["cancel", RUN_ID])).toBe(0);
    expect(stdout).toBe(
      `Run water elastic (${RUN_ID}): cancel requested; state running until the host has stopped it.\n`,
    );
    api.routes.set(`POST /api/runs/${RUN_ID}/cancel`, () => ({ body: runSummary({ state: "cancelled" }) }));
    stdout = "";
    expect(await run(["cancel", RUN_ID])).toBe(0);
    expect(stdout).toBe(`Run water elastic (${RUN_ID}): cancelled.\n`);
  });

  it("passes on a refusal (a finished run cannot be cancelled)", async () => {
    api.routes.set(`POST /api/runs/${RUN_ID}/cancel`, () => ({
      status: 409,
      body: { error: { code: "conflict", message: "The run is already done." } },
    }));
    const error = await refusal(["cancel", RUN_ID]);
    expect(error.message).toBe("The run is already done.");
    expect(error.exitCode).toBe(4);
  });
});
