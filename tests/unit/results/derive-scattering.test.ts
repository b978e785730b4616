/**
 * Results from a K-matrix table (worker/results/derive-scattering.ts) against textbook partial-wave
 * formulas written out here. The tables are made up: K = diag(tan δ_l) with invented phase shifts δ_0(E),
 * δ_1(E) for s and p waves spread over C2v-like irreps as a spherical potential's would be.
 *
 * Sources (hartree atomic units, k² = 2E/E_h, k in bohr⁻¹):
 *  - elastic: σ = (4π/k²) Σ_l (2l + 1) sin² δ_l (e.g. N. F. Mott and H. S. W. Massey, The Theory of
 *    Atomic Collisions, 3rd ed., 1965; any scattering textbook), also through the science core's
 *    partial-wave function;
 *  - momentum transfer: σ_MT = (4π/k²) Σ_l (l + 1) sin²(δ_l − δ_(l+1)) (same textbooks; common practice in
 *    swarm work);
 *  - eigenphase sum of a diagonal K: Σ arctan K_ii = Σ δ (mod π);
 *  - Maxwellian rate of σ(E) = σ₀ (1 − E₀/E) above E₀: ∫ (x − x₀) e^(−x) dx = e^(−x₀), so
 *    k(T) = σ₀ √(8k_BT/(π m_e)) exp(−E₀/k_BT), exactly modified Arrhenius with β = ½ and γ = E₀/k_B
 *    (derived here).
 *  - Constants CODATA 2018 (a₀ = 0.529177210903 Å, E_h = 27.211386245988 eV, k_B = 1.380649e-23 J/K,
 *    m_e = 9.1093837015e-31 kg, e = 1.602176634e-19 C), from memory.
 */
import { describe, expect, it } from "vitest";
import { runAnalysisSchema } from "../../../shared/schemas/results";
import { computeKMatrixCrossSections } from "../../../shared/science/kmatrix";
import { elasticCrossSectionBohr2 } from "../../../shared/science/partial-waves";
import { fitModifiedArrhenius, modifiedArrheniusRate } from "../../../shared/science/rates";
import { type DerivedResult, rateCoefficientResult } from "../../../worker/results/derive-common";
import { deriveScatteringResults, sphericalPhaseShifts } from "../../../worker/results/derive-scattering";
import { kMatrixTableToInputDocument, readKMatrixTable } from "../../../worker/results/readers/kmatrix-table";

const A0_ANGSTROM = 0.529177210903;
const HARTREE_EV = 27.211386245988;
const BOLTZMANN_J_PER_K = 1.380649e-23;
const ELECTRON_MASS_KG = 9.1093837015e-31;
const EV_J = 1.602176634e-19;

const ENERGIES_EV = [0.1, 0.5, 1, 2, 5, 10];
/** Made-up phase shifts, radians: δ_0 passes through π/2 (K = tan δ_0 changes sign through a pole). */
const delta0 = (e: number) => 1.2 + 0.08 * e;
const delta1 = (e: number) => 0.3 * Math.sin(e / 4);
const k2 = (e: number) => (2 * e) / HARTREE_EV;

type Channel = [number, number];
/** A K-matrix file: irreps with their channels; K_ii = tan δ_l(E) (+ an optional change per channel). */
function kMatrixFile(
  irreps: { label: string; channels: Channel[]; spin?: number }[],
  options: {
    targetMultiplicity?: number;
    offDiagonal?: number;
    tweak?: (l: number, m: number) => number;
  } = {},
): string {
  const lines = ["format sigmaflow-kmatrix 1", "model spherical test potential (teaching-grade model)"];
  lines.push(`target_spin_multiplicity ${options.targetMultiplicity ?? 1}`);
  for (const irrep of irreps) {
    const n = irrep.channels.length;
    lines.push(`irrep ${irrep.label} total_spin_multiplicity ${irrep.spin ?? 2} channels ${n}`);
    irrep.channels.forEach(([l, m], i) => {
      lines.push(`channel ${i + 1} ${l} ${m}`);
    });
    for (const e of n === 0 ? [] : ENERGIES_EV) {
      const k: number[] = [];
      for (let r = 0; r < n; r++) {
        for (let c = 0; c < n; c++) {
          const [l, m] = irrep.channels[r]!;
          const delta = (l === 0 ? delta0(e) : delta1(e)) + (options.tweak?.(l, m) ?? 0);
          k.push(r === c ? Math.tan(delta) : (options.offDiagonal ?? 0));
        }
      }
      lines.push(`energy ${e} ${k.map((v) => v.toPrecision(17)).join(" ")}`);
    }
    lines.push("end irrep");
  }
  return `${lines.join("\n")}\n`;
}

const SPHERICAL: { label: string; channels: Channel[] }[] = [
  {
    label: "A1",
    channels: [
      [0, 0],
      [1, 0],
    ],
  },
  { label: "A2", channels: [] },
  { label: "B1", channels: [[1, 1]] },
  { label: "B2", channels: [[1, -1]] },
];

const analysis = runAnalysisSchema.parse({});
const find = (
  rows: DerivedResult[],
  kind: string,
  process: string,
  irrep: string | null = null,
  label = "",
) => rows.find((r) => r.kind === kind && r.process === process && r.irrep === irrep && r.label === label);
const ys = (row: DerivedResult | undefined) => row!.columns[row!.columnOrder[1]!]!;

describe("a spherical potential's K-matrices (s and p waves)", () => {
  const table = readKMatrixTable(kMatrixFile(SPHERICAL));
  const { results, notes } = deriveScatteringResults(table, analysis, {
    source: "kmatrices.txt of stage scatter",
  });

  it("summed elastic σ = (4π/k²) Σ (2l+1) sin²δ_l, written out and through the partial-wave function (1e-10)", () => {
    const elastic = find(results, "cross-section", "elastic")!;
    expect(elastic.columns.energy_eV).toEqual(ENERGIES_EV);
    ENERGIES_EV.forEach((e, i) => {
      const textbookA2 =
        ((4 * Math.PI) / k2(e)) *
        (Math.sin(delta0(e)) ** 2 + 3 * Math.sin(delta1(e)) ** 2) *
        A0_ANGSTROM ** 2;
      const partialWaveA2 =
        elasticCrossSectionBohr2(Math.sqrt(k2(e)), [delta0(e), delta1(e)]) * A0_ANGSTROM ** 2;
      expect(Math.abs(ys(elastic)[i]! / textbookA2 - 1)).toBeLessThan(1e-10);
      expect(Math.abs(ys(elastic)[i]! / partialWaveA2 - 1)).toBeLessThan(1e-10);
    });
  });

  it("per irrep: A1 holds s and one p component, B1 one p component; A2 (no channels) has no row", () => {
    const a1 = ys(find(results, "cross-section", "elastic", "A1"));
    const b1 = ys(find(results, "cross-section", "elastic", "B1"));
    ENERGIES_EV.forEach((e, i) => {
      const unit = ((4 * Math.PI) / k2(e)) * A0_ANGSTROM ** 2;
      expect(a1[i]!).toBeCloseTo(unit * (Math.sin(delta0(e)) ** 2 + Math.sin(delta1(e)) ** 2), 10);
      expect(b1[i]!).toBeCloseTo(unit * Math.sin(delta1(e)) ** 2, 10);
    });
    expect(find(results, "cross-section", "elastic", "A2")).toBeUndefined();
  });

  it("the same σ as the science core's whole-document path on the converted table", () => {
    const whole = computeKMatrixCrossSections(kMatrixTableToInputDocument(table));
    const elastic = ys(find(results, "cross-section", "elastic"));
    whole.transitions[0]!.crossSectionA2.forEach((sigma, i) => {
      expect(elastic[i]!).toBeCloseTo(sigma, 10);
    });
  });

  it("momentum transfer σ_MT = (4π/k²)[sin²(δ_0 − δ_1) + 2 sin² δ_1], written out (1e-10)", () => {
    const mt = find(results, "cross-section", "momentum-transfer")!;
    ENERGIES_EV.forEach((e, i) => {
      const textbookA2 =
        ((4 * Math.PI) / k2(e)) *
        (1 * Math.sin(delta0(e) - delta1(e)) ** 2 + 2 * Math.sin(delta1(e) - 0) ** 2) *
        A0_ANGSTROM ** 2;
      expect(Math.abs(ys(mt)[i]! / textbookA2 - 1)).toBeLessThan(1e-10);
    });
    expect(mt.method).toMatch(/spherical potential/);
    expect(notes.filter((n) => /momentum-transfer cross section/.test(n))).toEqual([]);
  });

  it("eigenphase sums equal Σ δ, continuous where δ_0 passes π/2 (unwrapped)", () => {
    const summed = find(results, "eigenphase-sum", "elastic")!;
    expect(summed.columnOrder).toEqual(["energy_eV", "eigenphase_sum_rad"]);
    ENERGIES_EV.forEach((e, i) => {
      expect(ys(summed)[i]!).toBeCloseTo(delta0(e) + 3 * delta1(e), 10);
    });
    expect(delta0(10)).toBeGreaterThan(Math.PI / 2); // the unwrapping is really needed
    const a1 = ys(find(results, "eigenphase-sum", "elastic", "A1"));
    ENERGIES_EV.forEach((e, i) => {
      expect(a1[i]!).toBeCloseTo(delta0(e) + delta1(e), 10);
    });
  });

  it("rate coefficients for elastic and momentum transfer with fits; methods name the model and the source", () => {
    for (const process of ["elastic", "momentum-transfer"]) {
      const rate = find(results, "rate-coefficient", process)!;
      expect(rate.columnOrder).toEqual(["temperature_K", "rate_cm3_per_s"]);
      expect(ys(rate).every((k) => k > 0)).toBe(true);
      expect(rate.fit).not.toBeNull();
      expect(rate.method).toMatch(/taken as 0 below 0\.1 eV/);
    }
    const elastic = find(results, "cross-section", "elastic")!;
    expect(elastic.method).toMatch(
      /from the teaching-grade model; K-matrices of kmatrices\.txt of stage scatter \(model: spherical test potential/,
    );
    expect(elastic.method).toMatch(/channels up to l = 1 only/);
  });

  it("orders rows as derived: cross sections (sums first), eigenphase sums, rates", () => {
    expect(results.map((r) => `${r.kind}/${r.process}/${r.irrep ?? "Σ"}`)).toEqual([
      "cross-section/elastic/Σ",
      "cross-section/elastic/A1",
      "cross-section/elastic/B1",
      "cross-section/elastic/B2",
      "cross-section/momentum-transfer/Σ",
      "eigenphase-sum/elastic/Σ",
      "eigenphase-sum/elastic/A1",
      "eigenphase-sum/elastic/B1",
      "eigenphase-sum/elastic/B2",
      "rate-coefficient/elastic/Σ",
      "rate-coefficient/momentum-transfer/Σ",
    ]);
  });
});

describe("momentum transfer only where it is exact", () => {
  const reasonFor = (text: string) => {
    const { results, notes } = deriveScatteringResults(readKMatrixTable(text), analysis, { source: "k.txt" });
    expect(find(results, "cross-section", "momentum-transfer")).toBeUndefined();
    expect(find(results, "rate-coefficient", "momentum-transfer")).toBeUndefined();
    expect(find(results, "cross-section", "elastic")).toBeDefined();
    return notes.join(" ");
  };

  it("skips it, saying why, when K couples channels", () => {
    expect(reasonFor(kMatrixFile(SPHERICAL, { offDiagonal: 0.05 }))).toMatch(
      /No momentum-transfer cross section from k\.txt: irrep A1 at 0\.1 eV: K couples channels \(l = 1, m = 0\) and \(l = 0, m = 0\)/,
    );
  });

  it("skips it when the m components of one l have different phases", () => {
    const text = kMatrixFile(SPHERICAL, { tweak: (l, m) => (l === 1 && m === 1 ? 0.01 : 0) });
    expect(reasonFor(text)).toMatch(/the l = 1 phase shift is .* rad for m = 1 but .* in A1 \(m = 0\)/);
  });

  it("skips it when a partial wave is incomplete", () => {
    const text = kMatrixFile(SPHERICAL.filter((irrep) => irrep.label !== "B2"));
    expect(reasonFor(text)).toMatch(/\(l = 1, m = -1\) is missing/);
  });

  it("a doublet target: both total spins, weights summing to one, eigenphase sums per total spin", () => {
    const irreps = SPHERICAL.flatMap((irrep) => [1, 3].map((spin) => ({ ...irrep, spin })));
    const table = readKMatrixTable(kMatrixFile(irreps, { targetMultiplicity: 2 }));
    expect("phaseShiftsRad" in sphericalPhaseShifts(table)).toBe(true);
    const { results } = deriveScatteringResults(table, analysis, { source: "k.txt" });
    const e = ENERGIES_EV[2]!;
    const textbookA2 =
      ((4 * Math.PI) / k2(e)) * (Math.sin(delta0(e)) ** 2 + 3 * Math.sin(delta1(e)) ** 2) * A0_ANGSTROM ** 2;
    expect(ys(find(results, "cross-section", "elastic"))[2]!).toBeCloseTo(textbookA2, 10);
    expect(find(results, "eigenphase-sum", "elastic", null, "2S+1 = 1")).toBeDefined();
    expect(find(results, "eigenphase-sum", "elastic", "B1", "2S+1 = 3")).toBeDefined();
  });
});

describe("rate coefficients and their modified-Arrhenius fit", () => {
  it("recover α, β = ½, γ = E₀/k_B for σ = σ₀(1 − E₀/E), whose Maxwellian rate is exactly Arrhenius", () => {
    const sigma0A2 = 3;
    const thresholdEv = 1;
    const energiesEv = Array.from(
      { length: 6001 },
      (_, i) => thresholdEv * (5000 / thresholdEv) ** (i / 6000),
    );
    const table = { energiesEv, crossSectionsA2: energiesEv.map((e) => sigma0A2 * (1 - thresholdEv / e)) };
    const { results } = rateCoefficientResult(
      { process: "ionization", irrep: null, label: "", source: "a test table" },
      table,
      analysis,
      true,
    );
    const rate = results[0]!;
    const meanSpeedCmPerS = (t: number) =>
      Math.sqrt((8 * BOLTZMANN_J_PER_K * t) / (Math.PI * ELECTRON_MASS_KG)) * 100;
    const exact = (t: number) =>
      sigma0A2 * 1e-16 * meanSpeedCmPerS(t) * Math.exp((-thresholdEv * EV_J) / (BOLTZMANN_J_PER_K * t));
    rate.columns.temperature_K!.forEach((t, i) => {
      expect(Math.abs(rate.columns.rate_cm3_per_s![i]! / exact(t) - 1)).toBeLessThan(1e-4);
    });
    expect(rate.fit!.beta).toBeCloseTo(0.5, 4);
    expect(Math.abs(rate.fit!.gamma_K / ((thresholdEv * EV_J) / BOLTZMANN_J_PER_K) - 1)).toBeLessThan(1e-4);
    expect(Math.abs(rate.fit!.alpha_cm3_per_s / (sigma0A2 * 1e-16 * meanSpeedCmPerS(300)) - 1)).toBeLessThan(
      1e-3,
    );
    expect(rate.fit!.maxRelativeDeviation).toBeLessThan(1e-4);
    expect(rate.fit!.minTemperatureK).toBeCloseTo(1000, 9);
  });

  it("the science core's fit recovers α, β, γ from rates generated by the formula", () => {
    const truth = { alpha: 2.5e-9, beta: -0.7, gamma: 4200 };
    const temperatures = Array.from({ length: 41 }, (_, i) => 1000 * 100 ** (i / 40));
    const fit = fitModifiedArrhenius(
      temperatures,
      temperatures.map((t) => modifiedArrheniusRate(t, truth)),
      { refine: true },
    );
    expect(fit.alpha / truth.alpha).toBeCloseTo(1, 9);
    expect(fit.beta).toBeCloseTo(truth.beta, 9);
    expect(fit.gamma).toBeCloseTo(truth.gamma, 6);
  });

  it("says so when there is nothing to fit", () => {
    const { results, notes } = rateCoefficientResult(
      { process: "elastic", irrep: null, label: "", source: "one point" },
      { energiesEv: [1], crossSectionsA2: [1] },
      analysis,
      false,
    );
    expect(results).toEqual([]);
    expect(notes).toEqual(["No elastic rate coefficient: its cross section has a single energy."]);
  });
});
