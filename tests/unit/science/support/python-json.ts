/**
 * Runs a Python helper script with Debian's python3: one JSON request on stdin, one JSON document on
 * stdout. The script runs in a fresh temporary working folder, removed afterwards, so that files a
 * reference program writes into its working folder (psi4 writes timer.dat) never land in the repository.
 */
import { spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";

const PYTHON = existsSync("/usr/bin/python3") ? "/usr/bin/python3" : "python3";

export interface PythonJsonOptions {
  /** Folders prepended to PYTHONPATH. */
  pythonPath?: readonly string[];
  /** Appended to the error message when the script fails, e.g. how to install what it needs. */
  installHint?: string;
}

/**
 * Runs `script` with `request` as JSON on stdin and parses its stdout as JSON.
 *
 * @param script - absolute path of the Python script
 * @param request - value sent as JSON on stdin
 * @param options - extra PYTHONPATH folders and a hint for the failure message
 * @returns the parsed stdout
 * @throws Error with the script's stderr when it exits with a non-zero status
 */
export function runPythonJson(script: string, request: unknown, options: PythonJsonOptions = {}): unknown {
  const env = {
    ...process.env,
    PYTHONPATH: [...(options.pythonPath ?? []), process.env.PYTHONPATH].filter(Boolean).join(":"),
  };
  const workingFolder = mkdtempSync(join(tmpdir(), "sigmaflow-python-"));
  try {
    const child = spawnSync(PYTHON, [script], {
      cwd: workingFolder,
      input: JSON.stringify(request),
      encoding: "utf8",
      env,
      maxBuffer: 64 * 1024 * 1024,
      timeout: 300_000,
    });
    if (child.status !== 0) {
      throw new Error(
        `${PYTHON} ${script} failed (status ${child.status}): ${child.stderr || child.error?.message}` +
          (options.installHint ? `\n${options.installHint}` : ""),
      );
    }
    return JSON.parse(child.stdout);
  } finally {
    rmSync(workingFolder, { recursive: true, force: true });
  }
}
