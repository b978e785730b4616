import { execFile } from "node:child_process";
import { fileURLToPath } from "node:url";
import { promisify } from "node:util";
import { targetInspectionSchema } from "@shared/schemas/science-target";
import { describe, expect, it } from "vitest";

const run = promisify(execFile);
const root = fileURLToPath(new URL("../../../", import.meta.url));
const fixture = (name: string) => fileURLToPath(new URL(`./fixtures/${name}`, import.meta.url));

async function sigmaflow(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await run("node", ["bin/sigmaflow.mjs", ...args], {
      cwd: root,
      timeout: 60_000,
    });
    return { code: 0, stdout, stderr };
  } catch (error) {
    const e = error as { code?: number; stdout?: string; stderr?: string };
    return { code: e.code ?? -1, stdout: e.stdout ?? "", stderr: e.stderr ?? "" };
  }
}

describe("sigmaflow target inspect (child process)", { timeout: 60_000 }, () => {
  it("prints one JSON document for methane (Td; CH3D with --isotope 2=2 is C3v)", async () => {
    const plain = await sigmaflow(["target", "inspect", fixture("methane.xyz"), "--json"]);
    expect(plain.code).toBe(0);
    const report = targetInspectionSchema.parse(JSON.parse(plain.stdout));
    // Td, order 24, Abelian subgroup C2v (common practice), spherical top: textbook.
    expect([report.pointGroup, report.groupOrder, report.abelianSubgroup, report.rotorType]).toEqual([
      "Td",
      24,
      "C2v",
      "spherical",
    ]);
    expect(report.irreps).toEqual(["A1", "A2", "B1", "B2"]);
    expect(report.electronCount).toBe(10);
    expect(report.equivalentAtomSets).toEqual([[1], [2, 3, 4, 5]]);

    const labelled = await sigmaflow([
      "target",
      "inspect",
      fixture("methane.xyz"),
      "--isotope",
      "2=2",
      "--json",
    ]);
    const deuterated = targetInspectionSchema.parse(JSON.parse(labelled.stdout));
    expect([deuterated.pointGroup, deuterated.groupOrder, deuterated.abelianSubgroup]).toEqual([
      "C3v",
      6,
      "Cs",
    ]);
    expect(deuterated.atoms[1]).toMatchObject({ symbol: "H", massNumber: 2 });
    expect(deuterated.rotorType).toBe("prolate");
    // NIST ²H mass (from memory).
    expect(deuterated.atoms[1]!.massU).toBeCloseTo(2.01410177812, 11);
  });

  it("prints a readable summary by default", async () => {
    const result = await sigmaflow(["target", "inspect", fixture("methane.xyz"), "--charge", "1"]);
    expect(result.code).toBe(0);
    expect(result.stdout).toMatch(/Point group\s+Td \(order 24\)/);
    expect(result.stdout).toMatch(/9 electrons, multiplicity 2/);
    expect(result.stdout).toMatch(/Atoms in the standard orientation/);
  });

  it.each([
    [["target", "inspect", "no-such-file.xyz"], /Cannot read geometry file "no-such-file.xyz": no such file/],
    [["target", "inspect", fixture("bad-symbol.xyz")], /Line 4: unknown element symbol "Hh"/],
    [
      ["target", "inspect", fixture("methane.xyz"), "--multiplicity", "2"],
      /Multiplicity 2 is impossible with 10 electrons/,
    ],
    [
      ["target", "inspect", fixture("methane.xyz"), "--isotope", "2=9"],
      /H-9 is not a known isotope.*Known mass numbers/,
    ],
    [
      ["target", "inspect", fixture("methane.xyz"), "--isotope", "two=2"],
      /--isotope: "two=2" must look like INDEX=NUMBER/,
    ],
    [["target", "inspect", fixture("methane.xyz"), "--tolerance", "5"], /--tolerance: must be at most 0.3/],
    [["target", "inspect", fixture("methane.xyz"), "--bogus"], /Unknown option '--bogus'/],
    [["target", "frobnicate"], /unknown command "frobnicate"/],
  ])("exits 2 with a clear message for %j", async (args, message) => {
    const result = await sigmaflow(args);
    expect(result.code).toBe(2);
    expect(result.stderr).toMatch(message);
    expect(result.stdout).toBe("");
  });
});
