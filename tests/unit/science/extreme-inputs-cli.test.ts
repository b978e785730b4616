/**
 * The command line at extreme inputs (run as a child process, as a user would): a finite result with
 * status 0, or a message on stderr with a non-zero status and nothing on stdout; never `null`, `NaN` or
 * `Infinity` in the JSON or the text.
 */
import { execFile } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, describe, expect, it } from "vitest";
import { CliError } from "../../../cli/errors";
import { assertFiniteResult, NON_FINITE_RESULT_EXIT_CODE } from "../../../cli/lib/finite-output";

const root = fileURLToPath(new URL("../../..", import.meta.url));
const folder = mkdtempSync(join(tmpdir(), "sigmaflow-extreme-"));
afterAll(() => rmSync(folder, { recursive: true, force: true }));

function inputFile(name: string, contents: string): string {
  const path = join(folder, name);
  writeFileSync(path, contents);
  return path;
}

function sigmaflow(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  return new Promise((resolve) => {
    execFile(
      "node",
      ["bin/sigmaflow.mjs", ...args],
      { cwd: root, timeout: 60_000 },
      (error, stdout, stderr) => {
        const code = error ? (typeof error.code === "number" ? error.code : -1) : 0;
        resolve({ code, stdout, stderr });
      },
    );
  });
}

/** Every number in a parsed JSON document, depth first. */
function numbersIn(value: unknown): unknown[] {
  if (Array.isArray(value)) return value.flatMap(numbersIn);
  if (value !== null && typeof value === "object") return Object.values(value).flatMap(numbersIn);
  return [value];
}

const NOT_A_NUMBER = /\bnull\b|NaN|Infinity/;

describe("sigmaflow at extreme inputs (regression: extreme inputs must not print null)", {
  timeout: 60_000,
}, () => {
  it("target inspect refuses coordinates of 1e200 Å with status 2 in JSON and text mode", async () => {
    const path = inputFile("far.xyz", "3\nwater\nO 0 0 1e200\nH 0 1e200 0\nH 1e200 0 0\n");
    for (const mode of [["--json"], []]) {
      const run = await sigmaflow(["target", "inspect", path, ...mode]);
      expect(run.code).toBe(2);
      expect(run.stdout).toBe("");
      expect(run.stderr).toMatch(/Line 3: z coordinate 1e200 Å lies beyond ±1e6 Å/);
    }
  });

  it("ionization beb prints finite cross sections for a binding energy of 1e-200 eV", async () => {
    // Finite values; their correctness is checked against a 400-digit evaluation in extreme-inputs.test.ts.
    const path = inputFile("tiny-binding.json", '[{"bindingEv":1e-200,"kineticEv":1,"occupation":2}]');
    const json = await sigmaflow([
      "ionization",
      "beb",
      "--orbitals",
      path,
      "--energies-ev",
      "10,100",
      "--json",
    ]);
    expect(json.code).toBe(0);
    expect(json.stdout).not.toMatch(NOT_A_NUMBER);
    const document = JSON.parse(json.stdout);
    for (const value of numbersIn(document.crossSectionA2)) expect(value).toBeGreaterThan(1e200);
    const text = await sigmaflow(["ionization", "beb", "--orbitals", path, "--energies-ev", "10,100"]);
    expect(text.code).toBe(0);
    expect(text.stdout).not.toMatch(NOT_A_NUMBER);
  });

  it("ionization beb refuses a binding energy of 5e-324 eV, whose σ exceeds the double range", async () => {
    const path = inputFile("subnormal-binding.json", '[{"bindingEv":5e-324,"kineticEv":1,"occupation":2}]');
    const run = await sigmaflow(["ionization", "beb", "--orbitals", path, "--energies-ev", "10", "--json"]);
    expect(run.code).toBe(2);
    expect(run.stdout).toBe("");
    expect(run.stderr).toMatch(
      /exceeds the largest representable number.*check the units of the orbital file/,
    );
  });

  it("rates maxwellian prints finite rates for cross sections of 1e308 Å²", async () => {
    const path = inputFile("huge-sigma.csv", "energyEv,crossSectionA2\n1,1e308\n2,1e308\n3,1e308\n");
    for (const mode of [["--json"], []]) {
      const run = await sigmaflow([
        "rates",
        "maxwellian",
        "--cross-section",
        path,
        "--temperatures-k",
        "300,10000,1e6",
        ...mode,
      ]);
      expect(run.code).toBe(0);
      expect(run.stdout).not.toMatch(NOT_A_NUMBER);
    }
  });

  it("kmatrix cross-sections refuses K-matrix entries of 1e308 with status 2", async () => {
    const path = inputFile(
      "huge-k.json",
      JSON.stringify({
        targetStates: [{ id: "X", spinMultiplicity: 1, energyEv: 0 }],
        symmetries: [
          {
            irrep: "A1",
            totalSpinMultiplicity: 2,
            channels: [
              { targetState: "X", l: 0 },
              { targetState: "X", l: 1 },
            ],
            points: [
              {
                energyEv: 1,
                kMatrix: [
                  [1e308, 1e308],
                  [1e308, 1e308],
                ],
              },
            ],
          },
        ],
      }),
    );
    for (const mode of [["--json"], []]) {
      const run = await sigmaflow(["kmatrix", "cross-sections", "--input", path, ...mode]);
      expect(run.code).toBe(2);
      expect(run.stdout).toBe("");
      expect(run.stderr).toMatch(/K-matrix entry \(0, 0\) is 1e\+308, beyond ±1e100/);
    }
  });

  it("rotational born prints finite de-excitation cross sections down to 5e-324 eV", async () => {
    const run = await sigmaflow([
      "rotational",
      "born",
      "--dipole-debye",
      "1.85",
      "--rotational-constant-cm1",
      "10",
      "--j",
      "1",
      "--j-final",
      "0",
      "--energies-ev",
      "5e-324,1e-40,1e-30,1,1e308",
      "--json",
    ]);
    expect(run.code).toBe(0);
    expect(run.stdout).not.toMatch(NOT_A_NUMBER);
    const document = JSON.parse(run.stdout);
    for (const value of numbersIn(document.crossSectionA2)) expect(value).toBeGreaterThan(0);
  });
});

describe("finite-result guard at the output boundary", () => {
  it("names the first non-finite quantity by its path and exits with status 1", () => {
    // regression: extreme inputs must not print null (JSON.stringify turns NaN and Infinity into null)
    const document = {
      temperaturesK: [300, 1000],
      rateCm3PerS: [1e-9, Number.NaN],
      arrhenius: { alpha: 1, beta: Number.POSITIVE_INFINITY },
    };
    let caught: unknown;
    try {
      assertFiniteResult(document, "Maxwellian rate coefficients");
    } catch (error) {
      caught = error;
    }
    expect(caught).toBeInstanceOf(CliError);
    expect((caught as CliError).exitCode).toBe(NON_FINITE_RESULT_EXIT_CODE);
    expect(NON_FINITE_RESULT_EXIT_CODE).not.toBe(0);
    expect((caught as CliError).message).toMatch(
      /^Maxwellian rate coefficients: rateCm3PerS\[1\] came out as NaN, not a finite number.*units and magnitudes/,
    );
  });

  it("looks into typed arrays and nested rows, and lets null and text through", () => {
    expect(() =>
      assertFiniteResult({ rows: [[1, 2], [3]], values: Float64Array.of(1, -Infinity) }, "result"),
    ).toThrow(/values\[1\] came out as -Infinity/);
    expect(() =>
      assertFiniteResult({ constants: [null, 3.1], label: "linear", atoms: [{ x: [0, 1, 2] }] }, "result"),
    ).not.toThrow();
  });
});
