import { electronCount } from "@shared/science/geometry";
import { describe, expect, it } from "vitest";
import { outputRuleProblems } from "../../../server/execution/output-rule-checks";
import { validateParameters } from "../../../server/execution/parameters";
import { checkCodeTemplates } from "../../../server/execution/templates/render";
import { compileUserPattern } from "../../../server/execution/user-patterns";
import { readOrbitalTable } from "../../../worker/results/readers/orbital-table";
import { type DemoTargetCase, demoTargetCases } from "./support/demo-targets";
import { type HfOrbitalsRun, hfOrbitalsDefinition, runHfOrbitals } from "./support/run-hf-orbitals";

/**
 * Every demo target and isotopologue (deploy/demo/targets.ts) run through the demo code hf-orbitals as a
 * host would run it: input rendered by Sigmaflow's template renderer, psi4 1.3.2 (Debian package) run on
 * it in a temporary folder, orbitals.txt read with Sigmaflow's reader. Checked against psi4:
 *  - the point group psi4 ran in is the Abelian subgroup shared/science chose (psi4 only uses subgroups
 *    of D2h), in our standard orientation (no_reorient: psi4 must find the same operations on the same axes);
 *  - psi4's own full point group (the "Full point group:" line of output.dat) is shared/science's, with
 *    one known psi4 1.3.2 shortcoming named below;
 *  - rotational constants agree to 1e-6 relative and nuclear repulsion to 1e-8 relative: psi4 uses CODATA
 *    2014 (h, m_u, a₀ differ from CODATA 2018 by ≤ 2e-8 relative) and the masses are written with 15
 *    significant figures. psi4 reports A = 0 for a linear molecule; the template writes that as "none",
 *    matching our null;
 *  - the electrons in the occupied orbitals are shared/science's electron count.
 * STO-3G keeps each run near a second; water is also run in cc-pVDZ for the count and the virial theorem.
 */

/** psi4's spelling of point groups ("C_inf_v", "Td") in ours ("C∞v"). */
const fromPsi4Name = (name: string) => name.replace("_inf_", "∞");

/**
 * psi4 1.3.2 looks for the principal axis of the full group along the z axis of its Abelian frame. For NF3
 * (Abelian subgroup Cs) the C3 axis lies in the mirror plane, so psi4 finds no axis and reports "C1v",
 * i.e. Cs: a subgroup of C3v, not the full group. (CH3D, also Cs, happens to come out as C3v.)
 */
const PSI4_FULL_GROUP_SHORTFALLS: Readonly<Record<string, string>> = { "Nitrogen trifluoride": "C1v" };

const cases = demoTargetCases();
const runs = new Map<string, HfOrbitalsRun>();
function sto3g(c: DemoTargetCase): HfOrbitalsRun {
  let run = runs.get(c.name);
  if (!run) {
    run = runHfOrbitals({ basis: "sto-3g" }, c.context);
    runs.set(c.name, run);
  }
  return run;
}

const outputLine = (outputDat: string, label: string) => {
  const line = outputDat.split("\n").find((l) => l.trim().startsWith(`${label}:`));
  return (
    line
      ?.trim()
      .slice(label.length + 1)
      .trim() ?? null
  );
};

describe("cross-check: demo targets through hf-orbitals and psi4", () => {
  it("covers every demo target and isotopologue", () => {
    expect(cases.map((c) => c.name)).toEqual([
      "Water",
      "Nitrogen trifluoride",
      "Formyl cation",
      "Methane",
      "Heavy water",
      "Monodeuteromethane",
    ]);
  });

  it("hf-orbitals registers cleanly and its parameters schema keeps values out of the input's syntax", () => {
    expect(checkCodeTemplates(hfOrbitalsDefinition)).toEqual([]);
    expect(outputRuleProblems(hfOrbitalsDefinition.outputRules)).toEqual([]);
    const defaults = validateParameters(hfOrbitalsDefinition, {});
    expect(defaults).toEqual({
      valid: true,
      parameters: { basis: "cc-pvdz", frequencies: false, scfConvergence: 1e-8 },
    });
    // Strings reach psi4's input unquoted, so only the schema's enums may be strings.
    for (const hostile of [
      { basis: "sto-3g\nimport os" },
      { basis: "sto-3g }" },
      { reference: "rhf; x" },
      { scfConvergence: "1e-8" },
      { target: {} },
    ]) {
      expect(validateParameters(hfOrbitalsDefinition, hostile).valid, JSON.stringify(hostile)).toBe(false);
    }
  });

  it.each(cases.map((c) => [c.name, c] as const))(
    "%s: psi4's point groups, rotational constants, E_nn and electron count agree with shared/science",
    { timeout: 120_000 },
    (name, c) => {
      const run = sto3g(c);
      const table = readOrbitalTable(run.orbitalsTxt);
      const ours = c.inspection;

      expect(table.pointGroup).toBe(ours.abelianSubgroup.toLowerCase());
      expect(outputLine(run.outputDat, "Molecular point group")).toBe(ours.abelianSubgroup.toLowerCase());
      const psi4Full = outputLine(run.outputDat, "Full point group");
      expect(psi4Full, "psi4 printed no full point group").not.toBeNull();
      expect(PSI4_FULL_GROUP_SHORTFALLS[name] ?? ours.pointGroup).toBe(fromPsi4Name(psi4Full!));

      ours.rotationalConstantsCm1.forEach((b, k) => {
        const theirs = table.rotationalConstantsCm1[k];
        if (b === null) expect(theirs, `constant ${"ABC"[k]}`).toBeNull();
        else expect(Math.abs(theirs! - b) / b, `constant ${"ABC"[k]}`).toBeLessThan(1e-6);
      });
      expect(
        Math.abs(table.nuclearRepulsionHartree - ours.nuclearRepulsionHartree) / ours.nuclearRepulsionHartree,
      ).toBeLessThan(1e-8);

      const electrons = table.orbitals.reduce((n, o) => n + o.occupation, 0);
      expect(electrons).toBe(ours.electronCount);
      expect(table.orbitals.every((o) => c.context.irreps.includes(o.irrep))).toBe(true);
    },
  );

  it("psi4's progress lines match the code's output rule, ending at done = total", {
    timeout: 120_000,
  }, () => {
    const rule = compileUserPattern(hfOrbitalsDefinition.outputRules.progress[0]!);
    const progress = sto3g(cases[0]!)
      .stdout.split("\n")
      .map((line) => rule.matchGroups(line))
      .filter((groups) => groups !== null)
      .map((groups) => `${groups.done}/${groups.total}`);
    expect(progress).toEqual(["1/4", "2/4", "3/4", "4/4"]);
  });

  it("an isotopologue has its parent's orbitals and dipole (same electrons, same geometry)", {
    timeout: 120_000,
  }, () => {
    // Born–Oppenheimer: masses move the centre of mass and the rotational constants, not the electrons.
    // The dipole of a neutral molecule does not depend on the origin. Held to 1e-6 hartree and 1e-5 D
    // (SCF converged to 1e-8).
    for (const iso of cases.filter((c) => c.parent !== c.name)) {
      const parent = cases.find((c) => c.name === iso.parent)!;
      const mine = readOrbitalTable(sto3g(iso).orbitalsTxt);
      const theirs = readOrbitalTable(sto3g(parent).orbitalsTxt);
      expect(Math.abs(mine.totalEnergyHartree - theirs.totalEnergyHartree), iso.name).toBeLessThan(1e-6);
      const energies = (t: typeof mine) => t.orbitals.map((o) => o.energyHartree).sort((p, q) => p - q);
      energies(mine).forEach((e, i) => {
        expect(Math.abs(e - energies(theirs)[i]!), `${iso.name} orbital ${i + 1}`).toBeLessThan(1e-6);
      });
      const norm = (d: [number, number, number] | null) => Math.hypot(...(d ?? [Number.NaN, 0, 0]));
      expect(Math.abs(norm(mine.dipoleDebye) - norm(theirs.dipoleDebye)), iso.name).toBeLessThan(1e-5);
      expect(mine.rotationalConstantsCm1).not.toEqual(theirs.rotationalConstantsCm1);
    }
  });

  it("water, RHF/cc-pVDZ: electron count and the virial theorem from the orbital kinetic energies", {
    timeout: 120_000,
  }, () => {
    const water = cases.find((c) => c.name === "Water")!;
    const table = readOrbitalTable(runHfOrbitals({ basis: "cc-pvdz" }, water.context).orbitalsTxt);
    expect(table.basis).toBe("cc-pvdz");
    const electrons = table.orbitals.reduce((n, o) => n + o.occupation, 0);
    expect(electrons).toBe(electronCount(water.context.atoms, water.context.charge));
    // Virial theorem: −V/T = 2 for the exact wavefunction at equilibrium, and for a Hartree–Fock
    // wavefunction in a good basis near equilibrium to about 1e-3 (common practice; psi4 1.3.2 does not
    // report T itself). T = Σ occupation·⟨φ|−½∇²|φ⟩, V = E − T. A wrong kinetic matrix or coefficient
    // basis moves the ratio by far more than the 2e-3 held here.
    const kinetic = table.orbitals.reduce((t, o) => t + o.occupation * o.kineticHartree, 0);
    const virialRatio = -(table.totalEnergyHartree - kinetic) / kinetic;
    expect(Math.abs(virialRatio - 2)).toBeLessThan(2e-3);
  });
});
