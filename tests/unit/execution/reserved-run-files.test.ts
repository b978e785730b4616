/**
 * Regression: a code could name an input file `sigmaflow.args`, the file that carries each stage's
 * arguments, and so replace it. Every name Sigmaflow writes into a run folder is reserved
 * (shared/schemas/run-folder.ts); this checks the list against what the run plan and the
 * schedulers actually write, so a new file there cannot be forgotten.
 */
import { describe, expect, it } from "vitest";
import { buildRunPlan } from "../../../server/execution/run-plan";
import { codeDefinitionSchema } from "../../../shared/schemas/codes";
import { isReservedRunFileName } from "../../../shared/schemas/run-folder";
import { DIRECT_JOB_FILES } from "../../../worker/schedulers/direct";
import { SLURM_JOB_FILES } from "../../../worker/schedulers/slurm";

describe("names Sigmaflow reserves in run folders", () => {
  it("covers every file the run plan writes besides the code's own inputs", () => {
    const definition = codeDefinitionSchema.parse({
      name: "probe",
      version: "1.0",
      executable: "/bin/true",
      arguments: ["--fast"],
      inputTemplates: [{ fileName: "input.txt", format: "text", template: "x\n" }],
    });
    const plan = buildRunPlan("00000000-0000-0000-0000-000000000001", "probe", [
      { name: "one", codeId: "c1", definition, parameters: {} },
      { name: "two", codeId: "c1", definition, parameters: {} },
    ]);
    const ours = plan.files
      .map((file) => file.relativePath.split("/").at(-1)!)
      .filter((name) => name !== "input.txt");
    expect(ours.sort()).toEqual(["job.sh", "sigmaflow.args", "sigmaflow.args"]);
    for (const name of [...ours, plan.scriptName, plan.logName])
      expect(isReservedRunFileName(name)).toBe(true);
  });

  it("covers the job records of both schedulers and the temporary names they are written under", () => {
    for (const name of [...DIRECT_JOB_FILES, ...SLURM_JOB_FILES]) {
      expect(isReservedRunFileName(name), name).toBe(true);
      expect(isReservedRunFileName(`${name}.tmp`), `${name}.tmp`).toBe(true);
    }
  });

  it("leaves ordinary input names alone", () => {
    for (const name of ["input.txt", "job.inp", "sigmaflow.args.bak", "orbitals.dat"])
      expect(isReservedRunFileName(name), name).toBe(false);
  });
});
