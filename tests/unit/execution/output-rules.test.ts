/**
 * Log lines read with a code's output rules (RE2 patterns) after Sigmaflow's stage markers. Expected
 * timings and progress are the numbers printed in the sample lines themselves.
 */
import { afterEach, describe, expect, it, vi } from "vitest";
import { outputRuleProblems } from "../../../server/execution/output-rule-checks";
import type { RunPlan } from "../../../server/execution/run-plan";
import {
  compileOutputRules,
  MAX_RULE_LINE_CHARS,
  parseLogLines,
  RULE_TIME_BUDGET_MS,
} from "../../../worker/logs/output-rules";
import { regExpSourcesRunDuring } from "./native-regexp";

function planWith(outputRules: { progress: string[]; timings: string[] }): RunPlan {
  return {
    scriptName: "job.sh",
    logName: "job.log",
    files: [],
    stages: [
      {
        index: 1,
        name: "inner",
        dir: "1-inner",
        codeId: "00000000-0000-4000-8000-000000000000",
        codeName: "inner",
        codeVersion: "1",
        outputFiles: [],
        outputRules,
      },
    ],
  };
}

const RULES = {
  timings: ["^symmetry (?<symmetry>\\S+) done in (?<seconds>[0-9.]+) s$"],
  progress: ["^progress (?<done>\\d+)/(?<total>\\d+)$"],
};
const START = "[sigmaflow] stage 1/1 inner: start 2024-01-01T00:00:00Z";

afterEach(() => {
  vi.restoreAllMocks();
});

describe("parseLogLines", () => {
  it("reads timings and progress after the stage marker", () => {
    const text = [START, "symmetry Ag done in 2.5 s", "progress 1/4"].join("\n");
    const result = parseLogLines(text, compileOutputRules(planWith(RULES)), null);
    expect(result).toEqual({
      timings: [{ stage: "inner", symmetry: "Ag", elapsedMs: 2500 }],
      progress: { stage: "inner", percent: 25, done: 1, total: 4 },
      stage: "inner",
      notes: [],
    });
  });

  // Regression: output rules ran on JavaScript's backtracking RegExp in the worker, so a rule such as
  // ^(a+)+$ cost the worker about 0.7 s of CPU on one 28-character line, doubling per character.
  it("matches a nested-quantifier rule against the longest line it reads without backtracking", () => {
    const plan = planWith({ timings: [], progress: ["^(a+)+$", RULES.progress[0]!] });
    const sources = regExpSourcesRunDuring(() =>
      parseLogLines([START, "aab"].join("\n"), compileOutputRules(plan), null),
    );
    expect(sources).not.toContain("^(a+)+$");
    const rules = compileOutputRules(plan);
    const text = [START, `${"a".repeat(MAX_RULE_LINE_CHARS - 1)}b`, "progress 2/2"].join("\n");
    expect(parseLogLines(text, rules, null).progress).toEqual({
      stage: "inner",
      percent: 100,
      done: 2,
      total: 2,
    });
  });

  it("leaves lines longer than the limit unmatched and says so", () => {
    const long = `progress 1/2 ${"x".repeat(MAX_RULE_LINE_CHARS)}`;
    const result = parseLogLines(
      [START, long, "progress 2/2"].join("\n"),
      compileOutputRules(planWith(RULES)),
      null,
    );
    expect(result.progress).toEqual({ stage: "inner", percent: 100, done: 2, total: 2 });
    expect(result.notes).toEqual([
      `1 line(s) longer than ${MAX_RULE_LINE_CHARS} characters were not matched against the output rules`,
    ]);
  });

  it("stops matching when the chunk's time budget is spent, but still follows stage markers", () => {
    let nowMs = 0;
    vi.spyOn(performance, "now").mockImplementation(() => nowMs);
    const rules = compileOutputRules(planWith(RULES));
    const lines = [START, "progress 1/4", "progress 2/4", "[sigmaflow] stage 1/1 inner: exit 0"];
    const original = rules.get("inner")!.progress[0]!;
    // The clock passes the budget while the first progress line is matched.
    vi.spyOn(original, "matchGroups").mockImplementation((line) => {
      nowMs += RULE_TIME_BUDGET_MS + 1;
      return /^progress (\d)\/(\d)$/.test(line) ? { done: line[9], total: line[11] } : null;
    });
    const result = parseLogLines(lines.join("\n"), rules, null);
    expect(result.progress).toEqual({ stage: "inner", percent: 25, done: 1, total: 4 });
    expect(result.stage).toBe("inner");
    expect(result.notes).toEqual([
      `output rules took longer than ${RULE_TIME_BUDGET_MS} ms; lines 3 to 4 of this chunk were not matched`,
    ]);
  });

  it("skips a stored rule RE2 cannot run and names it in the notes", () => {
    const rules = compileOutputRules(planWith({ timings: ["(a)\\1"], progress: RULES.progress }));
    const result = parseLogLines([START, "progress 1/2"].join("\n"), rules, null);
    expect(result.progress).toEqual({ stage: "inner", percent: 50, done: 1, total: 2 });
    expect(result.notes).toHaveLength(1);
    expect(result.notes[0]).toMatch(/^output rule "\(a\)\\\\1" of stage inner ignored: backreferences/);
  });
});

describe("outputRuleProblems", () => {
  it("names each rule RE2 cannot run with its path and the reason", () => {
    const problems = outputRuleProblems({ progress: ["ok (?<done>\\d+)", "a(?=b)"], timings: ["(x+)\\1"] });
    expect(problems.map((p) => p.path)).toEqual(["outputRules.progress.1", "outputRules.timings.0"]);
    expect(problems[0]!.message).toMatch(/^Not a usable pattern: lookahead .* RE2 syntax/);
    expect(problems[1]!.message).toMatch(/^Not a usable pattern: backreferences such as \\1/);
  });

  it("accepts RE2 spellings JavaScript lacks", () => {
    expect(
      outputRuleProblems({ progress: ["(?i)^progress (?P<done>\\d+)/(?P<total>\\d+)$"], timings: [] }),
    ).toEqual([]);
  });
});
