/**
 * How the poller carries a run's stage and progress from one log chunk to the next
 * (worker/logs/progress.ts with worker/logs/output-rules.ts). Chunk boundaries are chosen where a
 * poll can fall: between a stage's last progress line and the next stage's lines.
 */
import { describe, expect, it } from "vitest";
import type { RunPlan } from "../../../server/execution/run-plan";
import type { RunStageProgress } from "../../../shared/schemas/runs";
import { compileOutputRules, parseLogLines } from "../../../worker/logs/output-rules";
import { advanceProgress } from "../../../worker/logs/progress";

const stage = (index: number, name: string, timings: string, progress: string) => ({
  index,
  name,
  dir: `stage-${index}-${name}`,
  codeId: "00000000-0000-4000-8000-000000000000",
  codeName: name,
  codeVersion: "1",
  outputFiles: [],
  outputRules: { timings: [timings], progress: [progress] },
});
const plan: RunPlan = {
  scriptName: "job.sh",
  logName: "job.log",
  files: [],
  stages: [
    stage(
      1,
      "orbitals",
      "^symmetry (?<symmetry>\\S+) done in (?<seconds>[0-9.]+) s$",
      "^progress (?<done>\\d+)/(?<total>\\d+)$",
    ),
    stage(
      2,
      "inner",
      "^ IRREP (?<symmetry>\\S+) +TIME= +(?<seconds>[0-9.]+)$",
      "^ (?<percent>[0-9.]+)% complete$",
    ),
  ],
};
const rules = compileOutputRules(plan);

/** Follows the log chunk by chunk, as successive polls do. */
function follow(chunks: string[]) {
  let progress: RunStageProgress | null = null;
  const timings: { stage: string; symmetry: string }[] = [];
  for (const chunk of chunks) {
    const parsed = parseLogLines(chunk, rules, progress?.stage ?? null);
    progress = advanceProgress(progress, parsed);
    timings.push(...parsed.timings.map(({ stage, symmetry }) => ({ stage, symmetry })));
  }
  return { progress, timings };
}

describe("following a log across polls", () => {
  // Regression: the stage for the next poll was taken from the last progress line, so a chunk that ended
  // with stage 1's last progress line followed by stage 2's start marker had stage 2 read with stage 1's rules.
  it("reads each stage's lines with that stage's rules, whatever the last progress line said", () => {
    const { progress, timings } = follow([
      "[sigmaflow] stage 1/2 orbitals: start 1\n",
      "symmetry Ag done in 3.00 s\nprogress 1/2\n",
      "symmetry B1u done in 3.00 s\nprogress 2/2\n[sigmaflow] stage 1/2 orbitals: exit 0 7\n[sigmaflow] stage 2/2 inner: start 7\n",
      " IRREP B2u   TIME=   3.50\n",
      " 50% complete\n IRREP B3g   TIME=   3.50\n 100% complete\n[sigmaflow] stage 2/2 inner: exit 0 14\n",
    ]);
    expect(timings).toEqual([
      { stage: "orbitals", symmetry: "Ag" },
      { stage: "orbitals", symmetry: "B1u" },
      { stage: "inner", symmetry: "B2u" },
      { stage: "inner", symmetry: "B3g" },
    ]);
    expect(progress).toEqual({ stage: "inner", percent: 100 });
  });

  it("reports a new stage without the previous stage's numbers until it prints its own", () => {
    const { progress } = follow([
      "[sigmaflow] stage 1/2 orbitals: start 1\nprogress 2/2\n",
      "[sigmaflow] stage 1/2 orbitals: exit 0 2\n[sigmaflow] stage 2/2 inner: start 2\n",
    ]);
    expect(progress).toEqual({ stage: "inner" });
  });

  it("keeps a stage's last progress through chunks that carry none", () => {
    const { progress } = follow(["[sigmaflow] stage 1/2 orbitals: start 1\nprogress 1/2\n", "working\n"]);
    // 1 of 2 is 50 %.
    expect(progress).toEqual({ stage: "orbitals", done: 1, total: 2, percent: 50 });
  });

  it("has no progress before the first stage marker", () => {
    expect(follow(["module load kestrel-codes\n"]).progress).toBeNull();
  });
});
