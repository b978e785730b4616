/**
 * The orbital-table reader on files written by real psi4 1.3.2 runs of the demo code hf-orbitals
 * (fixtures/, made by fixtures/make-orbital-fixtures.ts), and on malformed and hostile files.
 *
 * Expected physics, each with its source:
 *  - water, RHF/cc-pVDZ: 10 electrons in 5 doubly occupied orbitals 1a1 2a1 1b2 3a1 1b1, the HOMO 1b1
 *    (water in the yz plane, standard orientation; the ordering of the valence orbitals is textbook, e.g.
 *    A. Szabo and N. S. Ostlund, Modern Quantum Chemistry, §3.6); total energy ≈ −76.027 hartree at this
 *    geometry (the HF/cc-pVDZ value of water near equilibrium, −76.026 to −76.027, from memory; held to
 *    2e-3); 24 basis functions in cc-pVDZ (O: 14, H: 5 each, common practice).
 *  - the virial theorem: −V/T = 2 for the exact wavefunction; a Hartree–Fock wavefunction at a geometry
 *    near equilibrium meets it to about 1e-3, so Σ occupation·⟨φ|−½∇²|φ⟩ ≈ −E (held to 2e-3 relative).
 *  - the 1s orbital of oxygen: energy near −20.55 hartree (HF limit of the water 1a1, −20.56, from
 *    memory; held to 0.05) with kinetic energy near Z²/2 = 32 hartree for a hydrogen-like 1s, screened
 *    to ≈ 29 (held between 25 and 32).
 */
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { ResultReadError } from "../../../worker/results/readers/errors";
import { MAX_ORBITALS, readOrbitalTable } from "../../../worker/results/readers/orbital-table";

const fixture = (name: string) =>
  readFileSync(fileURLToPath(new URL(`fixtures/${name}`, import.meta.url)), "utf8");
const WATER = fixture("water-cc-pvdz.orbitals.txt");

/** The error a read throws, so its line and reason can be checked. */
function readError(text: string): ResultReadError {
  try {
    readOrbitalTable(text);
  } catch (error) {
    if (error instanceof ResultReadError) return error;
    throw error;
  }
  throw new Error("the reader accepted the file");
}

/** The water fixture with one line replaced (1-based line number). */
function withLine(lineNumber: number, replacement: string): string {
  const lines = WATER.split("\n");
  lines[lineNumber - 1] = replacement;
  return lines.join("\n");
}

const lineOf = (text: string, start: string) => text.split("\n").findIndex((l) => l.startsWith(start)) + 1;

describe("orbital table: water RHF/cc-pVDZ from psi4", () => {
  const table = readOrbitalTable(WATER);

  it("reads the header", () => {
    expect(table.program).toBe("psi4 1.3.2");
    expect(table.method).toBe("rhf");
    expect(table.basis).toBe("cc-pvdz");
    expect(table.pointGroup).toBe("c2v");
    expect(table.totalEnergyHartree).toBeCloseTo(-76.027, 2);
    expect(table.nuclearRepulsionHartree).toBeGreaterThan(9);
    expect(table.dipoleDebye).not.toBeNull();
    expect(table.dipoleDebye![0]).toBe(0);
    expect(table.dipoleDebye![1]).toBe(0);
    expect(table.rotationalConstantsCm1.every((b) => b !== null && b > 0)).toBe(true);
    expect(table.harmonicFrequenciesCm1).toBeNull();
  });

  it("has the orbitals of water: 24 in all, five doubly occupied, HOMO 1b1", () => {
    expect(table.orbitals).toHaveLength(24);
    const occupied = table.orbitals.filter((o) => o.occupation > 0);
    expect(occupied.map((o) => `${o.label}:${o.occupation}`)).toEqual([
      "1a1:2",
      "2a1:2",
      "1b2:2",
      "3a1:2",
      "1b1:2",
    ]);
    expect(occupied.reduce((n, o) => n + o.occupation, 0)).toBe(10);
    const homo = occupied.at(-1)!;
    expect(homo).toMatchObject({ label: "1b1", irrep: "B1", indexInIrrep: 1 });
    expect(homo.energyHartree).toBeLessThan(0);
    const perIrrep: Record<string, number> = {};
    for (const o of table.orbitals) perIrrep[o.irrep] = (perIrrep[o.irrep] ?? 0) + 1;
    // cc-pVDZ water in C2v: 11 a1, 2 a2, 4 b1, 7 b2 (s, p and d functions sorted by irrep; common practice)
    expect(perIrrep).toEqual({
      A1: 11,
      A2: 2,
      B1: 4,
      B2: 7,
    });
  });

  it("gives kinetic energies that satisfy the virial theorem and the 1s picture", () => {
    const kinetic = table.orbitals.reduce((t, o) => t + o.occupation * o.kineticHartree, 0);
    const virialRatio = -(table.totalEnergyHartree - kinetic) / kinetic;
    expect(Math.abs(virialRatio - 2)).toBeLessThan(4e-3);
    const core = table.orbitals[0]!;
    expect(core.label).toBe("1a1");
    expect(Math.abs(core.energyHartree + 20.55)).toBeLessThan(0.05);
    expect(core.kineticHartree).toBeGreaterThan(25);
    expect(core.kineticHartree).toBeLessThan(32);
  });
});

describe("orbital table: other real runs", () => {
  it("reads harmonic frequencies (water, STO-3G, 3N − 6 = 3 of them)", () => {
    const table = readOrbitalTable(fixture("water-sto-3g-frequencies.orbitals.txt"));
    expect(table.harmonicFrequenciesCm1).toHaveLength(3);
    // HF/STO-3G water: bend ≈ 2000–2200 cm⁻¹, stretches ≈ 4100–4800 cm⁻¹ (NIST CCCBDB calculated
    // frequencies for HF/STO-3G at its own minimum are 2170, 4140, 4391; from memory; here at the
    // experimental geometry, hence the wide bands)
    const [bend, s1, s2] = table.harmonicFrequenciesCm1!;
    expect(bend).toBeGreaterThan(1800);
    expect(bend).toBeLessThan(2400);
    for (const stretch of [s1!, s2!]) {
      expect(stretch).toBeGreaterThan(3800);
      expect(stretch).toBeLessThan(5000);
    }
  });

  it("reads Cs irreps with primes (NF3, 34 electrons)", () => {
    const table = readOrbitalTable(fixture("nf3-sto-3g.orbitals.txt"));
    expect(table.pointGroup).toBe("cs");
    expect(new Set(table.orbitals.map((o) => o.irrep))).toEqual(new Set(["A'", 'A"']));
    expect(table.orbitals.find((o) => o.irrep === 'A"')!.label).toBe('1a"');
    expect(table.orbitals.reduce((n, o) => n + o.occupation, 0)).toBe(34);
  });

  it("reads spin orbitals of an unrestricted run (water cation, 9 electrons, 5 α and 4 β)", () => {
    const table = readOrbitalTable(fixture("water-cation-uhf-sto-3g.orbitals.txt"));
    expect(table.method).toBe("uhf");
    const alpha = table.orbitals.filter((o) => o.label.endsWith(".alpha"));
    const beta = table.orbitals.filter((o) => o.label.endsWith(".beta"));
    expect(alpha.reduce((n, o) => n + o.occupation, 0)).toBe(5);
    expect(beta.reduce((n, o) => n + o.occupation, 0)).toBe(4);
    expect(table.orbitals.every((o) => o.occupation <= 1)).toBe(true);
  });

  it("accepts CRLF line ends, comments and blank lines", () => {
    const text = `# a note\n\n${WATER.replaceAll("\n", "\r\n")}\n# trailing note\n`;
    expect(readOrbitalTable(text).orbitals).toHaveLength(24);
  });
});

describe("orbital table: malformed and hostile files", () => {
  const firstOrbitalLine = lineOf(WATER, "1a1 ");

  it.each([
    ["an empty file", "", null, /empty/],
    ["another format", WATER.replace("format sigmaflow-orbitals 1", "format other 1"), 2, /first line/],
    ["an unknown header line", withLine(3, "programme psi4"), 3, /unknown header line "programme"/],
    [
      "a duplicated header line",
      withLine(lineOf(WATER, "method"), "basis sto-3g"),
      lineOf(WATER, "basis"),
      /given twice/,
    ],
    [
      "a missing header line",
      withLine(lineOf(WATER, "dipole_debye"), "# removed"),
      lineOf(WATER, "orbitals"),
      /missing: dipole_debye/,
    ],
    [
      "NaN energy",
      withLine(lineOf(WATER, "energy_hartree"), "energy_hartree NaN"),
      lineOf(WATER, "energy_hartree"),
      /not a finite number/,
    ],
    [
      "infinite energy",
      withLine(lineOf(WATER, "energy_hartree"), "energy_hartree 1e999"),
      lineOf(WATER, "energy_hartree"),
      /not a finite number/,
    ],
    [
      "hexadecimal",
      withLine(lineOf(WATER, "energy_hartree"), "energy_hartree 0x10"),
      lineOf(WATER, "energy_hartree"),
      /not a finite number/,
    ],
    [
      "an unknown point group",
      withLine(lineOf(WATER, "point_group"), "point_group c3v"),
      lineOf(WATER, "point_group"),
      /not one of/,
    ],
    [
      "a dipole with two components",
      withLine(lineOf(WATER, "dipole_debye"), "dipole_debye 0 1"),
      lineOf(WATER, "dipole_debye"),
      /takes 3 numbers/,
    ],
    [
      "a negative rotational constant",
      withLine(lineOf(WATER, "rotational_constants_cm1"), "rotational_constants_cm1 -1 2 3"),
      lineOf(WATER, "rotational_constants_cm1"),
      /not positive/,
    ],
    [
      "an orbital in an irrep of another group",
      withLine(firstOrbitalLine, "1ag Ag 1 -20.5 2 29.2"),
      firstOrbitalLine,
      /irrep "Ag"/,
    ],
    [
      "a label not matching the index",
      withLine(firstOrbitalLine, "2a1 A1 1 -20.5 2 29.2"),
      firstOrbitalLine,
      /does not match/,
    ],
    [
      "an occupation above 2",
      withLine(firstOrbitalLine, "1a1 A1 1 -20.5 3 29.2"),
      firstOrbitalLine,
      /between 0 and 2/,
    ],
    [
      "a negative kinetic energy",
      withLine(firstOrbitalLine, "1a1 A1 1 -20.5 2 -29.2"),
      firstOrbitalLine,
      /negative/,
    ],
    [
      "a NaN orbital energy",
      withLine(firstOrbitalLine, "1a1 A1 1 nan 2 29.2"),
      firstOrbitalLine,
      /not a finite number/,
    ],
    ["a short orbital line", withLine(firstOrbitalLine, "1a1 A1 1 -20.5 2"), firstOrbitalLine, /6 fields/],
    [
      "an orbital listed twice",
      withLine(firstOrbitalLine + 1, WATER.split("\n")[firstOrbitalLine - 1]!),
      firstOrbitalLine + 1,
      /listed twice/,
    ],
    [
      "a control character",
      withLine(firstOrbitalLine, "1a1 A1 1 -20.5\u0000 2 29.2"),
      firstOrbitalLine,
      /control character/,
    ],
    [
      "a cut-off file",
      WATER.split("\n")
        .slice(0, firstOrbitalLine + 2)
        .join("\n"),
      firstOrbitalLine + 2,
      /announces 24 orbitals but lists 3/,
    ],
    ["no end line", WATER.replace(/\nend\n$/, "\n"), lineOf(WATER, "end"), /without the "end" line/],
    ["text after end", `${WATER}extra 1\n`, lineOf(WATER, "end") + 1, /after "end"/],
    [
      "too many orbitals announced",
      withLine(lineOf(WATER, "orbitals"), `orbitals ${MAX_ORBITALS + 1}`),
      lineOf(WATER, "orbitals"),
      /more than 100000 orbitals/,
    ],
    [
      "a mixture of spin and spatial orbitals",
      withLine(firstOrbitalLine, "1a1.alpha A1 1 -20.5 1 29.2"),
      firstOrbitalLine + 1,
      /mixed/,
    ],
  ] as const)("refuses %s, naming the line", (_case, text, line, reason) => {
    const error = readError(text);
    expect(error.fileName).toBe("orbitals.txt");
    expect(error.line).toBe(line);
    expect(error.reason).toMatch(reason);
    expect(error.message).toBe(
      line === null ? `orbitals.txt: ${error.reason}` : `orbitals.txt, line ${line}: ${error.reason}`,
    );
  });

  it("refuses a file over 20 MB before reading it", () => {
    const huge = `${WATER}${"#".repeat(20 * 1024 * 1024)}`;
    const started = performance.now();
    const error = readError(huge);
    expect(error.line).toBeNull();
    expect(error.reason).toMatch(/larger than 20 MB/);
    expect(performance.now() - started).toBeLessThan(1000);
  });

  it("stops reading lines past 100 000 orbitals' worth, whatever the count line says", () => {
    const header = WATER.slice(0, WATER.indexOf("orbitals 24"));
    const rows = Array.from({ length: MAX_ORBITALS + 20 }, (_, i) => `${i + 1}a1 A1 ${i + 1} 0.5 0 1.0`);
    const error = readError(`${header}orbitals 24\n${rows.join("\n")}\nend\n`);
    expect(error.reason).toMatch(/more than 100000 orbitals/);
    expect(error.line).toBeGreaterThan(MAX_ORBITALS);
  });

  it("names the file it was given", () => {
    expect(() => readOrbitalTable("nonsense", "run-42/orbitals.txt")).toThrow(
      "run-42/orbitals.txt, line 1: expected",
    );
  });
});
