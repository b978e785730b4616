/**
 * Results from an orbital table (worker/results/derive-ionization.ts) against values computed here,
 * independently of the science core, for a made-up molecule (orbital energies, kinetic energies and
 * occupations invented for the test — no real molecule).
 *
 * Sources:
 *  - BEB: Y.-K. Kim and M. E. Rudd, Phys. Rev. A 50, 3954 (1994), eq. (57) written out below:
 *      σ = S/(t + u + 1) · [ (ln t / 2)(1 − 1/t²) + 1 − 1/t − ln t/(t + 1) ],
 *      t = T/B, u = U/B, S = 4π a₀² N (R/B)².
 *    The singly-charged-ion variant replaces t + u + 1 by t + (u + 1)/2 (as the science core states it,
 *    quoted there from memory).
 *  - Constants: CODATA 2018 (a₀ = 0.529177210903 Å, R = 13.605693122994 eV, E_h = 27.211386245988 eV,
 *    k_B = 1.380649e-23 J/K, m_e = 9.1093837015e-31 kg), from memory.
 *  - Maxwellian rate: k(T) = √(8/(π m_e)) (k_BT)^(−3/2) ∫ σ(E) E e^(−E/k_BT) dE (common practice), by
 *    composite Simpson quadrature of the formula above.
 */
import { describe, expect, it } from "vitest";
import { runAnalysisSchema } from "../../../shared/schemas/results";
import { ScienceInputError } from "../../../shared/science/errors";
import type { DerivedResult } from "../../../worker/results/derive-common";
import { deriveIonizationResults, type OrbitalTableInput } from "../../../worker/results/derive-ionization";

const A0_ANGSTROM = 0.529177210903;
const RYDBERG_EV = 13.605693122994;
const HARTREE_EV = 27.211386245988;
const BOLTZMANN_J_PER_K = 1.380649e-23;
const ELECTRON_MASS_KG = 9.1093837015e-31;
const EV_J = 1.602176634e-19;

/** Made up: three occupied orbitals (one pair degenerate) and a virtual one. */
const TABLE: OrbitalTableInput = {
  program: "made-up 1.0",
  method: "rhf",
  basis: "test-basis",
  orbitals: [
    { label: "1a1", irrep: "A1", energyHartree: -0.9, occupation: 2, kineticHartree: 2.1 },
    { label: "1b1", irrep: "B1", energyHartree: -0.45, occupation: 2, kineticHartree: 1.3 },
    { label: "1b2", irrep: "B2", energyHartree: -0.45, occupation: 2, kineticHartree: 1.3 },
    { label: "2a1", irrep: "A1", energyHartree: 0.2, occupation: 0, kineticHartree: 0.4 },
  ],
};

function bebByHand(bindingEv: number, kineticEv: number, occupation: number, energyEv: number, ion = false) {
  if (energyEv <= bindingEv) return 0;
  const t = energyEv / bindingEv;
  const u = kineticEv / bindingEv;
  const s = 4 * Math.PI * A0_ANGSTROM ** 2 * occupation * (RYDBERG_EV / bindingEv) ** 2;
  const lnT = Math.log(t);
  const bracket = (lnT / 2) * (1 - 1 / t ** 2) + 1 - 1 / t - lnT / (t + 1);
  return (s / (ion ? t + (u + 1) / 2 : t + u + 1)) * bracket;
}

const totalByHand = (energyEv: number, ion = false, firstIonizationEv?: number) =>
  TABLE.orbitals
    .filter((o) => o.occupation > 0)
    .reduce((sum, o) => {
      const b =
        firstIonizationEv !== undefined && o.energyHartree === -0.45
          ? firstIonizationEv
          : -o.energyHartree * HARTREE_EV;
      return sum + bebByHand(b, o.kineticHartree * HARTREE_EV, o.occupation, energyEv, ion);
    }, 0);

const analysis = runAnalysisSchema.parse({});
const find = (
  rows: DerivedResult[],
  kind: string,
  process: string,
  irrep: string | null = null,
  label = "",
) => rows.find((r) => r.kind === kind && r.process === process && r.irrep === irrep && r.label === label);
const valueAt = (row: DerivedResult, x: number) => {
  const [xName, yName] = row.columnOrder as [string, string];
  const index = row.columns[xName]!.indexOf(x);
  expect(index, `${x} on the grid of ${row.kind}`).toBeGreaterThanOrEqual(0);
  return row.columns[yName]![index]!;
};

describe("BEB from an orbital table", () => {
  const { results, notes } = deriveIonizationResults(TABLE, analysis, {
    charge: 0,
    source: "orbitals.txt of stage scf",
  });
  const total = find(results, "cross-section", "ionization")!;

  it("has the round energies on its grid, from the lowest threshold to ionizationEnergyMaxEv", () => {
    const energies = total.columns.energy_eV!;
    expect(energies[0]).toBeCloseTo(0.45 * HARTREE_EV, 12);
    expect(energies.at(-1)).toBe(5000);
    for (const round of [20, 50, 100, 200, 500, 1000, 2000]) expect(energies).toContain(round);
    expect(energies).not.toContain(10); // below the threshold of 12.2 eV
    expect(energies).toContain(0.9 * HARTREE_EV); // the 1a1 threshold, exactly
    for (let i = 1; i < energies.length; i++) expect(energies[i]!).toBeGreaterThan(energies[i - 1]!);
    expect(total.columnOrder).toEqual(["energy_eV", "cross_section_A2"]);
  });

  it("total σ at 100 eV and 1000 eV equals the Kim–Rudd formula written out (relative 1e-12)", () => {
    for (const energy of [100, 1000]) {
      expect(valueAt(total, energy)).toBeCloseTo(totalByHand(energy), 12);
      expect(Math.abs(valueAt(total, energy) / totalByHand(energy) - 1)).toBeLessThan(1e-12);
    }
    expect(valueAt(total, 100)).toBeGreaterThan(0);
    expect(total.method).toMatch(/Koopmans/);
    expect(total.method).toMatch(/neutral formula/);
    expect(notes).toEqual([]);
  });

  it("has one row per occupied orbital, labelled and in its irrep, summing to the total", () => {
    const perOrbital = results.filter((r) => r.kind === "cross-section" && r.label !== "");
    expect(perOrbital.map((r) => [r.irrep, r.label])).toEqual([
      ["A1", "1a1"],
      ["B1", "1b1"],
      ["B2", "1b2"],
    ]);
    const b = 0.9 * HARTREE_EV;
    expect(valueAt(perOrbital[0]!, 200)).toBeCloseTo(bebByHand(b, 2.1 * HARTREE_EV, 2, 200), 12);
    const sum = perOrbital.reduce((s, r) => s + valueAt(r, 500), 0);
    expect(sum).toBeCloseTo(valueAt(total, 500), 12);
  });

  it("stores the orbital table the model used, one row per occupied orbital with units in the columns", () => {
    const rows = results.filter((r) => r.kind === "orbital-table");
    expect(rows.map((r) => r.label)).toEqual(["1a1", "1b1", "1b2"]);
    expect(rows[1]!.columns).toEqual({
      orbital_energy_eV: [-0.45 * HARTREE_EV],
      binding_energy_eV: [0.45 * HARTREE_EV],
      kinetic_energy_eV: [1.3 * HARTREE_EV],
      occupation_electrons: [2],
    });
  });

  it("gives the Maxwellian ionization rate, matching a Simpson quadrature of the formula at 50 000 K (0.5 %)", () => {
    const rate = find(results, "rate-coefficient", "ionization")!;
    const temperatures = rate.columns.temperature_K!;
    expect(temperatures[0]).toBeCloseTo(1000, 9);
    expect(temperatures.at(-1)).toBeCloseTo(100_000, 6);
    const t = temperatures.reduce((best, x) => (Math.abs(x - 50_000) < Math.abs(best - 50_000) ? x : best));
    const kT = (BOLTZMANN_J_PER_K * t) / EV_J;
    const low = 0.45 * HARTREE_EV;
    const high = 5000;
    const n = 20_000;
    const h = (high - low) / n;
    let integral = 0;
    for (let i = 0; i <= n; i++) {
      const e = low + i * h;
      const weight = i === 0 || i === n ? 1 : i % 2 ? 4 : 2;
      integral += weight * totalByHand(e) * 1e-16 * e * Math.exp(-e / kT);
    }
    integral *= h / 3; // cm² eV²
    const expected =
      Math.sqrt(8 / (Math.PI * ELECTRON_MASS_KG)) * (kT * EV_J) ** -1.5 * integral * EV_J ** 2 * 100;
    const index = temperatures.indexOf(t);
    expect(Math.abs(rate.columns.rate_cm3_per_s![index]! / expected - 1)).toBeLessThan(5e-3);
    expect(rate.fit).not.toBeNull();
    expect(rate.fit!.maxRelativeDeviation).toBeLessThan(0.5);
    expect(rate.method).toMatch(/0 above 5000 eV/);
  });
});

describe("options and the target's charge", () => {
  it("a measured first ionization energy replaces B of the highest occupied level only (both degenerate components)", () => {
    const withOverride = runAnalysisSchema.parse({ firstIonizationEnergyEv: 11.5 });
    const { results } = deriveIonizationResults(TABLE, withOverride, { charge: 0, source: "orbitals.txt" });
    const binding = Object.fromEntries(
      results
        .filter((r) => r.kind === "orbital-table")
        .map((r) => [r.label, r.columns.binding_energy_eV![0]]),
    );
    expect(binding).toEqual({ "1a1": 0.9 * HARTREE_EV, "1b1": 11.5, "1b2": 11.5 });
    const total = find(results, "cross-section", "ionization")!;
    expect(total.columns.energy_eV![0]).toBe(11.5);
    expect(valueAt(total, 100)).toBeCloseTo(totalByHand(100, false, 11.5), 12);
    expect(total.method).toMatch(/replaced by the measured first ionization energy 11\.5 eV/);
  });

  it("a target of charge +1 uses the singly-charged-ion denominator", () => {
    const { results } = deriveIonizationResults(TABLE, analysis, { charge: 1, source: "orbitals.txt" });
    const total = find(results, "cross-section", "ionization")!;
    expect(valueAt(total, 100)).toBeCloseTo(totalByHand(100, true), 12);
    expect(valueAt(total, 100)).not.toBeCloseTo(totalByHand(100, false), 3);
    expect(total.method).toMatch(/singly charged ions/);
  });

  it("no BEB for a doubly charged target: the orbital table only, and a note why", () => {
    const { results, notes } = deriveIonizationResults(TABLE, analysis, {
      charge: 2,
      source: "orbitals.txt",
    });
    expect(new Set(results.map((r) => r.kind))).toEqual(new Set(["orbital-table"]));
    expect(notes.join(" ")).toMatch(/charge is 2/);
  });

  it("refuses an occupied orbital with a non-negative energy and a maximum energy below threshold", () => {
    const unbound = { ...TABLE, orbitals: [{ ...TABLE.orbitals[0]!, energyHartree: 0.01 }] };
    expect(() => deriveIonizationResults(unbound, analysis, { charge: 0, source: "x" })).toThrow(
      ScienceInputError,
    );
    const low = runAnalysisSchema.parse({ ionizationEnergyMaxEv: 10 });
    expect(() => deriveIonizationResults(TABLE, low, { charge: 0, source: "x" })).toThrow(
      /ionizationEnergyMaxEv \(10 eV\)/,
    );
  });
});
