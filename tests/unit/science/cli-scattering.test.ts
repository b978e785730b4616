/**
 * The scattering subcommands run as a child process (node bin/sigmaflow.mjs), as a user would.
 */
import { execFile } from "node:child_process";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";

const root = fileURLToPath(new URL("../../..", import.meta.url));
const fixture = (name: string) => fileURLToPath(new URL(`./fixtures-scattering/${name}`, import.meta.url));

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

const TIMEOUT = 60_000;

describe("sigmaflow ionization beb", () => {
  it(
    "prints total and per-orbital BEB cross sections for H2O from a CSV file",
    async () => {
      // NIST Electron-Impact Cross Section database: H2O total 2.348 Å² at 100 eV (from memory), 1 % tolerance.
      const run = await sigmaflow([
        "ionization",
        "beb",
        "--orbitals",
        fixture("h2o-orbitals.csv"),
        "--energies-ev",
        "10,50:150:3",
        "--json",
      ]);
      expect(run.code).toBe(0);
      const document = JSON.parse(run.stdout);
      expect(document.energiesEv).toEqual([10, 50, 100, 150]);
      expect(document.crossSectionA2[0]).toBe(0);
      expect(Math.abs(document.crossSectionA2[2] / 2.348 - 1)).toBeLessThan(0.01);
      expect(document.orbitals).toHaveLength(5);
      expect(document.orbitals[4].label).toBe("1b1");
      expect(document.variant).toBe("neutral");
    },
    TIMEOUT,
  );

  it(
    "reads a JSON orbital file and applies the ion variant",
    async () => {
      const neutral = JSON.parse(
        (
          await sigmaflow([
            "ionization",
            "beb",
            "--orbitals",
            fixture("h2-orbitals.json"),
            "--energies-ev",
            "100",
            "--json",
          ])
        ).stdout,
      );
      // NIST database H2 at 100 eV: 0.969 Å² (from memory), 1 %.
      expect(Math.abs(neutral.crossSectionA2[0] / 0.969 - 1)).toBeLessThan(0.01);
      const ion = JSON.parse(
        (
          await sigmaflow([
            "ionization",
            "beb",
            "--orbitals",
            fixture("h2-orbitals.json"),
            "--energies-ev",
            "100",
            "--ion",
            "--json",
          ])
        ).stdout,
      );
      expect(ion.variant).toBe("singly-charged-ion");
      expect(ion.crossSectionA2[0]).toBeGreaterThan(neutral.crossSectionA2[0]);
    },
    TIMEOUT,
  );

  it(
    "exits with code 2 and names the line of a bad CSV cell",
    async () => {
      const run = await sigmaflow([
        "ionization",
        "beb",
        "--orbitals",
        fixture("bad-orbitals.csv"),
        "--energies-ev",
        "100",
      ]);
      expect(run.code).toBe(2);
      expect(run.stderr).toMatch(/line 2: "two" in column occupation is not a number/);
      expect(run.stdout).toBe("");
    },
    TIMEOUT,
  );
});

describe("sigmaflow rotational born", () => {
  it(
    "prints the dipole Born cross section as JSON",
    async () => {
      // μ = 1 e·a₀ = 2.541746473 D (CODATA 2018), B = 0.1875 E_h, E = E_h/2 → σ = (8π/3) ln 3 a₀² (closed form).
      const run = await sigmaflow([
        "rotational",
        "born",
        "--dipole-debye",
        "2.5417464739297717",
        "--rotational-constant-cm1",
        String((0.1875 * 27.211386245988) / 1.2398419843320026e-4),
        "--j",
        "0",
        "--energies-ev",
        String(27.211386245988 / 2),
        "--json",
      ]);
      expect(run.code).toBe(0);
      const document = JSON.parse(run.stdout);
      expect(document.jFinal).toBe(1);
      expect(
        document.crossSectionA2[0] / ((8 * Math.PI * Math.log(3) * 0.529177210903 ** 2) / 3),
      ).toBeCloseTo(1, 8);
    },
    TIMEOUT,
  );

  it(
    "rejects ΔJ = 2 with exit code 2",
    async () => {
      const run = await sigmaflow([
        "rotational",
        "born",
        "--dipole-debye",
        "1",
        "--rotational-constant-cm1",
        "2",
        "--j",
        "0",
        "--j-final",
        "2",
        "--energies-ev",
        "1",
      ]);
      expect(run.code).toBe(2);
      expect(run.stderr).toMatch(/J ± 1 only/);
    },
    TIMEOUT,
  );
});

describe("sigmaflow rates maxwellian", () => {
  it(
    "gives σ₀ v̄ (1 + E₀/kT) e^{−E₀/kT} for a step table and fits Arrhenius parameters",
    async () => {
      const run = await sigmaflow([
        "rates",
        "maxwellian",
        "--cross-section",
        fixture("step-cross-section.csv"),
        "--temperatures-k",
        "2e4:1e5:5:log",
        "--tail",
        "constant",
        "--fit-arrhenius",
        "--json",
      ]);
      expect(run.code).toBe(0);
      const document = JSON.parse(run.stdout);
      const kB = 1.380649e-23;
      const e = 1.602176634e-19;
      const me = 9.1093837015e-31;
      document.temperaturesK.forEach((t: number, i: number) => {
        const x0 = 10 / ((kB * t) / e);
        const expected = 2e-16 * Math.sqrt((8 * kB * t) / (Math.PI * me)) * 100 * (1 + x0) * Math.exp(-x0);
        expect(document.rateCm3PerS[i] / expected).toBeCloseTo(1, 10);
      });
      expect(document.arrhenius.gamma).toBeGreaterThan(0);
      expect(document.maxwellianFractionBeyondTable).toHaveLength(5);
      // The table ends at 20 eV, so the hottest temperature triggers the warning on stderr.
      expect(run.stderr).toMatch(/warning: at 100000 K/);
    },
    TIMEOUT,
  );

  it(
    "reports a missing file with exit code 2",
    async () => {
      const run = await sigmaflow([
        "rates",
        "maxwellian",
        "--cross-section",
        "no-such.csv",
        "--temperatures-k",
        "300",
      ]);
      expect(run.code).toBe(2);
      expect(run.stderr).toMatch(/Cannot read cross-section file "no-such.csv": no such file/);
    },
    TIMEOUT,
  );
});

describe("sigmaflow kmatrix cross-sections", () => {
  it(
    "computes σ(X → T) from the 2×2 K-matrix closed form",
    async () => {
      const run = await sigmaflow([
        "kmatrix",
        "cross-sections",
        "--input",
        fixture("two-state-kmatrix.json"),
        "--json",
      ]);
      expect(run.code).toBe(0);
      const document = JSON.parse(run.stdout);
      expect(document.energiesEv).toEqual([1, 2, 3.5]);
      const up = document.transitions.find(
        (t: { fromState: string; toState: string }) => t.fromState === "X" && t.toState === "T",
      );
      // |T₁₂|² = 4b²/[(1 − ac + b²)² + (a + c)²], σ = (π/k²)|T₁₂|² with k² = 2E/E_h, a₀² = 0.280028520 Å².
      const [a, b, c] = [0.3, 0.45, -0.7];
      const t12 = (4 * b * b) / ((1 - a * c + b * b) ** 2 + (a + c) ** 2);
      const expected = (Math.PI / ((2 * 2) / 27.211386245988)) * t12 * 0.529177210903 ** 2;
      expect(up.crossSectionA2[0]).toBe(0);
      expect(up.crossSectionA2[1] / expected).toBeCloseTo(1, 10);
      expect(document.symmetries).toHaveLength(2);
    },
    TIMEOUT,
  );

  it(
    "explains a K-matrix that includes a closed channel (exit code 2)",
    async () => {
      const run = await sigmaflow([
        "kmatrix",
        "cross-sections",
        "--input",
        fixture("bad-kmatrix-closed-channel.json"),
      ]);
      expect(run.code).toBe(2);
      expect(run.stderr).toMatch(/1 channel is open, so the K-matrix must be 1×1/);
    },
    TIMEOUT,
  );

  it(
    "prints a text table by default",
    async () => {
      const run = await sigmaflow([
        "kmatrix",
        "cross-sections",
        "--input",
        fixture("two-state-kmatrix.json"),
      ]);
      expect(run.code).toBe(0);
      expect(run.stdout).toMatch(/X→T \(Å²\)/);
      expect(run.stdout).toMatch(/Eigenphase sums/);
    },
    TIMEOUT,
  );
});
