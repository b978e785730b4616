/**
 * Every code definition the integration tests register comes from `codeDefinition`: one base definition
 * and the overrides a test needs, so fixtures cannot drift apart. Definitions only; registering them
 * through the API is `registerRecipe` in lifecycle-harness.ts.
 */
import { randomBytes } from "node:crypto";
import type { CodeDefinitionInput } from "../../../shared/schemas";

/** A code name no other test in the database uses. */
export const uniqueCodeName = (prefix = "code") => `${prefix}-${randomBytes(3).toString("hex")}`;

/**
 * A code that is registered but never run: a binary reading `input.txt` rendered from one required
 * parameter. Fields it leaves out (arguments, outputFiles, defaults…) take the contract's defaults.
 */
export function codeDefinition(overrides: Partial<CodeDefinitionInput> = {}): CodeDefinitionInput {
  return {
    name: uniqueCodeName(),
    version: "1.0",
    executable: "/opt/sigmaflow/bin/probe",
    inputTemplates: [{ fileName: "input.txt", format: "text", template: "molecule {{ molecule }}\n" }],
    parameters: { type: "object", properties: { molecule: { type: "string" } }, required: ["molecule"] },
    ...overrides,
  };
}

export type ShellCodeOverrides = Partial<CodeDefinitionInput> & {
  /** The script /bin/sh runs, as a template; `exit 0` unless given. */
  script?: string;
  /** How parameter values are escaped into the script; `text` unless given. */
  scriptFormat?: "text" | "shell";
};

/** A code that runs on a host: /bin/sh executes `run.sh`, rendered from `script`. No parameters unless given. */
export function shellCode({
  script = "exit 0\n",
  scriptFormat = "text",
  ...overrides
}: ShellCodeOverrides = {}) {
  return codeDefinition({
    executable: "/bin/sh",
    arguments: ["run.sh"],
    inputTemplates: [{ fileName: "run.sh", format: scriptFormat, template: script }],
    parameters: { type: "object", properties: {} },
    ...overrides,
  });
}

/** Per-symmetry timing and progress lines of the two-stage recipe's `prepare` code. */
const PREPARE_OUTPUT_RULES = {
  timings: ["^symmetry (?<symmetry>\\S+) done in (?<seconds>[0-9.]+) s$"],
  progress: ["^progress (?<done>\\d+)/(?<total>\\d+)$"],
};

export type TwoStageOptions = {
  /**
   * `prepare` first appends its process id to `prepare.starts` in the run folder: an append-only record
   * of how often the job really started there.
   */
  countStarts?: boolean;
  /**
   * `prepare` waits in 0.1 s steps, printing `tick <i>` each time, so the log grows during the run and
   * polls store it in pieces; `sleepSeconds` is then a whole number of seconds.
   */
  tick?: boolean;
};

/**
 * The codes of the engine tests' two-stage recipe. `prepare` prints the target label and four
 * per-symmetry timing lines, waits `sleepSeconds` (which keeps a run running for the fault tests),
 * writes orbitals.dat and a progress line, and renders notes.txt; `scatter` reads orbitals.dat, writes
 * kmatrix.dat and exits with `exitCode`.
 */
export function twoStageCodes(name: string, { countStarts = false, tick = false }: TwoStageOptions = {}) {
  const wait = tick
    ? [
        "i=0",
        "n=$(({{ sleepSeconds }} * 10))",
        'while [ "$i" -lt "$n" ]; do echo "tick $i"; sleep 0.1; i=$((i + 1)); done',
      ]
    : ["sleep {{ sleepSeconds }}"];
  const prepare = codeDefinition({
    name: `${name}-prepare`,
    executable: "/bin/sh",
    arguments: ["prepare.sh"],
    inputTemplates: [
      {
        fileName: "prepare.sh",
        format: "shell",
        template: [
          ...(countStarts ? ['echo "$$" >> ../prepare.starts'] : []),
          "label={{ label }}",
          'echo "target label: $label"',
          'for sym in A1 B1 B2 A2; do echo "symmetry $sym done in 0.25 s"; done',
          ...wait,
          'printf "%s\\n" "$label" > orbitals.dat',
          "echo progress 1/1",
        ].join("\n"),
      },
      { fileName: "notes.txt", format: "text", template: "label: {{ label }}\n" },
    ],
    parameters: {
      type: "object",
      properties: {
        label: { type: "string", maxLength: 5000 },
        sleepSeconds: { type: tick ? "integer" : "number", minimum: 0, maximum: 60, default: 0 },
      },
      required: ["label"],
      additionalProperties: false,
    },
    outputFiles: ["orbitals.dat"],
    outputRules: PREPARE_OUTPUT_RULES,
  });
  const scatter = codeDefinition({
    name: `${name}-scatter`,
    executable: "/bin/sh",
    arguments: ["scatter.sh"],
    inputTemplates: [
      {
        fileName: "scatter.sh",
        format: "shell",
        template: 'echo "K-matrix from $(cat orbitals.dat)" > kmatrix.dat\nexit {{ exitCode }}\n',
      },
    ],
    parameters: {
      type: "object",
      properties: { exitCode: { type: "integer", minimum: 0, maximum: 255, default: 0 } },
      additionalProperties: false,
    },
    outputFiles: ["kmatrix.dat"],
  });
  return { prepare, scatter };
}
