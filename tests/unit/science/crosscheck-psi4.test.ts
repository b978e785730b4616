import { existsSync, statSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { inspectTarget } from "@shared/science/geometry";
import { describe, expect, it } from "vitest";
import { psi4Geometries } from "./support/crosscheck";
import { crosscheckCases } from "./support/crosscheck-cases";

/**
 * Abelian subgroup, rotational constants and nuclear repulsion against psi4 1.3.2 (Debian package),
 * geometry only (no SCF), with the same isotope masses. psi4 finds only subgroups of D2h, so it is
 * compared with our Abelian subgroup. psi4 uses CODATA 2014 constants (h, m_u, a₀ differ from CODATA 2018
 * by ≤ 2e-8 relative), hence the tolerances: 1e-6 relative on rotational constants, 1e-8 on E_nn.
 * psi4 reports A = 0 for linear molecules where we report null (no rotation about the axis).
 */
/** psi4 writes timer.dat into its working folder; the helper must run it in a temporary one. */
const REPOSITORY_TIMER_FILE = fileURLToPath(new URL("../../../timer.dat", import.meta.url));
const modifiedAt = (path: string) => (existsSync(path) ? statSync(path).mtimeMs : null);

describe("cross-check: psi4 geometry properties", () => {
  it("agrees on the Abelian subgroup, rotational constants and nuclear repulsion", {
    timeout: 180_000,
  }, () => {
    const cases = crosscheckCases(1);
    const timerBefore = modifiedAt(REPOSITORY_TIMER_FILE);
    const reference = psi4Geometries(cases);
    // regression: psi4 must not leave timer.dat in the repository (it runs in a temporary working folder)
    expect(modifiedAt(REPOSITORY_TIMER_FILE), "psi4 wrote timer.dat into the repository").toBe(timerBefore);
    expect(reference).toHaveLength(cases.length);
    for (const [i, c] of cases.entries()) {
      const theirs = reference[i]!;
      const ours = inspectTarget({
        atoms: c.atoms.map((a) => ({
          symbol: a.symbol,
          massNumber: a.massNumber,
          positionAngstrom: a.positionAngstrom,
        })),
      });
      expect(theirs.name).toBe(c.name);
      expect(`${c.name}: ${ours.abelianSubgroup.toLowerCase()}`).toBe(`${c.name}: ${theirs.abelianSubgroup}`);
      ours.rotationalConstantsCm1.forEach((b, k) => {
        const expected = theirs.rotationalConstantsCm1[k]!;
        if (b === null) expect(expected).toBe(0);
        else expect(Math.abs(b - expected) / expected, `${c.name} constant ${"ABC"[k]}`).toBeLessThan(1e-6);
      });
      const relative =
        Math.abs(ours.nuclearRepulsionHartree - theirs.nuclearRepulsionHartree) /
        theirs.nuclearRepulsionHartree;
      expect(relative, `${c.name} E_nn`).toBeLessThan(1e-8);
    }
  });
});
