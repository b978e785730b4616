/**
 * Renders the demo code `hf-orbitals` (deploy/demo/codes/psi4-orbitals.ts) for a target with Sigmaflow's
 * own parameter check and template renderer, and runs Debian's psi4 on it in a fresh temporary folder, as
 * a host would run it.
 */
import { spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { type CodeDefinition, codeDefinitionSchema } from "@shared/schemas/codes";
import type { TargetTemplateContext } from "@shared/schemas/targets";
import { hfOrbitalsCode } from "../../../../deploy/demo/codes/psi4-orbitals";
import { validateParameters } from "../../../../server/execution/parameters";
import { renderCodeFiles } from "../../../../server/execution/templates/render";

export const PSI4 = "/usr/bin/psi4";
export const hfOrbitalsDefinition: CodeDefinition = codeDefinitionSchema.parse(hfOrbitalsCode);

export interface HfOrbitalsRun {
  inputDat: string;
  argv: string[];
  stdout: string;
  outputDat: string;
  orbitalsTxt: string;
  seconds: number;
}

/** Renders input.dat and the arguments for `parameters` (checked against the code's schema) and `target`. */
export function renderHfOrbitals(parameters: Record<string, unknown>, target: TargetTemplateContext) {
  const check = validateParameters(hfOrbitalsDefinition, parameters);
  if (!check.valid) throw new Error(`parameters refused: ${JSON.stringify(check.errors)}`);
  return renderCodeFiles(hfOrbitalsDefinition, check.parameters, target);
}

/**
 * Renders and runs psi4 (one thread, time limit `timeoutMs`) in a temporary folder removed afterwards.
 *
 * @throws Error with psi4's stderr and the tail of output.dat when psi4 fails or writes no orbitals.txt
 */
export function runHfOrbitals(
  parameters: Record<string, unknown>,
  target: TargetTemplateContext,
  timeoutMs = 120_000,
): HfOrbitalsRun {
  const rendered = renderHfOrbitals(parameters, target);
  const folder = mkdtempSync(join(tmpdir(), "sigmaflow-hf-orbitals-"));
  try {
    for (const file of rendered.files) writeFileSync(join(folder, file.fileName), file.content);
    const started = performance.now();
    const child = spawnSync(PSI4, rendered.argv, {
      cwd: folder,
      encoding: "utf8",
      env: { ...process.env, PSI_SCRATCH: folder, OMP_NUM_THREADS: "1" },
      timeout: timeoutMs,
      maxBuffer: 16 * 1024 * 1024,
    });
    const seconds = (performance.now() - started) / 1000;
    const read = (name: string) =>
      existsSync(join(folder, name)) ? readFileSync(join(folder, name), "utf8") : "";
    const outputDat = read("output.dat");
    const orbitalsTxt = read("orbitals.txt");
    if (child.status !== 0 || !orbitalsTxt) {
      throw new Error(
        `psi4 failed for ${target.name} (status ${child.status}${child.error ? `, ${child.error.message}` : ""}):\n` +
          `${child.stderr}\n${child.stdout}\n--- output.dat (end) ---\n${outputDat.slice(-4000)}`,
      );
    }
    return {
      inputDat: rendered.files[0]!.content,
      argv: rendered.argv,
      stdout: child.stdout,
      outputDat,
      orbitalsTxt,
      seconds,
    };
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
}
