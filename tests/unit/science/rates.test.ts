/**
 * Maxwellian rate coefficients, the quadrature behind them, and modified-Arrhenius fits.
 */
import { ScienceInputError } from "@shared/science/errors";
import { linearTimesXExponentialWeights } from "@shared/science/quadrature/exponential-moments";
import { regularizedUpperGamma } from "@shared/science/quadrature/incomplete-gamma";
import { fitModifiedArrhenius, modifiedArrheniusRate } from "@shared/science/rates/arrhenius-fit";
import { maxwellianRateCoefficient, maxwellianRateCoefficients } from "@shared/science/rates/maxwellian-rate";
import { describe, expect, it } from "vitest";
import { seededUniform } from "./support/random-matrices";

// CODATA 2018 values typed here as the external reference (k_B and e exact, m_e 9.109 383 7015e-31 kg).
const K_B = 1.380649e-23;
const E_CHARGE = 1.602176634e-19;
const M_E = 9.1093837015e-31;
/** Mean Maxwellian speed √(8k_BT/(πm_e)) in cm/s. */
const meanSpeed = (t: number) => Math.sqrt((8 * K_B * t) / (Math.PI * M_E)) * 100;
const thermalEv = (t: number) => (K_B * t) / E_CHARGE;
const relative = (value: number, expected: number) => Math.abs(value / expected - 1);

describe("Maxwellian rate coefficient", () => {
  it("equals σ₀·v̄ for a constant cross section", () => {
    // Closed form ∫₀^∞ x e^{−x} dx = 1; tolerance 1e-12 relative (table to 1e5 eV, tail negligible).
    const table = { energiesEv: [0, 0.01, 0.3, 2, 50, 1e5], crossSectionsA2: [3, 3, 3, 3, 3, 3] };
    for (const t of [300, 1e4, 1e6]) {
      const rate = maxwellianRateCoefficient(table, t);
      expect(relative(rate, 3e-16 * meanSpeed(t))).toBeLessThan(1e-12);
    }
    // Two points and a constant tail: exact for every temperature.
    const short = { energiesEv: [0, 1], crossSectionsA2: [3, 3] };
    expect(relative(maxwellianRateCoefficient(short, 5e5, "constant"), 3e-16 * meanSpeed(5e5))).toBeLessThan(
      1e-12,
    );
  });

  it("equals C·√(8/(π m_e k_BT)) for σ = C/E", () => {
    // ∫ (C/E) E e^{−E/kT} dE = C·kT. Table on a log grid from 1e-9 eV (missing part ≈ 1e-9/kT relative),
    // piecewise-linear interpolation error ≈ (Δ ln E)²/12 ≈ 1e-6; exact 1/E tail. Tolerance 5e-6 relative.
    const n = 12_001;
    const energiesEv = Array.from({ length: n }, (_, i) => 1e-9 * 10 ** ((12 * i) / (n - 1)));
    const c = 2.5; // Å²·eV
    const table = { energiesEv, crossSectionsA2: energiesEv.map((e) => c / e) };
    for (const t of [300, 3000, 3e4]) {
      const expected = c * 1e-16 * E_CHARGE * Math.sqrt(8 / (Math.PI * M_E * K_B * t)) * 100;
      expect(relative(maxwellianRateCoefficient(table, t, "inverse-energy"), expected)).toBeLessThan(5e-6);
    }
  });

  it("equals σ₀ v̄ (1 + E₀/kT) e^{−E₀/kT} for a step at E₀, even deep in the Boltzmann tail", () => {
    // Closed form of ∫_{x₀}^∞ x e^{−x} dx; tolerance 1e-12 relative, including E₀/kT ≈ 116 (rate ~1e-58).
    const e0 = 10;
    const table = { energiesEv: [e0, 11, 40], crossSectionsA2: [2, 2, 2] };
    for (const t of [1e3, 1e4, 1e5]) {
      const x0 = e0 / thermalEv(t);
      const expected = 2e-16 * meanSpeed(t) * (1 + x0) * Math.exp(-x0);
      expect(relative(maxwellianRateCoefficient(table, t, "constant"), expected)).toBeLessThan(1e-12);
    }
  });

  it("stays accurate when kT is far above the whole table (no cancellation)", () => {
    // Constant σ₀ on [0, 1 eV], zero tail, kT ≈ 86 keV: exact value σ₀ v̄ [1 − (1 + x)e^{−x}] with x = 1/kT,
    // evaluated by its series x²/2 − x³/3 + x⁴/8; tolerance 1e-12 relative.
    const table = { energiesEv: [0, 0.25, 1], crossSectionsA2: [4, 4, 4] };
    const t = 1e9;
    const x = 1 / thermalEv(t);
    const expected = 4e-16 * meanSpeed(t) * (x ** 2 / 2 - x ** 3 / 3 + x ** 4 / 8);
    expect(relative(maxwellianRateCoefficient(table, t), expected)).toBeLessThan(1e-12);
  });

  it("reports the Maxwellian fraction above the table as Q(3/2, E_max/kT)", () => {
    // Q(3/2, x) = erfc(√x) + 2√(x/π) e^{−x} (DLMF §8.4). With erf(2) = 0.995322265018953 (Abramowitz &
    // Stegun, table 7.1): Q(3/2, 4) = 0.0460116... ; tolerance 1e-12 absolute.
    const q = 1 - 0.995322265018953 + 2 * Math.sqrt(4 / Math.PI) * Math.exp(-4);
    const temperatureK = 0.25 / thermalEv(1); // kT = 0.25 eV, so E_max/kT = 4 for E_max = 1 eV
    const result = maxwellianRateCoefficients({
      table: { energiesEv: [0, 1], crossSectionsA2: [1, 1] },
      temperaturesK: [temperatureK],
    });
    expect(result.maxwellianFractionBeyondTable[0]!).toBeCloseTo(q, 12);
  });

  it("rejects unsorted or negative tables and non-positive temperatures", () => {
    const table = { energiesEv: [0, 2, 1], crossSectionsA2: [0, 1, 1] };
    expect(() => maxwellianRateCoefficients({ table, temperaturesK: [300] })).toThrow(/strictly increasing/);
    expect(() =>
      maxwellianRateCoefficients({
        table: { energiesEv: [0, 1], crossSectionsA2: [0, -1] },
        temperaturesK: [300],
      }),
    ).toThrow(ScienceInputError);
    expect(() =>
      maxwellianRateCoefficients({
        table: { energiesEv: [0, 1], crossSectionsA2: [1, 1] },
        temperaturesK: [0],
      }),
    ).toThrow(/> 0 K/);
  });
});

describe("quadrature helpers", () => {
  it("integrates a linear function against x e^{−x} like a fine composite Simpson rule", () => {
    // Independent check: Simpson with 20 000 panels (error ≪ 1e-12 for these smooth integrands).
    const moments = new Float64Array(3);
    const weights = new Float64Array(2);
    for (const [xa, h] of [
      [0, 1e-4],
      [0.3, 0.7],
      [2, 1],
      [5, 12],
    ] as const) {
      const [fa, fb] = [1.3, -0.4];
      const f = (x: number) => (fa * (xa + h - x) + fb * (x - xa)) / h;
      const panels = 20_000;
      const step = h / panels;
      let simpson = 0;
      for (let i = 0; i <= panels; i++) {
        const x = xa + i * step;
        const weight = i === 0 || i === panels ? 1 : i % 2 ? 4 : 2;
        simpson += weight * f(x) * x * Math.exp(-x);
      }
      simpson *= step / 3;
      linearTimesXExponentialWeights(xa, h, moments, weights);
      const exact = Math.exp(-xa) * (fa * weights[0]! + fb * weights[1]!);
      expect(Math.abs(exact - simpson)).toBeLessThan(1e-12 * Math.max(1e-12, Math.abs(simpson)) + 1e-16);
    }
  });

  it("evaluates Q(a, x) against closed forms for integer and half-integer a", () => {
    // Q(1, x) = e^{−x}, Q(3, x) = e^{−x}(1 + x + x²/2) (DLMF §8.4); Q(1/2, 1) = erfc(1) = 0.157299207050285
    // (Abramowitz & Stegun table 7.1). Tolerance 1e-13 relative.
    for (const x of [0.01, 0.7, 3, 25]) {
      expect(relative(regularizedUpperGamma(1, x), Math.exp(-x))).toBeLessThan(1e-13);
      expect(relative(regularizedUpperGamma(3, x), Math.exp(-x) * (1 + x + (x * x) / 2))).toBeLessThan(1e-13);
    }
    expect(relative(regularizedUpperGamma(0.5, 1), 0.157299207050285)).toBeLessThan(1e-13);
  });
});

describe("modified Arrhenius fit", () => {
  const truth = { alpha: 2.3e-9, beta: -0.5, gamma: 120 };
  const temperatures = Array.from({ length: 20 }, (_, i) => 10 * 100 ** (i / 19));

  it("recovers α, β, γ from exact rates, with and without refinement", () => {
    // Data generated from k = α (T/300)^β e^{−γ/T}; tolerance 1e-9 relative (α), 1e-9 absolute (β), 1e-7 K (γ).
    const rates = temperatures.map((t) => modifiedArrheniusRate(t, truth));
    for (const refine of [false, true]) {
      const fit = fitModifiedArrhenius(temperatures, rates, { refine });
      expect(relative(fit.alpha, truth.alpha)).toBeLessThan(1e-9);
      expect(Math.abs(fit.beta - truth.beta)).toBeLessThan(1e-9);
      expect(Math.abs(fit.gamma - truth.gamma)).toBeLessThan(1e-7);
      expect(fit.rmsRelativeResidual).toBeLessThan(1e-10);
    }
  });

  it("lowers the relative residual with Levenberg–Marquardt refinement on noisy rates (seed 4)", () => {
    // Multiplicative noise up to ±5 %: the log-linear fit minimises log residuals, the refinement the relative
    // ones, so its relative RMS can only be lower or equal; both stay near the truth (β within 0.05).
    const random = seededUniform(4);
    const rates = temperatures.map((t) => modifiedArrheniusRate(t, truth) * (1 + 0.05 * (2 * random() - 1)));
    const linear = fitModifiedArrhenius(temperatures, rates);
    const refined = fitModifiedArrhenius(temperatures, rates, { refine: true });
    expect(refined.rmsRelativeResidual).toBeLessThanOrEqual(linear.rmsRelativeResidual);
    expect(Math.abs(refined.beta - truth.beta)).toBeLessThan(0.05);
    expect(Math.abs(linear.beta - truth.beta)).toBeLessThan(0.05);
  });

  it("needs three positive rates", () => {
    expect(() => fitModifiedArrhenius([100, 200], [1e-9, 2e-9])).toThrow(/at least 3/);
    expect(() => fitModifiedArrhenius([100, 200, 300], [1e-9, 0, 2e-9])).toThrow(/positive rates/);
  });
});
