/**
 * What the results view draws and prints, without a browser: axis labels from column names, numbers
 * with significant digits, values a logarithmic axis cannot show, series on one x axis, and the
 * modified-Arrhenius curve drawn beside computed rates.
 */
import { describe, expect, it } from "vitest";
import { alignSeries, logAxisSplits } from "@/features/results/chart-data";
import {
  chartPlan,
  groupMethod,
  groupResults,
  logYRange,
  seriesMethods,
} from "@/features/results/chart-plan";
import { formatSignificant } from "@/features/results/format-number";
import { columnLabel } from "@/features/results/result-labels";
import {
  elasticA1,
  elasticB2,
  elasticRate,
  elasticSum,
  ionization1b1,
  ionization3a1,
  ionizationTotal,
  waterShapedResults,
} from "./support/result-fixtures";

describe("column labels", () => {
  it.each([
    ["energy_eV", "Energy (eV)"],
    ["cross_section_A2", "σ (Å²)"],
    ["rate_cm3_per_s", "k (cm³ s⁻¹)"],
    ["temperature_K", "Temperature (K)"],
    ["eigenphase_sum_rad", "Eigenphase sum (rad)"],
    ["binding_energy_eV", "Binding energy (eV)"],
    ["cross_section_cm2", "σ (cm²)"],
    // A unit Sigmaflow does not know is printed as written rather than dropped.
    ["flux_furlongs", "Flux (furlongs)"],
  ])("%s → %s", (name, label) => {
    expect(columnLabel(name).text).toBe(label);
  });
});

describe("formatSignificant", () => {
  it.each([
    [0, "0"],
    [12.5, "12.5"],
    [0.1, "0.1"],
    [123456, "123500"],
    [1.2e-8, "1.2 × 10⁻⁸"],
    [2.5e-9, "2.5 × 10⁻⁹"],
    [-3.14159e-4, "−3.142 × 10⁻⁴"],
    [6.02214076e23, "6.022 × 10²³"],
    [Number.NaN, "—"],
  ])("%d → %s", (value, text) => {
    expect(formatSignificant(value)).toBe(text);
  });
});

describe("chart plans", () => {
  it("puts an irrep sum first and bold, and leaves out what a log axis cannot show", () => {
    const [group] = groupResults([elasticA1, elasticB2, elasticSum]);
    const plan = chartPlan(group!)!;
    expect(plan.series.map((s) => [s.name, s.bold, s.y.length])).toEqual([
      ["Sum over irreps", true, 3],
      ["A1", false, 3],
      ["B2", false, 2],
    ]);
    expect(plan.leftOut).toBe(1);
    expect(plan.logX && plan.logY).toBe(true);
  });

  it("draws BEB's orbitals with their total in bold, named by orbital, and shows the total's method", () => {
    const [group] = groupResults([ionization1b1, ionizationTotal, ionization3a1]);
    const plan = chartPlan(group!)!;
    expect(plan.series.map((s) => [s.name, s.bold])).toEqual([
      ["Total", true],
      ["1b1", false],
      ["3a1", false],
    ]);
    expect(plan.leftOut).toBe(1);
    expect(groupMethod(group!)).toBe(ionizationTotal.method);
    expect(seriesMethods(group!).map((part) => [part.name, part.method])).toEqual([
      ["1b1", ionization1b1.method],
      ["3a1", ionization3a1.method],
    ]);
  });

  it("keeps zero and negative values on a linear axis (eigenphase sums)", () => {
    const eigenphases = {
      ...elasticSum,
      kind: "eigenphase-sum" as const,
      columns: { energy_eV: [0.1, 1, 10], eigenphase_sum_rad: [-0.4, 0, 1.2] },
      columnOrder: ["energy_eV", "eigenphase_sum_rad"],
    };
    const plan = chartPlan(groupResults([eigenphases])[0]!)!;
    expect(plan.logY).toBe(false);
    expect(plan.series[0]!.y).toEqual([-0.4, 0, 1.2]);
    expect(plan.leftOut).toBe(0);
  });

  it("draws no chart for an orbital table", () => {
    const orbitals = {
      ...elasticSum,
      kind: "orbital-table" as const,
      process: "orbitals" as const,
      columns: { binding_energy_eV: [15.9, 13.0], kinetic_energy_eV: [55, 48] },
      columnOrder: ["binding_energy_eV", "kinetic_energy_eV"],
    };
    expect(chartPlan(groupResults([orbitals])[0]!)).toBeNull();
  });

  it("joins series sampled at different x values and adds the Arrhenius curve inside the fitted range", () => {
    const plan = chartPlan(groupResults([elasticRate])[0]!)!;
    plan.series.push({ name: "other grid", bold: false, x: [500, 1000], y: [1e-8, 1.1e-8], fit: null });
    const aligned = alignSeries(plan);
    expect(aligned.data[0]).toEqual([500, 1000, 10_000, 100_000]);
    expect(aligned.series.map((s) => s.name)).toEqual(["k", "k: Arrhenius fit", "other grid"]);
    expect(aligned.gridsDiffer).toBe(true);
    expect(aligned.data[1]).toEqual([null, 1.2e-8, 3.4e-8, 5.6e-8]);
    expect(aligned.data[3]).toEqual([1e-8, 1.1e-8, null, null]);
    // k(T) = α (T/300 K)^β exp(−γ/T) with α = 2.5e-9 cm³/s, β = 0.5, γ = 120 K (the modified Arrhenius
    // form itself, evaluated by hand): at 1000 K, 2.5e-9 · √(10/3) · e^(−0.12) = 4.0482e-9 cm³/s.
    const fitted = aligned.data[2]!;
    expect(fitted[0]).toBeNull(); // 500 K lies outside the fitted 1000–100000 K
    expect((fitted[1] as number) / 4.0482e-9).toBeCloseTo(1, 4);
  });
});

describe("logarithmic axes over a real run's ranges", () => {
  it("shows at most twelve decades below the largest value, and counts what lies below", () => {
    // From 2.4 × 10⁻⁷⁷ to 8.2 × 10⁻⁹ cm³ s⁻¹: the decade above the largest down twelve.
    expect(logYRange([2.4e-77, 1e-30, 8.2e-9])).toEqual([1e-20, 1e-8]);
    // A narrow range keeps its own decades.
    expect(logYRange([0.0025, 115.6])).toEqual([0.001, 1000]);
    // A single power of ten still gets one decade.
    expect(logYRange([1, 1])).toEqual([0.1, 1]);
    expect(logYRange([0, -1])).toBeNull();

    const groups = groupResults(waterShapedResults().results);
    const rates = chartPlan(groups.find((group) => group.title === "Ionization rate coefficient")!)!;
    expect(rates.yRange).toEqual([1e-20, 1e-8]);
    const below = rates.series[0]!.y.filter((k) => k < 1e-20).length;
    expect(below).toBeGreaterThan(10);
    expect(rates.belowRange).toBe(below);
    const eigenphases = chartPlan(groups.find((group) => group.title === "Eigenphase sums")!)!;
    expect(eigenphases.yRange).toBeNull();
    expect(eigenphases.belowRange).toBe(0);
  });

  it("marks a logarithmic axis at exact multiples of powers of ten over any range", () => {
    expect(logAxisSplits(1e-3, 1e3)).toHaveLength(6 * 9 + 1);
    expect(logAxisSplits(1e-3, 1e3).slice(0, 3)).toEqual([1e-3, 2e-3, 3e-3]);
    // Past eight decades, powers of ten only (a mark per tenth would grey the chart).
    expect(logAxisSplits(1e-20, 1e-8)).toEqual([
      1e-20, 1e-19, 1e-18, 1e-17, 1e-16, 1e-15, 1e-14, 1e-13, 1e-12, 1e-11, 1e-10, 1e-9, 1e-8,
    ]);
    expect(logAxisSplits(0.1, 50)).toEqual([
      0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 20, 30, 40, 50,
    ]);
    // Far below where the chart library's own marks stop: decades only, a bounded number of them.
    const wide = logAxisSplits(1e-300, 1e300);
    expect(wide).toHaveLength(601);
    expect(wide[0]).toBe(1e-300);
    expect(logAxisSplits(0, 1)).toEqual([]);
  });
});
