import { spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { ANGSTROM2_PER_BOHR2, BOHR_RADIUS_ANGSTROM } from "@shared/science/constants";
import { computeKMatrixCrossSections } from "@shared/science/kmatrix";
import {
  elasticCrossSectionBohr2,
  hardSpherePhaseShifts,
  squareWellPhaseShift,
  wavenumberPerBohrFromEnergyEv,
} from "@shared/science/partial-waves";
import { ABELIAN_TABLES, type AbelianGroupSymbol } from "@shared/science/symmetry/abelian-tables";
import { afterAll, describe, expect, it } from "vitest";
import {
  type KMatrixTable,
  kMatrixTableToInputDocument,
  readKMatrixTable,
} from "../../../worker/results/readers/kmatrix-table";
import { runPythonJson } from "../science/support/python-json";

/**
 * Sigmaflow's demo scattering code deploy/demo-codes/radial-scatter, run as a separate program the way a
 * host runs it (Debian's python3, an input JSON, kmatrices.txt in the working folder). Its K-matrices are
 * read with Sigmaflow's own reader and checked against analytic phase shifts, scipy and the science core.
 */
const PROGRAM = fileURLToPath(
  new URL("../../../deploy/demo-codes/radial-scatter/radial-scatter", import.meta.url),
);
const REFERENCE = fileURLToPath(new URL("./radial-scatter-reference.py", import.meta.url));
const PYTHON = "/usr/bin/python3";
const STATEMENT =
  "radial-scatter: teaching-grade spherical model potential; not a production scattering method";
const SCIPY_HINT = "The reference needs scipy: apt-get install -y --no-install-recommends python3-scipy";

const folders: string[] = [];
afterAll(() => {
  for (const folder of folders) rmSync(folder, { recursive: true, force: true });
});

interface ProgramRun {
  status: number | null;
  stdout: string;
  stderr: string;
  /** kmatrices.txt, or null when the program wrote none. */
  kmatrices: string | null;
}

function runProgram(input: unknown, extraFiles: Record<string, string> = {}): ProgramRun {
  const folder = mkdtempSync(join(tmpdir(), "sigmaflow-radial-scatter-"));
  folders.push(folder);
  writeFileSync(join(folder, "input.json"), typeof input === "string" ? input : JSON.stringify(input));
  for (const [name, text] of Object.entries(extraFiles)) writeFileSync(join(folder, name), text);
  const child = spawnSync(PYTHON, [PROGRAM, "input.json"], {
    cwd: folder,
    encoding: "utf8",
    timeout: 60_000,
  });
  const output = join(folder, "kmatrices.txt");
  return {
    status: child.status,
    stdout: child.stdout,
    stderr: child.stderr,
    kmatrices: existsSync(output) ? readFileSync(output, "utf8") : null,
  };
}

function runTable(input: unknown): { run: ProgramRun; table: KMatrixTable } {
  const run = runProgram(input);
  expect(run.stderr, "radial-scatter wrote to stderr").toBe("");
  expect(run.status).toBe(0);
  expect(run.kmatrices).not.toBeNull();
  return { run, table: readKMatrixTable(run.kmatrices!) };
}

/** Diagonal K value of channel (l, m) at energy index e; checks that K has no off-diagonal element. */
function diagonalByChannel(table: KMatrixTable): Map<string, number[]> {
  const byChannel = new Map<string, number[]>();
  for (const irrep of table.irreps) {
    const n = irrep.channels.length;
    irrep.channels.forEach((channel, i) => {
      byChannel.set(
        `${channel.l},${channel.m}`,
        irrep.points.map((point) => point.kMatrix[i * n + i]!),
      );
    });
    for (const point of irrep.points) {
      for (let i = 0; i < n; i++)
        for (let j = 0; j < n; j++) if (i !== j) expect(point.kMatrix[i * n + j]).toBe(0);
    }
  }
  return byChannel;
}

/** |δ_ours − δ_reference| modulo π, in radians, from tan δ values. */
function phaseDifferenceRad(tanOurs: number, tanReference: number): number {
  const difference = Math.atan(tanOurs) - Math.atan(tanReference);
  const wrapped = difference - Math.PI * Math.round(difference / Math.PI);
  return Math.abs(wrapped);
}

const closedShell = (group: AbelianGroupSymbol) => ({ charge: 0, multiplicity: 1, abelianSubgroup: group });

/** Water in the standard orientation of C2v (molecule in the yz plane, C2 along z), centre of mass at the
 * origin; r(OH) = 0.9572 Å, HOH = 104.52° (experimental equilibrium geometry, NIST CCCBDB). */
const WATER_ATOMS = [
  { symbol: "O", atomicNumber: 8, x: 0, y: 0, z: -0.065587 },
  { symbol: "H", atomicNumber: 1, x: 0, y: 0.75695, z: 0.52047 },
  { symbol: "H", atomicNumber: 1, x: 0, y: -0.75695, z: 0.52047 },
];

describe("radial-scatter, Sigmaflow's demo scattering code", () => {
  it("hard sphere: tan δ_l = j_l(ka)/y_l(ka) (Sakurai, Modern Quantum Mechanics, ch. 7), against the science core and scipy", {
    timeout: 30_000,
  }, () => {
    const radiusBohr = 1.5;
    const lmax = 8;
    const energiesEv = [0.05, 0.5, 2, 8, 20, 60, 150];
    const { run, table } = runTable({
      model: "hard-sphere",
      target: closedShell("C1"),
      lmax,
      energiesEv,
      radiusBohr,
    });
    expect(run.stdout.split("\n")[0]).toBe(STATEMENT);
    expect(table.model.startsWith(STATEMENT)).toBe(true);
    expect(table.energiesEv).toEqual(energiesEv);
    expect(table.irreps.map((irrep) => irrep.irrep)).toEqual(["A"]);
    const byChannel = diagonalByChannel(table);
    expect(byChannel.size).toBe((lmax + 1) ** 2);

    const pairs: [number, number][] = [];
    for (const energyEv of energiesEv) {
      for (let l = 0; l <= lmax; l++) pairs.push([l, wavenumberPerBohrFromEnergyEv(energyEv) * radiusBohr]);
    }
    const scipy = runPythonJson(REFERENCE, { bessel: pairs }, { installHint: SCIPY_HINT }) as {
      bessel: [number, number][];
    };
    let worstCore = 0;
    let worstScipy = 0;
    energiesEv.forEach((energyEv, e) => {
      const core = hardSpherePhaseShifts(lmax, wavenumberPerBohrFromEnergyEv(energyEv), radiusBohr);
      for (let l = 0; l <= lmax; l++) {
        const values = [...Array(2 * l + 1).keys()].map((i) => byChannel.get(`${l},${i - l}`)![e]!);
        // every m of one l carries the same phase shift in a spherical potential
        for (const value of values) expect(value).toBe(values[0]);
        const [j, y] = scipy.bessel[e * (lmax + 1) + l]!;
        worstCore = Math.max(worstCore, phaseDifferenceRad(values[0]!, Math.tan(core[l]!)));
        worstScipy = Math.max(worstScipy, phaseDifferenceRad(values[0]!, j / y));
      }
    });
    // Numerov outside the sphere: observed ≈ 1e-8 rad; held to 1e-7 rad
    expect(worstCore).toBeLessThan(1e-7);
    expect(worstScipy).toBeLessThan(1e-7);
  });

  it("square well: the textbook matching of j_l(κr) inside to j_l, y_l outside (Sakurai ch. 7; Joachain, Quantum Collision Theory), via squareWellPhaseShift", {
    timeout: 30_000,
  }, () => {
    const radiusBohr = 2;
    const depthHartree = 0.5;
    const lmax = 6;
    const energiesEv = [0.01, 0.5, 2, 10, 27.2, 100];
    const { table } = runTable({
      model: "square-well",
      target: closedShell("Cs"),
      lmax,
      energiesEv,
      radiusBohr,
      depthHartree,
    });
    expect(table.irreps.map((irrep) => irrep.irrep)).toEqual(["A'", 'A"']);
    const byChannel = diagonalByChannel(table);
    let worst = 0;
    energiesEv.forEach((energyEv, e) => {
      for (let l = 0; l <= lmax; l++) {
        const reference = squareWellPhaseShift({
          l,
          wavenumberPerBohr: wavenumberPerBohrFromEnergyEv(energyEv),
          radiusBohr,
          depthHartree,
        });
        for (let m = -l; m <= l; m++) {
          worst = Math.max(worst, phaseDifferenceRad(byChannel.get(`${l},${m}`)![e]!, Math.tan(reference)));
        }
      }
    });
    // the jump of V at the edge makes Numerov second order there: observed ≈ 5e-7 rad; held to 5e-6 rad
    expect(worst).toBeLessThan(5e-6);
  });

  it("assigns every real spherical harmonic to the irrep its characters (scipy, numerically) select, in all eight Abelian groups", {
    timeout: 60_000,
  }, () => {
    const lmax = 6;
    const groups = Object.keys(ABELIAN_TABLES) as AbelianGroupSymbol[];
    // the eight operations of D2h contain those of every other group
    const operations = ABELIAN_TABLES.D2h.operations.map((operation) => operation.signs);
    const scipy = runPythonJson(
      REFERENCE,
      { characters: { lmax, operations } },
      { installHint: SCIPY_HINT },
    ) as {
      characters: { l: number; m: number; characters: number[] }[];
    };
    const operationIndex = (signs: number[]) => operations.findIndex((s) => s.join() === signs.join());
    for (const group of groups) {
      const table = ABELIAN_TABLES[group];
      const { table: kTable } = runTable({
        model: "hard-sphere",
        target: { ...closedShell(group), irreps: table.irreps.map((irrep) => irrep.name) },
        lmax,
        energiesEv: [1],
        radiusBohr: 1,
      });
      expect(kTable.irreps.map((irrep) => irrep.irrep)).toEqual(table.irreps.map((irrep) => irrep.name));
      for (const { l, m, characters: d2hCharacters } of scipy.characters) {
        const characters = table.operations.map(
          (operation) => d2hCharacters[operationIndex(operation.signs)],
        );
        // irrep characters: Cotton, Chemical Applications of Group Theory, Appendix IIA (shared table)
        const expected = table.irreps.find((irrep) => irrep.characters.every((c, i) => c === characters[i]));
        const holders = kTable.irreps.filter((irrep) => irrep.channels.some((c) => c.l === l && c.m === m));
        expect(`${group} Y(${l},${m}) in ${holders.map((irrep) => irrep.irrep).join(",")}`).toBe(
          `${group} Y(${l},${m}) in ${expected?.name}`,
        );
      }
    }
  });

  it("water in C2v: channel counts per irrep, and the K-matrix cross section summed over irreps equals the partial-wave formula", {
    timeout: 30_000,
  }, () => {
    const lmax = 6;
    const energiesEv = Array.from({ length: 60 }, (_, i) => Number((0.1 * 1.1 ** i).toFixed(6)));
    const started = performance.now();
    const { run, table } = runTable({
      model: "molecule",
      target: {
        ...closedShell("C2v"),
        irreps: ["A1", "A2", "B1", "B2"],
        atoms: WATER_ATOMS,
      },
      lmax,
      energiesEv,
      // water's mean dipole polarizability ≈ 1.45 Å³ = 9.8 bohr³ (CRC Handbook, from memory); a demo value
      polarizabilityBohr3: 9.8,
      cutoffRadiusBohr: 2,
    });
    const wallMs = performance.now() - started;
    // a few seconds at most on a quiet machine; 20 s leaves room for a busy test host
    expect(wallMs).toBeLessThan(20_000);

    const lines = run.stdout.split("\n");
    expect(lines[0]).toBe(STATEMENT);
    expect(lines.filter((line) => line.startsWith("progress "))).toEqual([
      "progress 1/4 irreps",
      "progress 2/4 irreps",
      "progress 3/4 irreps",
      "progress 4/4 irreps",
    ]);
    expect(lines.filter((line) => /^irrep \S+ finished in \d+\.\d+ s$/.test(line))).toHaveLength(4);
    expect(lines.some((line) => /^total wall time \d+\.\d+ s$/.test(line))).toBe(true);
    expect(table.targetSpinMultiplicity).toBe(1);
    expect(table.irreps.map((irrep) => irrep.totalSpinMultiplicity)).toEqual([2, 2, 2, 2]);

    // every (l, m) up to lmax exactly once
    const all = table.irreps.flatMap((irrep) => irrep.channels.map((c) => `${c.l},${c.m}`));
    expect(all).toHaveLength((lmax + 1) ** 2);
    expect(new Set(all).size).toBe(all.length);
    // Counts per irrep of C2v for one l: the real Y_lm with m ≥ 0 hold x^(m−2j) y^(2j), those with m < 0
    // x^(|m|−2j−1) y^(2j+1); σv(xz) flips y, σv(yz) flips x. So A1: m = 0, 2, 4… (⌊l/2⌋ + 1);
    // A2: m = −2, −4… (⌊l/2⌋); B1: m = 1, 3… and B2: m = −1, −3… (⌊(l+1)/2⌋ each). For l ≤ 2 this is the
    // character table's own listing (Cotton, Appendix IIA): z, x²−y², z² in A1; xy in A2; x, xz in B1; y, yz in B2.
    const expectedCounts = { A1: 0, A2: 0, B1: 0, B2: 0 };
    for (let l = 0; l <= lmax; l++) {
      expectedCounts.A1 += Math.floor(l / 2) + 1;
      expectedCounts.A2 += Math.floor(l / 2);
      expectedCounts.B1 += Math.floor((l + 1) / 2);
      expectedCounts.B2 += Math.floor((l + 1) / 2);
    }
    expect(Object.fromEntries(table.irreps.map((irrep) => [irrep.irrep, irrep.channels.length]))).toEqual(
      expectedCounts,
    );
    const findIrrep = (l: number, m: number) =>
      table.irreps.find((irrep) => irrep.channels.some((c) => c.l === l && c.m === m))?.irrep;
    expect([findIrrep(1, 0), findIrrep(1, 1), findIrrep(1, -1)]).toEqual(["A1", "B1", "B2"]);
    expect([findIrrep(2, 2), findIrrep(2, -2), findIrrep(2, 1), findIrrep(2, -1)]).toEqual([
      "A1",
      "A2",
      "B1",
      "B2",
    ]);

    const byChannel = diagonalByChannel(table);
    // σ from the K-matrices (T = 2iK(1 − iK)⁻¹, spin weight 2/(2·1) = 1), summed over the four irreps
    const fromK = computeKMatrixCrossSections(kMatrixTableToInputDocument(table));
    const sigmaA2 = fromK.transitions.find((t) => t.fromState === "ground" && t.toState === "ground")!;
    energiesEv.forEach((energyEv, e) => {
      const phases = Array.from({ length: lmax + 1 }, (_, l) => Math.atan(byChannel.get(`${l},0`)![e]!));
      // σ = (4π/k²) Σ_l (2l + 1) sin² δ_l (Mott & Massey), from the m = 0 channel of each l
      const partialWaveA2 =
        elasticCrossSectionBohr2(wavenumberPerBohrFromEnergyEv(energyEv), phases) * ANGSTROM2_PER_BOHR2;
      expect(sigmaA2.crossSectionA2[e]! / partialWaveA2).toBeCloseTo(1, 9);
    });
  });

  it("molecule model on a hydrogen atom, at the origin and 0.5 Å away, against the static potential of H(1s) integrated by scipy", {
    timeout: 30_000,
  }, () => {
    const energiesEv = [0.5, 5, 40];
    const lmax = 3;
    const cases = [0, 0.5].map((zAngstrom) => {
      const { table } = runTable({
        model: "molecule",
        target: {
          charge: 0,
          multiplicity: 2,
          abelianSubgroup: "D2h",
          atoms: [{ symbol: "H", atomicNumber: 1, x: 0, y: 0, z: zAngstrom }],
        },
        lmax,
        energiesEv,
        polarizabilityBohr3: 0,
        cutoffRadiusBohr: 1,
      });
      // doublet target: the file carries the triplet coupling (multiplicity + 1)
      expect(table.targetSpinMultiplicity).toBe(2);
      expect(table.irreps.every((irrep) => irrep.totalSpinMultiplicity === 3)).toBe(true);
      return { offsetBohr: zAngstrom / BOHR_RADIUS_ANGSTROM, byChannel: diagonalByChannel(table) };
    });
    const request = cases.flatMap(({ offsetBohr }) =>
      energiesEv.flatMap((energyEv) =>
        Array.from({ length: lmax + 1 }, (_, l) => ({ l, energyEv, offsetBohr })),
      ),
    );
    const scipy = runPythonJson(REFERENCE, { hydrogen: request }, { installHint: SCIPY_HINT }) as {
      hydrogen: number[];
    };
    let worst = 0;
    let index = 0;
    for (const { byChannel } of cases) {
      energiesEv.forEach((_, e) => {
        for (let l = 0; l <= lmax; l++) {
          worst = Math.max(worst, phaseDifferenceRad(byChannel.get(`${l},0`)![e]!, scipy.hydrogen[index++]!));
        }
      });
    }
    // Slater's rules give the exact 1s density for hydrogen; observed ≤ 5e-6 rad (kink of the averaged
    // potential at the nucleus' distance, trapezoidal Hartree integral); held to 3e-5 rad
    expect(worst).toBeLessThan(3e-5);
  });

  it("a charged target runs with the Coulomb tail cut off and says its results are qualitative", {
    timeout: 30_000,
  }, () => {
    const { run, table } = runTable({
      model: "molecule",
      target: {
        charge: 1,
        multiplicity: 1,
        abelianSubgroup: "C2v",
        atoms: [
          { symbol: "H", atomicNumber: 1, x: 0, y: 0, z: -2.147 },
          { symbol: "C", atomicNumber: 6, x: 0, y: 0, z: -1.057 },
          { symbol: "O", atomicNumber: 8, x: 0, y: 0, z: 0.053 },
        ],
      },
      lmax: 4,
      energiesEv: [0.5, 5],
      polarizabilityBohr3: 13,
      cutoffRadiusBohr: 2,
    });
    expect(run.stdout).toContain("results for ions are qualitative only");
    expect(run.stdout).toContain("scaled to 14 electrons");
    expect(table.model).toContain("qualitative");
  });

  it.each([
    ["not JSON", "{ model: ", "not valid JSON"],
    [
      "a missing key",
      { model: "hard-sphere", target: closedShell("C1"), lmax: 2, radiusBohr: 1 },
      '"energiesEv"',
    ],
    [
      "a negative energy",
      { model: "hard-sphere", target: closedShell("C1"), lmax: 2, energiesEv: [1, -2], radiusBohr: 1 },
      "energiesEv[1] = -2.0 eV",
    ],
    [
      "an unknown subgroup",
      {
        model: "hard-sphere",
        target: closedShell("C3v" as AbelianGroupSymbol),
        lmax: 2,
        energiesEv: [1],
        radiusBohr: 1,
      },
      'abelianSubgroup "C3v" is not one of',
    ],
    [
      "lmax above 30",
      { model: "hard-sphere", target: closedShell("C1"), lmax: 31, energiesEv: [1], radiusBohr: 1 },
      "lmax must be in 0..30",
    ],
    [
      "more than 100 000 energies",
      {
        model: "hard-sphere",
        target: closedShell("C1"),
        lmax: 0,
        energiesEv: Array.from({ length: 100_001 }, (_, i) => 1 + i * 1e-5),
        radiusBohr: 1,
      },
      "at most 100000",
    ],
    [
      "a kmatrices.txt larger than Sigmaflow reads (50 MiB)",
      {
        model: "hard-sphere",
        target: closedShell("C1"),
        lmax: 30,
        energiesEv: Array.from({ length: 100 }, (_, i) => 1 + i),
        radiusBohr: 1,
      },
      "Sigmaflow reads at most 50 MiB",
    ],
    [
      "irreps out of Cotton order",
      {
        model: "hard-sphere",
        target: { ...closedShell("C2v"), irreps: ["A1", "B1", "A2", "B2"] },
        lmax: 1,
        energiesEv: [1],
        radiusBohr: 1,
      },
      "Cotton order",
    ],
    [
      "a density file outside the working folder",
      {
        model: "molecule",
        target: { ...closedShell("C1"), atoms: [{ atomicNumber: 2, x: 0, y: 0, z: 0 }] },
        lmax: 1,
        energiesEv: [1],
        polarizabilityBohr3: 1.4,
        cutoffRadiusBohr: 1,
        densityFile: "../density.txt",
      },
      "plain file name",
    ],
  ])("refuses %s with exit code 2 and a message naming it", { timeout: 30_000 }, (_name, input, message) => {
    const run = runProgram(input);
    expect(run.status).toBe(2);
    expect(run.stderr).toContain("radial-scatter: error: ");
    expect(run.stderr).toContain(message);
    expect(run.kmatrices).toBeNull();
  });
});
