/**
 * Patterns written by one group member run inside Sigmaflow: template regex literals and parameter
 * schema patterns in the server when a run is created, output rules in the worker while a log is
 * followed. None may stall the event loop for everyone: while a run with a hostile pattern is created
 * or followed, /api/health keeps answering. The server and the worker share this process here, so a
 * stalled loop shows as a long gap between consecutive health answers. Patterns RE2 cannot run are
 * refused when the code is registered, with a message naming RE2 syntax.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { type ShellCodeOverrides, shellCode } from "./support/code-fixtures";
import {
  type EngineScenario,
  registerRecipe,
  runSpec,
  type Sigmaflow,
  startEngineScenario,
  waitForState,
} from "./support/lifecycle-harness";
import { tokenFor } from "./support/people";
import type { TestDatabase } from "./support/test-database";

/** Longest gap between two health answers a person would not notice as the service hanging. */
const HEALTH_GAP_LIMIT_MS = 200;
/**
 * Against ^(a+)+$, a backtracking engine tries about 2^27 ways to split these 28 characters before
 * failing: seconds of CPU, doubling per extra "a". RE2 reads them once.
 */
const HOSTILE_VALUE = `${"a".repeat(27)}b`;
const CATASTROPHIC = "^(a+)+$";
/** A backreference: fine for JavaScript's RegExp, impossible in linear time, so not RE2 syntax. */
const BACKREFERENCE = "^(a+)\\1$";

let scenario: EngineScenario;
let database: TestDatabase;
let sf: Sigmaflow;
let hostId: string;

beforeAll(async () => {
  scenario = await startEngineScenario("hostile_patterns");
  ({ database, sf, hostId } = scenario);
}, 60_000);

afterAll(async () => {
  await scenario?.close();
});

/** Asks /api/health back to back until `work` settles; the longest time between two answers. */
async function healthGapsDuring<T>(work: Promise<T>): Promise<{ result: T; longestGapMs: number }> {
  let settled = false;
  const finished = work.finally(() => {
    settled = true;
  });
  let longestGapMs = 0;
  let last = performance.now();
  do {
    const response = await fetch(`${sf.app.baseUrl}/api/health`);
    expect(response.status).toBe(200);
    await response.arrayBuffer();
    const now = performance.now();
    longestGapMs = Math.max(longestGapMs, now - last);
    last = now;
  } while (!settled);
  return { result: await finished, longestGapMs };
}

/** Registers a code run by /bin/sh from a rendered run.sh (code-fixtures.ts); `extra` overrides fields. */
function registerShellCode(name: string, extra: ShellCodeOverrides) {
  return sf.api("POST", `/api/groups/${sf.groupId}/codes`, shellCode({ name, ...extra }));
}

function oneStageRecipe(name: string, extra: ShellCodeOverrides) {
  return registerRecipe(sf, name, [{ name: "main", code: shellCode({ name, ...extra }) }]);
}

const createRun = (recipeId: string, parameters: Record<string, unknown>) =>
  sf.api("POST", `/api/groups/${sf.groupId}/runs`, runSpec(recipeId, hostId, { main: parameters }));

describe("a template regex", () => {
  // Regression: a template filter with ^(a+)+$ and a 29-character value held /api/health for 9.7 s
  // while the run was created (its files are rendered then).
  it("with nested quantifiers renders while /api/health keeps answering", async () => {
    const recipeId = await oneStageRecipe("template-regex", {
      inputTemplates: [
        { fileName: "run.sh", format: "text", template: "exit 0\n" },
        { fileName: "label.txt", format: "text", template: `{{ label | replace(r/${CATASTROPHIC}/, "x") }}` },
      ],
      parameters: { type: "object", properties: { label: { type: "string" } }, required: ["label"] },
    });
    const { result, longestGapMs } = await healthGapsDuring(createRun(recipeId, { label: HOSTILE_VALUE }));
    expect(result.status, JSON.stringify(result.body)).toBe(201);
    expect(longestGapMs).toBeLessThan(HEALTH_GAP_LIMIT_MS);
    const run = await waitForState(sf, result.body.id, ["done", "failed"]);
    expect(run.state, run.stateMessage).toBe("done");
  });

  it("that RE2 cannot run is refused when the code is registered", async () => {
    const refused = await registerShellCode("template-backreference", {
      inputTemplates: [
        { fileName: "run.sh", format: "text", template: `{{ "aa" | replace(r/${BACKREFERENCE}/, "x") }}` },
      ],
    });
    expect(refused.status).toBe(422);
    expect(refused.body.error.code).toBe("invalid_code_definition");
    expect(refused.body.error.message).toMatch(
      /^The code definition cannot be used: inputTemplates\.0\.template: run\.sh, line 1: the pattern r\/.*backreferences such as \\1 are not supported\. Sigmaflow's patterns are RE2 syntax/,
    );
  });
});

describe("a parameter schema pattern", () => {
  // Regression: Ajv tested `pattern` with JavaScript's RegExp, so a 28-character value held the server
  // for seconds while the run request was validated.
  it("with nested quantifiers refuses a value while /api/health keeps answering", async () => {
    const recipeId = await oneStageRecipe("schema-pattern", {
      parameters: {
        type: "object",
        properties: { label: { type: "string", pattern: CATASTROPHIC } },
        required: ["label"],
      },
    });
    const { result, longestGapMs } = await healthGapsDuring(createRun(recipeId, { label: HOSTILE_VALUE }));
    expect(result.status).toBe(422);
    expect(result.body.error).toEqual({
      code: "validation_failed",
      message: `The parameters do not fit the codes' declarations: spec.parameters.main.label: must match pattern "${CATASTROPHIC}"`,
      details: [{ path: "spec.parameters.main.label", message: `must match pattern "${CATASTROPHIC}"` }],
    });
    expect(longestGapMs).toBeLessThan(HEALTH_GAP_LIMIT_MS);
  });

  it("that RE2 cannot run is refused when the code is registered", async () => {
    const refused = await registerShellCode("schema-backreference", {
      parameters: { type: "object", properties: { label: { type: "string", pattern: BACKREFERENCE } } },
    });
    expect(refused.status).toBe(422);
    expect(refused.body.error.details).toEqual([
      {
        path: "parameters",
        message: expect.stringMatching(
          /^The parameters schema has a pattern Sigmaflow cannot use, "\^\(a\+\)\\\\1\$": backreferences .* RE2 syntax/,
        ),
      },
    ]);
  });
});

describe("an output rule", () => {
  // Regression: the worker matched output rules with JavaScript's RegExp; ^(a+)+$ cost it about 0.7 s of
  // CPU on one 28-character log line, doubling per character, while every poll waited.
  it("with nested quantifiers reads the log while /api/health keeps answering", async () => {
    const recipeId = await oneStageRecipe("output-rule", {
      inputTemplates: [
        { fileName: "run.sh", format: "text", template: `echo ${HOSTILE_VALUE}\necho progress 1/1\n` },
      ],
      outputRules: { progress: [CATASTROPHIC, "^progress (?<done>\\d+)/(?<total>\\d+)$"], timings: [] },
    });
    const created = await createRun(recipeId, {});
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const { result: run, longestGapMs } = await healthGapsDuring(
      waitForState(sf, created.body.id, ["done", "failed"]),
    );
    expect(run.state, run.stateMessage).toBe("done");
    // The line after the hostile one was still read with the rules.
    expect(run.progress).toMatchObject({ stage: "main", done: 1, total: 1, percent: 100 });
    expect(longestGapMs).toBeLessThan(HEALTH_GAP_LIMIT_MS);
  });

  it("that RE2 cannot run is refused when the code is registered", async () => {
    const refused = await registerShellCode("output-rule-backreference", {
      outputRules: { progress: [BACKREFERENCE], timings: [] },
    });
    expect(refused.status).toBe(422);
    expect(refused.body.error.details).toEqual([
      {
        path: "outputRules.progress.0",
        message: expect.stringMatching(/^Not a usable pattern: backreferences such as \\1 .* RE2 syntax/),
      },
    ]);
  });
});

describe("deeply nested JSON", () => {
  /** `{"a":{"a":…1…}}` as text: serialising such a value in this process would overflow its own stack. */
  const nestedJson = (levels: number) => `${'{"a":'.repeat(levels)}1${"}".repeat(levels)}`;

  /** Sends `body` with "DEEP" (quoted) replaced by the nested text, as a script of a researcher would. */
  async function postWithDeepValue(path: string, body: unknown) {
    const text = JSON.stringify(body).replace('"DEEP"', nestedJson(5000));
    const response = await fetch(`${sf.app.baseUrl}${path}`, {
      method: "POST",
      headers: {
        authorization: `Bearer ${await tokenFor(database.db, sf.researcher)}`,
        "content-type": "application/json",
      },
      body: text,
    });
    return { status: response.status, body: await response.json() };
  }

  // Regression: parameters nested 5000 levels deep passed the contract and overflowed the stack in the
  // recursive walks after it: a 500 (RangeError: Maximum call stack size exceeded).
  it("in a run's parameters is refused with a 422 stating the limit", async () => {
    const recipeId = await oneStageRecipe("deep-parameters", {});
    const refused = await postWithDeepValue(
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { main: { p: "DEEP" } }),
    );
    expect(refused.status).toBe(422);
    expect(refused.body.error.code).toBe("validation_failed");
    expect(refused.body.error.message).toMatch(
      /^The request body is invalid: spec\.parameters\.main\.p(\.a)+ is nested more than 32 levels deep; objects and arrays may nest at most 32 levels\.$/,
    );
  });

  it("in a code's parameter schema is refused with a 422 stating the limit", async () => {
    const refused = await postWithDeepValue(`/api/groups/${sf.groupId}/codes`, {
      name: "deep-schema",
      version: "1.0",
      executable: "/bin/sh",
      parameters: { type: "object", properties: { p: "DEEP" } },
    });
    expect(refused.status).toBe(422);
    expect(refused.body.error.message).toMatch(
      /^The request body is invalid: parameters\.properties\.p(\.a)+ is nested more than 32 levels deep/,
    );
  });
});
